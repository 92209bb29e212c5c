/**
 * Outside services some tests need, found or not, and the one way to skip a
 * test that needs one which is not there.
 *
 *   import { describe, it } from 'vitest';
 *   import { chromium, skipUnless } from '@/test/support/services';
 *
 *   // Skipped (with its reason in the run's summary) when Chromium is absent;
 *   // with MILLRACE_REQUIRE_SERVICES=1 (CI) a failing test takes its place.
 *   describe.skipIf(skipUnless(chromium, 'fleet page screenshots'))('fleet page', () => {
 *     it('...', async () => { launch with executablePath: chromium.location! });
 *   });
 *   it.skipIf(skipUnless([postgresServer, mosquitto], 'broker restart case'))('...', ...);
 *
 *   const browser = await launchChromium({ width: 360, height: 800 }); // our flags, a fresh profile
 *
 * The probes:
 * - `postgresServer`: a real PostgreSQL for tests that cannot run on PGlite
 *   (several connections, row locks, binary COPY). `location` is an admin URL
 *   to make fresh databases with: TEST_DATABASE_URL, else DATABASE_URL, else
 *   postgres://postgres@127.0.0.1:5432/postgres. A URL set in the environment
 *   is taken as given (a wrong one fails the tests, it does not skip them);
 *   the local default is probed with a short timeout and the tests skip when
 *   nothing answers there.
 * - `mosquitto`: a mosquitto binary: MOSQUITTO_BIN, else `mosquitto` on PATH,
 *   else /usr/sbin or /usr/local/sbin (Debian puts it in /usr/sbin).
 * - `chromium`: CHROMIUM_PATH, else /usr/bin/chromium.
 *
 * Each skip is written down and printed together at the end of the run
 * (test/support/global-setup.ts), with what would make the test run.
 */
import { accessSync, appendFileSync, constants, mkdtempSync, statSync } from 'node:fs';
import { delimiter, join, relative } from 'node:path';
import { tmpdir } from 'node:os';
import postgres from 'postgres';
import { chromium as playwright, type BrowserContext } from 'playwright-core';
import { expect, inject, it } from 'vitest';

export interface ServiceProbe {
  /** Short name, as the skip summary shows it. */
  name: string;
  /** Whether the tests that need it can run. */
  available: boolean;
  /** Where it is: the executable's path, or the admin URL of the PostgreSQL server. */
  location?: string;
  /** When absent: what was looked for and what would make the tests run. */
  missing?: string;
}

/** Set by CI: a test that would be skipped for a missing service fails instead. */
export const servicesRequired = process.env.MILLRACE_REQUIRE_SERVICES === '1';

function isExecutableFile(path: string): boolean {
  try {
    if (!statSync(path).isFile()) return false;
    accessSync(path, constants.X_OK);
    return true;
  } catch {
    return false;
  }
}

type Env = Record<string, string | undefined>;

/** Looks for a mosquitto binary as described above. */
export function findMosquitto(env: Env = process.env): ServiceProbe {
  const name = 'Mosquitto';
  const given = env.MOSQUITTO_BIN;
  if (given) {
    return isExecutableFile(given)
      ? { name, available: true, location: given }
      : { name, available: false, missing: `MOSQUITTO_BIN=${given} is not an executable file` };
  }
  const dirs = [...(env.PATH ?? '').split(delimiter).filter(Boolean), '/usr/sbin', '/usr/local/sbin'];
  for (const dir of dirs) {
    const path = join(dir, 'mosquitto');
    if (isExecutableFile(path)) return { name, available: true, location: path };
  }
  return {
    name,
    available: false,
    missing: 'needs a mosquitto binary on PATH or in /usr/sbin (apt-get install mosquitto), or MOSQUITTO_BIN naming one',
  };
}

/** Looks for Chromium as described above. */
export function findChromium(env: Env = process.env): ServiceProbe {
  const name = 'Chromium';
  const given = env.CHROMIUM_PATH;
  const path = given || '/usr/bin/chromium';
  if (isExecutableFile(path)) return { name, available: true, location: path };
  return {
    name,
    available: false,
    missing: given
      ? `CHROMIUM_PATH=${given} is not an executable file`
      : 'needs Chromium at /usr/bin/chromium (apt-get install chromium) or CHROMIUM_PATH naming one',
  };
}

/** The local server tried when no URL is set. */
export const DEFAULT_POSTGRES_ADMIN_URL = 'postgres://postgres@127.0.0.1:5432/postgres';

