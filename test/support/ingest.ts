/**
 * Shared pieces of the ingest tests: an invented fleet, the broker of this
 * run, a QoS 1 publisher that behaves like a device (it keeps unacknowledged
 * messages and sends them again after a reconnect), and polling helpers
 * (they wait for a state, never for a time).
 */
import { spawn } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { randomBytes } from 'node:crypto';
import mqtt, { type MqttClient } from 'mqtt';
import { startEmbeddedBroker } from '@/lib/broker/embedded';
import { fleetSchema, type Fleet } from '@/lib/contract/nameplate';
import { createLogger, type Logger } from '@/lib/log/logger';
import { upsertFleet } from '@/lib/setup/queries';
import { freePort } from '@/lib/net/ports';
import type { DatabaseHandle } from '@/db/client';
import type { TelemetrySample } from '@/lib/contract/telemetry';
import { NO_ENTRIES, NO_FIELDS } from '@/lib/ingest/decode';
import { sampleBlockOf } from '@/lib/ingest/sample-block';
import type { DecodedMessage } from '@/lib/ingest/writer';
import { realBrokerUrl } from './backend';
import { postgresServer } from './services';

/** A telemetry message of `unit` holding `samples`, decoded as the ingester decodes one on arrival. */
export function decodedMessage(unit: { siteId: string; id: string }, samples: readonly TelemetrySample[]): DecodedMessage {
  return {
    topic: `millrace/${unit.siteId}/${unit.id}/telemetry`,
    siteId: unit.siteId,
    unitId: unit.id,
    kind: 'telemetry',
    receivedAtMs: Date.now(),
    retained: false,
    samples: sampleBlockOf(samples),
    quarantined: NO_ENTRIES,
    unknownFields: NO_FIELDS,
    preview: '',
    payloadBytes: 0,
  };
}

/** A short random tag that keeps one test file's sites apart from another's on a shared broker. */
export function testTag(): string {
  return randomBytes(3).toString('hex');
}

/** Logs of a test: silent unless INGEST_TEST_LOG names a level. */
export function testLogger(area = 'ingest', lines?: string[]): Logger {
  const level = (process.env.INGEST_TEST_LOG as 'debug' | 'info' | 'warn' | 'error' | undefined) ?? (lines ? 'debug' : 'silent');
  return createLogger(area, level, (line) => {
    lines?.push(line);
    if (process.env.INGEST_TEST_LOG) process.stderr.write(line);
  });
}

/**
 * An invented fleet: one wind site with `windUnits` units and one hydro site
 * with `hydroUnits`, ids suffixed with `tag`.
 */
export function testFleet(tag: string, { windUnits = 2, hydroUnits = 1 } = {}): Fleet {
  const windSite = `karrow-fell-${tag}`;
  const hydroSite = `brindle-beck-${tag}`;
  const units: unknown[] = [];
  for (let i = 1; i <= windUnits; i++) {
    units.push({
      id: `kf-${tag}-w${i}`,
      siteId: windSite,
      kind: 'wind',
      ratedKw: 6,
      ratedRpm: 280,
      maxRpm: 420,
      poles: 18,
      keVPerKrpm: 1100,
      magnet: 'ndfeb',
      phaseOhm: 0.55,
      phaseMh: 4.2,
      powerCurve: [
        { ms: 3, kw: 0.1 },
        { ms: 11, kw: 6 },
      ],
      cutInMs: 3,
      cutOutMs: 24,
      rotorDiameterM: 5.5,
    });
  }
  for (let i = 1; i <= hydroUnits; i++) {
    units.push({
      id: `bb-${tag}-h${i}`,
      siteId: hydroSite,
      kind: 'hydro',
      ratedKw: 15,
      ratedRpm: 750,
      maxRpm: 1400,
      poles: 8,
      keVPerKrpm: 520,
      magnet: 'ferrite',
      phaseOhm: 0.2,
      designHeadM: 24,
      designFlowM3s: 0.09,
      efficiency: 0.7,
    });
  }
  return fleetSchema.parse({
    sites: [
      { id: windSite, name: `Karrow Fell ${tag}`, timezone: 'Europe/Oslo' },
      { id: hydroSite, name: `Brindle Beck ${tag}`, timezone: 'Europe/Oslo' },
    ],
    units,
  });
}

