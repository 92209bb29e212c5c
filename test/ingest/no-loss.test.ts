/**
 * Nothing published at QoS 1 is lost, and nothing is stored twice, while the
 * ingester is killed and restarted, its database connection is cut and
 * restored, or the broker restarts. The broker is a Mosquitto of the test's
 * own started from the shipped configuration (docker-compose.yml), the
 * database a fresh one on the real PostgreSQL; both run on this machine and
 * in CI, so these cases run in both test modes. The embedded pair (aedes,
 * PGlite) is checked for the case that applies to it: an ingester restarted
 * in the process (a database in the process cannot be cut off, and the
 * embedded broker keeps sessions in memory only).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDatabase, type DatabaseHandle } from '@/db/client';
import { startEmbeddedBroker } from '@/lib/broker/embedded';
import { startIngester } from '@/lib/ingest/ingester';
import { freePort } from '@/lib/net/ports';
import { createPostgresDatabase } from '@/test/support/backend';
import {
  adminDatabaseUrl,
  openPublisher,
  queryRows,
  registerFleet,
  samplesPayload,
  spawnIngester,
  testFleet,
  testLogger,
  testTag,
  waitFor,
  type Outgoing,
} from '@/test/support/ingest';
import { startMosquitto, type TestMosquitto } from '@/test/support/mosquitto';
import { mosquitto as mosquittoBinary, postgresServer, skipUnless } from '@/test/support/services';
import { startTcpProxy } from '@/test/support/tcp-proxy';

const SAMPLES_PER_MESSAGE = 10;
const MESSAGES_PER_UNIT = 300;
const UNITS = 8;
/** Samples each case publishes. */
const N = UNITS * MESSAGES_PER_UNIT * SAMPLES_PER_MESSAGE;

/** N samples over the fleet's units, as messages in three parts (before, during, after the disruption). */
function messagesFor(fleet: ReturnType<typeof testFleet>): [Outgoing[], Outgoing[], Outgoing[]] {
  const start = Date.now() - 3 * 3_600_000;
  const all: Outgoing[] = [];
  for (let m = 0; m < MESSAGES_PER_UNIT; m++) {
    fleet.units.forEach((unit, u) => {
      all.push({
        topic: `millrace/${unit.siteId}/${unit.id}/telemetry`,
        payload: samplesPayload(start + m * SAMPLES_PER_MESSAGE * 1000 + u, SAMPLES_PER_MESSAGE, 1000, m),
      });
    });
  }
  const third = Math.floor(all.length / 3);
  return [all.slice(0, third), all.slice(third, 2 * third), all.slice(2 * third)];
}

async function countFor(handle: DatabaseHandle, fleet: ReturnType<typeof testFleet>) {
  const ids = fleet.units.map((u) => u.id);
  const [rows] = await queryRows<{ n: number; d: number }>(
    handle,
    `select count(*)::int as n, count(distinct (s.unit_key, s.ts))::int as d
     from telemetry_samples s join units u on u.key = s.unit_key where u.id = any($1::text[])`,
    [ids],
  );
  const [rollups] = await queryRows<{ n: number }>(
    handle,
    'select coalesce(sum(r.samples), 0)::int as n from telemetry_rollups_10m r join units u on u.key = r.unit_key where u.id = any($1::text[])',
    [ids],
  );
  return { rows: Number(rows!.n), distinct: Number(rows!.d), rollupSamples: Number(rollups!.n) };
}

async function expectExactlyN(handle: DatabaseHandle, fleet: ReturnType<typeof testFleet>) {
  let last = { rows: 0, distinct: 0, rollupSamples: 0 };
  await waitFor(
    `${N} rows`,
    async () => {
      last = await countFor(handle, fleet);
      return last.rows >= N;
    },
    { timeoutMs: 90_000 },
  ).catch((error: Error) => {
    throw new Error(`${error.message} (have ${last.rows})`);
  });
  // One more look after the ingester has gone quiet: nothing more arrives.
  const counts = await countFor(handle, fleet);
  expect(counts).toEqual({ rows: N, distinct: N, rollupSamples: N });
}

const fleetOf = (tag: string) => testFleet(tag, { windUnits: UNITS - 2, hydroUnits: 2 });