/** Takes the URL set in the environment, else probes `localUrl` (2 s at most). */
export async function findPostgres(env: Env = process.env, localUrl = DEFAULT_POSTGRES_ADMIN_URL): Promise<ServiceProbe> {
  const name = 'PostgreSQL';
  const given = env.TEST_DATABASE_URL || env.DATABASE_URL;
  if (given) return { name, available: true, location: given };
  const where = new URL(localUrl).host;
  const sql = postgres(localUrl, { max: 1, connect_timeout: 2, idle_timeout: 1, onnotice: () => {} });
  try {
    await sql`select 1`;
    return { name, available: true, location: localUrl };
  } catch (error) {
    const code = (error as { code?: string }).code;
    const why =
      code === 'ECONNREFUSED'
        ? 'connection refused'
        : code === 'CONNECT_TIMEOUT'
          ? 'no answer within 2 s'
          : code === '28P01' || code === '28000'
            ? 'user postgres was refused'
            : (error as Error).message;
    return {
      name,
      available: false,
      missing: `needs a PostgreSQL server: set DATABASE_URL (or TEST_DATABASE_URL), or run one at ${where} that user postgres reaches without a password (tried it: ${why})`,
    };
  } finally {
    await sql.end({ timeout: 1 }).catch(() => {});
  }
}

export const mosquitto: ServiceProbe = findMosquitto();
export const chromium: ServiceProbe = findChromium();
export const postgresServer: ServiceProbe = await findPostgres();

/** The message of a missing service under MILLRACE_REQUIRE_SERVICES=1. */
export function requiredMessage(probe: ServiceProbe, what: string): string {
  return `MILLRACE_REQUIRE_SERVICES=1: ${what} cannot run, ${probe.name} is missing: ${probe.missing}`;
}

/** Where a skip is written down for the run's summary (provided by the global setup). */
declare module 'vitest' {
  export interface ProvidedContext {
    millraceSkipLog: string;
  }
}

function currentFile(): string {
  const path = expect.getState().testPath;
  return path ? relative(process.cwd(), path) : '(unknown test file)';
}

/** One line of the skip log: JSON, read back by test/support/global-setup.ts. */
export interface SkipRecord {
  outcome: 'skipped' | 'failed';
  file: string;
  what: string;
  services: Array<{ name: string; missing: string }>;
}

function record(outcome: SkipRecord['outcome'], file: string, what: string, absent: readonly ServiceProbe[]): void {
  const entry: SkipRecord = { outcome, file, what, services: absent.map((p) => ({ name: p.name, missing: p.missing ?? '' })) };
  let log: string | undefined;
  try {
    log = inject('millraceSkipLog');
  } catch {
    log = undefined;
  }
  if (log) appendFileSync(log, `${JSON.stringify(entry)}\n`);
  process.stdout.write(`${outcome}: ${file} (${what}): ${absent.map((p) => `${p.name} ${p.missing}`).join('; ')}\n`);
}

/**
 * True when a test needing `probes` must be skipped: give it to
 * `describe.skipIf` / `it.skipIf`. `what` names the tests (e.g. "Mosquitto
 * cases"); the skip and its reason are printed in the run's summary. With
 * MILLRACE_REQUIRE_SERVICES=1 it registers, in the suite being collected, a
 * test that fails naming the missing service, and still returns true.
 */
export function skipUnless(probes: ServiceProbe | readonly ServiceProbe[], what: string): boolean {
  const list = Array.isArray(probes) ? probes : [probes as ServiceProbe];
  const absent = list.filter((p) => !p.available);
  if (absent.length === 0) return false;
  const file = currentFile();
  if (servicesRequired) {
    record('failed', file, what, absent);
    for (const probe of absent) {
      const message = requiredMessage(probe, `${file} (${what})`);
      it(`${what}: needs ${probe.name}`, () => {
        throw new Error(message);
      });
    }
  } else {
    record('skipped', file, what, absent);
  }
  return true;
}

/**
 * For a test's body or hook: stops here when a service is missing, by
 * `ctx.skip()` (recorded like skipUnless) or, with
 * MILLRACE_REQUIRE_SERVICES=1, by failing with the service named.
 */
export function requireService(probe: ServiceProbe, what: string, ctx: { skip(note?: string): void }): void {
  if (probe.available) return;
  const file = currentFile();
  if (servicesRequired) {
    record('failed', file, what, [probe]);
    throw new Error(requiredMessage(probe, `${file} (${what})`));
  }
  record('skipped', file, what, [probe]);
  ctx.skip(probe.missing);
}

/** The flags Chromium needs on our machines (headless, no sandbox as root, nothing phoning home). */
export const CHROMIUM_ARGS: readonly string[] = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

/** Chromium through playwright-core with a fresh profile folder; only call it where `chromium` is available. */
export async function launchChromium(viewport = { width: 1440, height: 900 }): Promise<BrowserContext> {
  if (!chromium.available) throw new Error(`Chromium is missing: ${chromium.missing}`);
  return playwright.launchPersistentContext(mkdtempSync(join(tmpdir(), 'millrace-chromium-')), {
    executablePath: chromium.location!,
    headless: true,
    viewport,
    args: [...CHROMIUM_ARGS],
  });
}