/** Registers the fleet in the database. */
export async function registerFleet(handle: DatabaseHandle, fleet: Fleet): Promise<void> {
  await upsertFleet({ db: handle.db, fleet });
}

export interface TestBroker {
  url: string;
  mqtt5: boolean;
  /** Share group of this test (a shared broker serves other tests too). */
  shareGroup: string;
  description: string;
  close(): Promise<void>;
}

/** The broker of this run: MQTT_URL when set (MQTT 5), else an embedded aedes on a free port (MQTT 3.1.1). */
export async function startTestBroker(): Promise<TestBroker> {
  const shareGroup = `millrace-test-${testTag()}`;
  if (realBrokerUrl) {
    return { url: realBrokerUrl, mqtt5: true, shareGroup, description: `MQTT 5 broker at ${realBrokerUrl}`, close: async () => {} };
  }
  const broker = await startEmbeddedBroker({ port: await freePort(), auth: 'open-for-tests' });
  return { url: broker.url, mqtt5: false, shareGroup, description: `embedded aedes at ${broker.url}`, close: () => broker.close() };
}

/** A message to publish. */
export interface Outgoing {
  topic: string;
  payload: string | Buffer;
  retain?: boolean;
}

/**
 * A device-like publisher: QoS 1, a window of messages in flight, and a
 * persistent session so that messages not yet acknowledged by the broker are
 * sent again after a reconnect (mqtt.js keeps them in its outgoing store).
 */
export async function openPublisher(url: string, { mqtt5 = true, clientId = `test-pub-${testTag()}`, reconnectPeriod = 200 } = {}) {
  const client: MqttClient = mqtt.connect(url, {
    clientId,
    protocolVersion: mqtt5 ? 5 : 4,
    clean: false,
    reconnectPeriod,
    ...(mqtt5 ? { properties: { sessionExpiryInterval: 3600 } } : {}),
  });
  client.on('error', () => {});
  await new Promise<void>((resolve, reject) => {
    client.once('connect', () => resolve());
    client.once('error', reject);
  });
  return {
    client,
    /** Publishes every message at QoS 1; resolves when the broker has acknowledged them all. */
    async publishAll(messages: readonly Outgoing[], { window = 500 } = {}): Promise<void> {
      let next = 0;
      let done = 0;
      let failed: Error | undefined;
      await new Promise<void>((resolve, reject) => {
        if (messages.length === 0) resolve();
        const pump = () => {
          while (next < messages.length && next - done < window) {
            const m = messages[next++]!;
            client.publish(m.topic, m.payload, { qos: 1, retain: m.retain ?? false }, (error) => {
              if (error && !failed) {
                failed = error;
                reject(error);
              }
              done++;
              if (done === messages.length) resolve();
              else pump();
            });
          }
        };
        pump();
      });
    },
    close: () => new Promise<void>((resolve) => client.end(false, () => resolve())),
  };
}

/** Polls `check` until it returns true; fails with `what` after `timeoutMs` (a guard against hanging, not a speed check). */
export async function waitFor(what: string, check: () => Promise<boolean> | boolean, { timeoutMs = 60_000, everyMs = 50 } = {}): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    if (await check()) return;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((resolve) => setTimeout(resolve, everyMs));
  }
}

/** Runs a query on the handle's driver and returns its rows. */
export async function queryRows<T = Record<string, unknown>>(handle: DatabaseHandle, text: string, params: unknown[] = []): Promise<T[]> {
  if (handle.sql) return (await handle.sql.unsafe(text, params as never[])) as unknown as T[];
  return (await handle.pglite!.query<T>(text, params)).rows;
}

