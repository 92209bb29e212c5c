/**
 * The live feed: after the ingester commits a batch, one event per unit with
 * new samples reaches a subscriber of the web side's hub, and only after the
 * samples are in the database. On the embedded database through the
 * in-process hub; on PostgreSQL through NOTIFY on the writer's connection and
 * LISTEN on another (as `npm run ingest` and `npm run web` do), and with a
 * diagnosis event from the live diagnosis.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDatabase, type DatabaseHandle } from '@/db/client';
import { runDiagnosisPass } from '@/lib/diagnosis/worker';
import { startIngester, type Ingester } from '@/lib/ingest/ingester';
import { createLiveHub, type LiveHub, type StampedEvent } from '@/lib/live/hub';
import { startLiveListener, type LiveListener } from '@/lib/live/listener';
import { createLivePublisher } from '@/lib/live/publisher';
import { createPostgresDatabase } from '@/test/support/backend';
import { openPublisher, queryRows, registerFleet, startTestBroker, testFleet, testLogger, testTag, waitFor, type TestBroker } from '@/test/support/ingest';
import { postgresServer, skipUnless } from '@/test/support/services';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 2, hydroUnits: 1 });
const wind = fleet.units[0]!;
const hydro = fleet.units[2]!;

function startTestIngester(handle: DatabaseHandle, broker: TestBroker, hub: LiveHub | undefined, name: string): Promise<Ingester> {
  return startIngester({
    handle,
    brokerUrl: broker.url,
    mqtt5: broker.mqtt5,
    shareGroup: broker.shareGroup,
    clientId: `live-${name}-${tag}`,
    connections: 1,
    batchSamples: 1000,
    batchMs: 50,
    bufferSamples: 10_000,
    maintenance: false,
    sessionExpirySeconds: 60,
    log: testLogger(),
    live: createLivePublisher({ handle, hub, log: testLogger('live') }),
  });
}

/** Three samples of each of two units in one message each; returns the newest time. */
async function publishSamples(broker: TestBroker): Promise<number> {
  const start = Date.now() - 30_000;
  const samples = (k: number) => [0, 1, 2].map((i) => ({ ts: start + i * 1000 + k, rpm: 250, vab: 231, vbc: 230, vca: 232, kw: 3 }));
  const publisher = await openPublisher(broker.url, { mqtt5: broker.mqtt5 });
  await publisher.publishAll([
    { topic: `millrace/${wind.siteId}/${wind.id}/telemetry`, payload: JSON.stringify(samples(0)) },
    { topic: `millrace/${hydro.siteId}/${hydro.id}/telemetry`, payload: JSON.stringify(samples(5)) },
  ]);
  await publisher.close();
  return start + 2000;
}

describe('live feed on the embedded database (one process, in-process hub)', () => {
  let handle: DatabaseHandle;
  let broker: TestBroker;
  let ingester: Ingester;
  const hub = createLiveHub();
  const heard: Array<StampedEvent & { storedThen: number }> = [];

  beforeAll(async () => {
    handle = await openDatabase({ dataDir: 'memory://' });
    await registerFleet(handle, fleet);
    broker = await startTestBroker();
    ingester = await startTestIngester(handle, broker, hub, 'pglite');
    await ingester.ready();
  });

  afterAll(async () => {
    await ingester?.stop();
    await broker?.close();
    await handle?.close();
  });

  it('tells a subscriber which units have new samples, once each, after the commit', async () => {
    const pending: Promise<void>[] = [];
    hub.subscribe((stamped) => {
      // What the subscriber can read when told: the samples must be there already.
      pending.push(
        queryRows<{ n: number }>(handle, 'select count(*)::int as n from telemetry_samples').then(([row]) => {
          heard.push({ ...stamped, storedThen: row!.n });
        }),
      );
    });
    const newest = await publishSamples(broker);
    await waitFor('both units announced', () => heard.length >= 2, { timeoutMs: 20_000 });
    await Promise.all(pending);
    const samples = heard.filter((h) => h.event.type === 'samples');
    expect(samples.map((h) => h.event.unitId).sort()).toEqual([hydro.id, wind.id].sort());
    const windEvent = samples.find((h) => h.event.unitId === wind.id)!.event;
    expect(windEvent).toEqual({ type: 'samples', siteId: wind.siteId, unitId: wind.id, lastTs: new Date(newest).toISOString() });
    for (const h of samples) expect(h.storedThen).toBeGreaterThanOrEqual(3);
    // Ids rise, and a stream that saw the first can resume with the rest.
    expect(samples[1]!.seq).toBeGreaterThan(samples[0]!.seq);
    const resumed = hub.since(samples[0]!.id);
    expect(resumed.kind === 'replay' && resumed.events.map((e) => e.id)).toEqual(samples.slice(1).map((h) => h.id));
  });
});