describe.skipIf(skipUnless([mosquittoBinary, postgresServer], 'Mosquitto cases'))('no loss with the shipped Mosquitto configuration and PostgreSQL', { timeout: 180_000 }, () => {
  let mosquitto: TestMosquitto;
  let db: { url: string; drop(): Promise<void> };
  let handle: DatabaseHandle;

  beforeAll(async () => {
    mosquitto = await startMosquitto({ auth: 'open-for-tests' });
    db = await createPostgresDatabase(adminDatabaseUrl(), 'millrace_ingest_noloss');
    handle = await openDatabase({ url: db.url, maxConnections: 2 });
    process.stdout.write(`no-loss: PostgreSQL ${new URL(db.url).host}${new URL(db.url).pathname}, Mosquitto ${mosquitto.url} (shipped configuration)\n`);
  });

  afterAll(async () => {
    await handle?.close();
    await db?.drop();
    await mosquitto?.dispose();
  });

  it('(a) the ingester process is killed (SIGKILL) and started again', async () => {
    const tag = testTag();
    const fleet = fleetOf(tag);
    await registerFleet(handle, fleet);
    const [first, second, third] = messagesFor(fleet);
    const env = {
      DATABASE_URL: db.url,
      MQTT_URL: mosquitto.url,
      INGEST_CLIENT_ID: `noloss-a-${tag}`,
      INGEST_CONNECTIONS: '2',
      INGEST_BATCH_SAMPLES: '2000',
      INGEST_BATCH_MS: '50',
      LOG_LEVEL: 'info',
    };
    const subscribed = (out: string) => (out.match(/"msg":"subscribed"/g) ?? []).length >= 2;
    let ingester = spawnIngester(env);
    await waitFor('the ingester to subscribe', () => subscribed(ingester.output()));
    const publisher = await openPublisher(mosquitto.url);
    await publisher.publishAll(first);
    await waitFor('some rows', async () => (await countFor(handle, fleet)).rows > 0);
    expect(await ingester.stop('SIGKILL')).toBe(-1);
    await publisher.publishAll(second); // queued by the broker for the absent session
    ingester = spawnIngester(env);
    await waitFor('the ingester to subscribe again', () => subscribed(ingester.output()));
    await publisher.publishAll(third);
    await publisher.close();
    await expectExactlyN(handle, fleet);
    // SIGTERM drains and exits 0.
    expect(await ingester.stop('SIGTERM')).toBe(0);
    expect(ingester.output()).toMatch(/"msg":"ingester stopped"/);
  });

  it('(b) the database connection is cut and restored', async () => {
    const tag = testTag();
    const fleet = fleetOf(tag);
    await registerFleet(handle, fleet);
    const [first, second, third] = messagesFor(fleet);
    const target = new URL(db.url);
    const proxy = await startTcpProxy({ host: target.hostname, port: Number(target.port || 5432) });
    const viaProxy = new URL(db.url);
    viaProxy.hostname = '127.0.0.1';
    viaProxy.port = String(proxy.port);
    const ingestHandle = await openDatabase({ url: viaProxy.toString(), migrate: false, maxConnections: 2 });
    const lines: string[] = [];
    const bufferSamples = 3000;
    const ingester = await startIngester({
      handle: ingestHandle,
      brokerUrl: mosquitto.url,
      mqtt5: true,
      clientId: `noloss-b-${tag}`,
      shareGroup: `noloss-b-${tag}`,
      connections: 2,
      batchSamples: 1000,
      batchMs: 50,
      bufferSamples,
      log: testLogger('ingest', lines),
    });
    let maxBuffered = 0;
    const watcher = setInterval(() => (maxBuffered = Math.max(maxBuffered, ingester.state().buffer.samples)), 10);
    try {
      await ingester.ready();
      const publisher = await openPublisher(mosquitto.url);
      await publisher.publishAll(first);
      await waitFor('some rows', async () => (await countFor(handle, fleet)).rows > 0);
      proxy.cut();
      const during = publisher.publishAll(second);
      await waitFor('the ingester to see the outage', () => !ingester.state().database.reachable);
      expect(ingester.state().status).toBe('degraded');
      await during;
      await waitFor('the buffer to fill', () => ingester.state().buffer.samples >= bufferSamples - SAMPLES_PER_MESSAGE);
      proxy.restore();
      await publisher.publishAll(third);
      await publisher.close();
      await expectExactlyN(handle, fleet);
      expect(ingester.state().database.reachable).toBe(true);
      // Memory stays bounded: the buffer never holds more than its limit plus one message.
      expect(maxBuffered).toBeLessThanOrEqual(bufferSamples + SAMPLES_PER_MESSAGE);
      const logged = lines.map((l) => JSON.parse(l) as { msg: string });
      expect(logged.filter((l) => l.msg.startsWith('database unreachable'))).toHaveLength(1);
      expect(logged.filter((l) => l.msg === 'database reachable again')).toHaveLength(1);
    } finally {
      clearInterval(watcher);
      await ingester.stop();
      await ingestHandle.close();
      await proxy.close();
    }
  });

  it('(c) the broker restarts', async () => {
    const tag = testTag();
    const fleet = fleetOf(tag);
    await registerFleet(handle, fleet);
    const [first, second, third] = messagesFor(fleet);
    const ingester = await startIngester({
      handle,
      brokerUrl: mosquitto.url,
      mqtt5: true,
      clientId: `noloss-c-${tag}`,
      shareGroup: `noloss-c-${tag}`,
      connections: 2,
      // Long batches, so that the first part is still uncommitted when the broker stops.
      batchSamples: 20_000,
      batchMs: 1000,
      bufferSamples: 20_000,
      log: testLogger(),
    });
    const subscribed = () => ingester.state().broker.connections.every((c) => c.connected && c.subscribed);
    try {
      await ingester.ready();
      // A device that keeps what it could not send and sends it once it is back
      // online; it reaches the broker through a proxy the test opens and closes.
      const deviceLink = await startTcpProxy({ host: '127.0.0.1', port: mosquitto.port });
      const publisher = await openPublisher(`mqtt://127.0.0.1:${deviceLink.port}`);
      await publisher.publishAll(first);
      // Stopped while the ingester still holds uncommitted messages of the first part:
      // the broker keeps them (persisted session) and delivers them again after the restart.
      deviceLink.cut();
      await mosquitto.stop();
      await waitFor('the ingester to see the broker go', () => ingester.state().broker.connected === 0);
      const during = publisher.publishAll(second); // held by the device while it is offline
      await mosquitto.start();
      // Mosquitto 2.0.11 forgets shared subscriptions over a restart (see lib/ingest/DESIGN.md):
      // the device comes back after the ingester has subscribed again.
      await waitFor('the ingester to subscribe again', subscribed, { timeoutMs: 30_000 });
      deviceLink.restore();
      await during;
      await publisher.publishAll(third);
      await publisher.close();
      await deviceLink.close();
      await expectExactlyN(handle, fleet);
      const c = ingester.state().counters;
      process.stdout.write(`no-loss (c): ${c.releasedForRedelivery} messages let go at the restart and delivered again, ${c.duplicates} duplicate samples ignored\n`);
      expect(ingester.state().counters.reconnects).toBeGreaterThan(0);
    } finally {
      await ingester.stop();
    }
  });
});