/** Rows in telemetry_samples, and distinct (unit, ts) pairs among them. */
export async function countSamples(handle: DatabaseHandle): Promise<number> {
  const [row] = await queryRows<{ n: number }>(handle, 'select count(*)::int as n from telemetry_samples');
  return Number(row?.n ?? 0);
}

/** Telemetry payload of `count` samples of a unit from `startMs`, one every `stepMs`. */
export function samplesPayload(startMs: number, count: number, stepMs: number, seed = 0): string {
  const samples = [];
  for (let i = 0; i < count; i++) {
    const k = seed + i;
    samples.push({
      ts: startMs + i * stepMs,
      rpm: 200 + (k % 50),
      hz: 30 + (k % 7) / 2,
      vab: 220 + (k % 11),
      vbc: 221 + (k % 13),
      vca: 219 + (k % 9),
      ia: 8 + (k % 5),
      ib: 8.5 + (k % 3),
      ic: 7.5 + (k % 4),
      kw: 2 + (k % 17) / 4,
      statorC: 40 + (k % 6),
      windMs: 6 + (k % 8) / 2,
    });
  }
  return JSON.stringify(samples);
}

/** The standalone ingester (`npm run ingest`) as a child process. */
/**
 * What `npm run ingest` runs, as node arguments: its heap flags and
 * bin/ingest.mjs, read from the package.json script so that tests and the
 * benchmark run the ingester exactly as users do.
 */
export function ingestNodeArgs(): string[] {
  const script = (JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { scripts: Record<string, string> }).scripts.ingest!;
  const [command, ...args] = script.trim().split(/\s+/);
  if (command !== 'node') throw new Error(`the ingest script must start with "node", got: ${script}`);
  return args;
}

/** The node arguments that start the ingester: the script's flags, then `nodeArgs` (so they win), then its file. */
export function ingestCommand(nodeArgs: readonly string[] = []): string[] {
  const script = ingestNodeArgs();
  return [...script.slice(0, -1), ...nodeArgs, ...script.slice(-1)];
}

/**
 * Starts `npm run ingest` as its own process (node, without npm in between);
 * `nodeArgs` come after the script's flags (so they win) and before its file.
 */
export function spawnIngester(env: Record<string, string>, nodeArgs: readonly string[] = []) {
  const root = new URL('../../', import.meta.url);
  const child = spawn(process.execPath, ingestCommand(nodeArgs), {
    cwd: root,
    env: { ...process.env, LOG_LEVEL: 'warn', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let output = '';
  child.stdout!.on('data', (chunk: Buffer) => (output += chunk.toString()));
  child.stderr!.on('data', (chunk: Buffer) => (output += chunk.toString()));
  const exited = new Promise<number | null>((resolve) => {
    child.once('exit', (code, signal) => resolve(code ?? (signal ? -1 : null)));
    // A spawn failure emits 'error' and no 'exit': it ends the ingester here
    // (its reason in the output) rather than escaping as an unhandled error.
    child.once('error', (error) => {
      output += `cannot start the ingester (${process.execPath}): ${error.message}\n`;
      resolve(null);
    });
  });
  // A test that fails before stopping it must not leave the ingester running.
  const killOnExit = () => child.kill('SIGKILL');
  process.once('exit', killOnExit);
  void exited.then(() => process.off('exit', killOnExit));
  return {
    pid: child.pid,
    output: () => output,
    exited,
    /** Sends `signal` and waits for the exit; resolves with the exit code (-1 when killed by the signal). */
    async stop(signal: NodeJS.Signals): Promise<number | null> {
      if (child.exitCode === null && child.signalCode === null) child.kill(signal);
      return exited;
    },
  };
}

/**
 * The admin URL for making databases on the real PostgreSQL (TEST_DATABASE_URL,
 * else DATABASE_URL, else the local server): see `postgresServer` in
 * test/support/services.ts, and guard the tests with `skipUnless(postgresServer, ...)`.
 */
export function adminDatabaseUrl(): string {
  if (!postgresServer.location) throw new Error(`no PostgreSQL server: ${postgresServer.missing}`);
  return postgresServer.location;
}