describe.skipIf(skipUnless(postgresServer, 'live feed over LISTEN/NOTIFY'))('live feed on PostgreSQL (NOTIFY from the writer, LISTEN on another connection)', () => {
  let writer: DatabaseHandle;
  let web: DatabaseHandle;
  let drop: () => Promise<void>;
  let broker: TestBroker;
  let ingester: Ingester;
  let listener: LiveListener;
  const webHub = createLiveHub();
  const heard: StampedEvent[] = [];

  beforeAll(async () => {
    const created = await createPostgresDatabase(postgresServer.location!, 'millrace_live');
    drop = created.drop;
    // Two handles, two pools: as the ingester process and the web process would have.
    writer = await openDatabase({ url: created.url, maxConnections: 2 });
    web = await openDatabase({ url: created.url, maxConnections: 2, migrate: false });
    await registerFleet(writer, fleet);
    listener = await startLiveListener({ handle: web, hub: webHub, log: testLogger('live') });
    webHub.subscribe((e) => heard.push(e));
    broker = await startTestBroker();
    // The writer's publisher has a hub of its own that nobody listens to: only NOTIFY can carry the events.
    ingester = await startTestIngester(writer, broker, createLiveHub(), 'pg');
    await ingester.ready();
  });

  afterAll(async () => {
    await ingester?.stop();
    await listener?.stop();
    await broker?.close();
    await writer?.close();
    await web?.close();
    await drop?.();
  });

  it('carries sample events from the ingester to the web side', async () => {
    const newest = await publishSamples(broker);
    await waitFor('both units heard over LISTEN', () => heard.filter((h) => h.event.type === 'samples').length >= 2, { timeoutMs: 20_000 });
    const windEvent = heard.find((h) => h.event.unitId === wind.id)!.event;
    expect(windEvent).toEqual({ type: 'samples', siteId: wind.siteId, unitId: wind.id, lastTs: new Date(newest).toISOString() });
    expect(listener.state()).toMatchObject({ mode: 'listen', listening: true, invalid: 0 });
    const [stored] = await queryRows<{ n: number }>(web, 'select count(*)::int as n from telemetry_samples');
    expect(stored!.n).toBe(6);
  });

  it('carries diagnosis events, with the verdict before', async () => {
    const publisher = createLivePublisher({ handle: writer, hub: createLiveHub() });
    const result = await runDiagnosisPass({ db: writer.db, live: publisher });
    expect(result.units).toBe(2);
    await publisher.flush();
    await waitFor('diagnosis events heard', () => heard.filter((h) => h.event.type === 'diagnosis').length >= 2, { timeoutMs: 20_000 });
    const diagnosis = heard.filter((h) => h.event.type === 'diagnosis').map((h) => h.event);
    // Three samples are not enough to judge a machine; a first diagnosis has no verdict before it.
    expect(diagnosis).toContainEqual({ type: 'diagnosis', siteId: wind.siteId, unitId: wind.id, verdict: 'insufficient-data' });
  });

  it('packs many units into few NOTIFY payloads, each under the 8000-byte limit', async () => {
    const before = heard.length;
    const publisher = createLivePublisher({ handle: writer, hub: createLiveHub() });
    const many = Array.from({ length: 400 }, (_, i) => ({
      type: 'samples' as const,
      siteId: wind.siteId,
      unitId: `unit-${String(i).padStart(4, '0')}-${'x'.repeat(40)}`,
      lastTs: new Date().toISOString(),
    }));
    publisher.publish(many);
    await publisher.flush();
    await waitFor('400 events heard', () => heard.length - before >= 400, { timeoutMs: 20_000 });
    expect(publisher.state().failed).toBe(0);
    // Around 110 bytes an event: several payloads, far fewer than one per event.
    expect(publisher.state().sent).toBeGreaterThan(1);
    expect(publisher.state().sent).toBeLessThan(20);
    expect(new Set(heard.slice(before).map((h) => h.event.unitId)).size).toBe(400);
  });
});
