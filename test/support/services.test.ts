/**
 * The rules of test/support/services.ts: how each service is found, that a
 * missing one skips its tests with the reason printed, and that
 * MILLRACE_REQUIRE_SERVICES=1 turns the skip into a failure naming it.
 */
import { execFile } from 'node:child_process';
import { chmodSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { findChromium, findMosquitto, findPostgres, type SkipRecord } from './services';
import { skipSummary } from './global-setup';

const dir = mkdtempSync(join(tmpdir(), 'millrace-services-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function executable(name: string): string {
  const path = join(dir, name);
  writeFileSync(path, '#!/bin/sh\nexit 0\n');
  chmodSync(path, 0o755);
  return path;
}

describe('finding Mosquitto', () => {
  it('takes an executable mosquitto from PATH', () => {
    const bin = mkdtempSync(join(dir, 'bin-'));
    const path = join(bin, 'mosquitto');
    writeFileSync(path, '#!/bin/sh\n');
    chmodSync(path, 0o755);
    expect(findMosquitto({ PATH: `/nonexistent:${bin}` })).toMatchObject({ available: true, location: path });
  });

  it('does not take a file without the execute bit, nor a device bound over the binary', () => {
    const bin = mkdtempSync(join(dir, 'bin-'));
    writeFileSync(join(bin, 'mosquitto'), '');
    chmodSync(join(bin, 'mosquitto'), 0o644);
    const found = findMosquitto({ PATH: bin });
    // /usr/sbin is searched too: only meaningful where it holds no mosquitto.
    if (found.location !== '/usr/sbin/mosquitto') expect(found.available).toBe(false);
    expect(findMosquitto({ MOSQUITTO_BIN: '/dev/null' })).toMatchObject({ available: false, missing: 'MOSQUITTO_BIN=/dev/null is not an executable file' });
  });

  it('says what would make the tests run', () => {
    expect(findMosquitto({ MOSQUITTO_BIN: join(dir, 'none') }).missing).toMatch(/is not an executable file/);
    expect(findMosquitto({ MOSQUITTO_BIN: executable('mq') })).toMatchObject({ available: true });
  });
});

describe('finding Chromium', () => {
  it('takes CHROMIUM_PATH, and says when it names nothing runnable', () => {
    const path = executable('chromium');
    expect(findChromium({ CHROMIUM_PATH: path })).toMatchObject({ available: true, location: path });
    expect(findChromium({ CHROMIUM_PATH: join(dir, 'no-chromium') })).toMatchObject({
      available: false,
      missing: `CHROMIUM_PATH=${join(dir, 'no-chromium')} is not an executable file`,
    });
  });
});

describe('finding PostgreSQL', () => {
  it('takes DATABASE_URL (or TEST_DATABASE_URL) as given, without probing', async () => {
    await expect(findPostgres({ DATABASE_URL: 'postgres://u@db.invalid:5432/x' })).resolves.toMatchObject({ available: true, location: 'postgres://u@db.invalid:5432/x' });
    await expect(findPostgres({ TEST_DATABASE_URL: 'postgres://a@h/y', DATABASE_URL: 'postgres://b@h/z' })).resolves.toMatchObject({ location: 'postgres://a@h/y' });
  });

  it('probes the local server when no URL is set, and says why it is missing', async () => {
    // A port that was free a moment ago: nothing listens there.
    const port = await new Promise<number>((resolve) => {
      const server = createServer().listen(0, '127.0.0.1', () => {
        const p = (server.address() as { port: number }).port;
        server.close(() => resolve(p));
      });
    });
    const probe = await findPostgres({}, `postgres://postgres@127.0.0.1:${port}/postgres`);
    expect(probe.available).toBe(false);
    expect(probe.missing).toContain(`set DATABASE_URL (or TEST_DATABASE_URL), or run one at 127.0.0.1:${port}`);
    expect(probe.missing).toContain('connection refused');
  });
});

describe('the summary at the end of the run', () => {
  it('lists each skipped group with the services it needs, and once what would run them', () => {
    const records: SkipRecord[] = [
      { outcome: 'skipped', file: 'test/a.test.ts', what: 'broker cases', services: [{ name: 'Mosquitto', missing: 'needs mosquitto' }, { name: 'PostgreSQL', missing: 'needs a server' }] },
      { outcome: 'skipped', file: 'test/b.test.ts', what: 'screens', services: [{ name: 'Chromium', missing: 'needs chromium' }] },
    ];
    const text = skipSummary(records);
    expect(text).toContain('2 group(s) skipped for a missing service (MILLRACE_REQUIRE_SERVICES=1 makes them fail)');
    expect(text).toContain('  skipped: test/a.test.ts (broker cases): needs Mosquitto and PostgreSQL');
    expect(text).toContain('  skipped: test/b.test.ts (screens): needs Chromium');
    expect(text).toContain('  Mosquitto: needs mosquitto');
    expect(skipSummary([])).toContain('nothing skipped for a missing service');
  });
});

describe('a test needing a missing service', { timeout: 60_000 }, () => {
  const root = fileURLToPath(new URL('../../', import.meta.url));
  const runFixture = (env: Record<string, string>) =>
    new Promise<{ code: number; output: string }>((resolve) => {
      execFile(
        process.execPath,
        [join(root, 'node_modules/vitest/vitest.mjs'), 'run', '--config', 'test/support/fixtures/vitest.config.ts', '--reporter', 'verbose'],
        { cwd: root, env: { ...process.env, NO_COLOR: '1', FORCE_COLOR: '0', ...env } },
        (error, stdout, stderr) => resolve({ code: error ? Number(error.code ?? 1) : 0, output: stdout + stderr }),
      );
    });

  it('is skipped with its reason printed, and the run passes', async () => {
    const { code, output } = await runFixture({ MILLRACE_REQUIRE_SERVICES: '' });
    expect(output).toContain('skipped: test/support/fixtures/needs-absent.fixture.ts (absent cases): Absentd needs absentd on PATH');
    expect(output).toContain('skipped: test/support/fixtures/needs-absent.fixture.ts (absent in a body): Absentd needs absentd on PATH');
    expect(output).toMatch(/1 passed \| 2 skipped/);
    expect(code).toBe(0);
  });

  it('fails, naming the service, with MILLRACE_REQUIRE_SERVICES=1', async () => {
    const { code, output } = await runFixture({ MILLRACE_REQUIRE_SERVICES: '1' });
    expect(output).toContain('MILLRACE_REQUIRE_SERVICES=1: test/support/fixtures/needs-absent.fixture.ts (absent cases) cannot run, Absentd is missing: needs absentd on PATH');
    expect(output).toContain('absent cases: needs Absentd');
    expect(output).toContain('MILLRACE_REQUIRE_SERVICES=1: test/support/fixtures/needs-absent.fixture.ts (absent in a body) cannot run, Absentd is missing');
    expect(output).toMatch(/2 failed \| 1 passed/);
    expect(code).toBe(1);
  });
});