describe('no loss on the embedded broker and database (aedes, PGlite)', { timeout: 180_000 }, () => {
  // This case failed about one run in 30 for two causes, both fixed (2026-12-02): the batcher took
  // itself to be committing for ever after its batch timer fired with nothing left to commit
  // (test/ingest/batcher.test.ts), and aedes's memory store let a PUBACK remove another message sent
  // under the same id on the connection before, which was then lost
  // (lib/broker/embedded-persistence.test.ts). The error carries the ingester's counters, buffer and
  // connection.
  it('(a) the ingester is stopped without draining and started again in the process', async () => {
    const broker = await startEmbeddedBroker({ port: await freePort(), auth: 'open-for-tests' });
    const handle = await openDatabase({ dataDir: 'memory://' });
    process.stdout.write(`no-loss: ${handle.location}, embedded aedes at ${broker.url}\n`);
    try {
      const tag = testTag();
      const fleet = fleetOf(tag);
      await registerFleet(handle, fleet);
      const [first, second, third] = messagesFor(fleet);
      const options = {
        handle,
        brokerUrl: broker.url,
        mqtt5: false,
        clientId: `noloss-e-${tag}`,
        connections: 1,
        batchSamples: 1000,
        batchMs: 50,
        bufferSamples: 5000,
        log: testLogger(),
      };
      let ingester = await startIngester(options);
      await ingester.ready();
      const publisher = await openPublisher(broker.url, { mqtt5: false });
      await publisher.publishAll(first);
      await waitFor('some rows', async () => (await countFor(handle, fleet)).rows > 0);
      await ingester.abort();
      await publisher.publishAll(second);
      ingester = await startIngester(options);
      await ingester.ready();
      await publisher.publishAll(third);
      await publisher.close();
      try {
        await expectExactlyN(handle, fleet);
      } catch (error) {
        // What the ingester saw, for the cause: messages in, rows committed, buffer, connection.
        const { counters, buffer, broker: b, database } = ingester.state();
        throw new Error(`${(error as Error).message}; ingester: ${JSON.stringify({ counters, buffer, broker: b, database })}`);
      }
      await ingester.stop();
    } finally {
      await broker.close();
      await handle.close();
    }
  });
});

