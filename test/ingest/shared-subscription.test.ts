/**
 * Two ingesters in one MQTT 5 share group (contract, section 3) split the
 * telemetry between them and together store each sample once. Consecutive
 * messages of one unit go to different ingesters, which commit at the same
 * time: the energy rollups must still equal the trapezoid over the stored
 * series (lib/energy, contract section 5), so neither may miss the
 * other's neighbouring samples.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDatabase, type DatabaseHandle } from '@/db/client';
import { integrateIntoBuckets } from '@/lib/energy/integrate';
import { startIngester, type Ingester } from '@/lib/ingest/ingester';
import { createPostgresDatabase } from '@/test/support/backend';
import { adminDatabaseUrl, openPublisher, queryRows, registerFleet, samplesPayload, testFleet, testLogger, testTag, waitFor, type Outgoing } from '@/test/support/ingest';
import { startMosquitto, type TestMosquitto } from '@/test/support/mosquitto';
import { mosquitto as mosquittoBinary, postgresServer, skipUnless } from '@/test/support/services';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 4, hydroUnits: 0 });
const MESSAGES_PER_UNIT = 400;
const SAMPLES_PER_MESSAGE = 10;
const N = fleet.units.length * MESSAGES_PER_UNIT * SAMPLES_PER_MESSAGE;

// Needs Mosquitto (MQTT 5 shared subscriptions; aedes speaks 3.1.1) and a real PostgreSQL (two ingesters' connections).
describe.skipIf(skipUnless([mosquittoBinary, postgresServer], 'two ingesters'))('two ingesters on the shared subscription', { timeout: 180_000 }, () => {
  let mosquitto: TestMosquitto;
  let db: { url: string; drop(): Promise<void> };
  let handles: DatabaseHandle[] = [];
  let ingesters: Ingester[] = [];
  let published = 0;

  beforeAll(async () => {
    mosquitto = await startMosquitto({ auth: 'open-for-tests' });
    db = await createPostgresDatabase(adminDatabaseUrl(), 'millrace_ingest_shared');
    handles = [await openDatabase({ url: db.url, maxConnections: 2 }), await openDatabase({ url: db.url, migrate: false, maxConnections: 2 })];
    process.stdout.write(`shared-subscription: PostgreSQL ${new URL(db.url).host}${new URL(db.url).pathname}, Mosquitto ${mosquitto.url} (shipped configuration)\n`);
    await registerFleet(handles[0]!, fleet);
    ingesters = await Promise.all(
      handles.map((handle, i) =>
        startIngester({
          handle,
          brokerUrl: mosquitto.url,
          mqtt5: true,
          clientId: `shared-${tag}-${i}`,
          connections: 2,
          // Small batches: many commits of the two ingesters overlap in time.
          batchSamples: 300,
          batchMs: 20,
          bufferSamples: 20_000,
          log: testLogger(),
        }),
      ),
    );
    await Promise.all(ingesters.map((i) => i.ready()));
    const messages: Outgoing[] = [];
    const start = Date.now() - 6 * 3_600_000;
    for (let m = 0; m < MESSAGES_PER_UNIT; m++) {
      fleet.units.forEach((unit, u) => {
        messages.push({
          topic: `millrace/${unit.siteId}/${unit.id}/telemetry`,
          payload: samplesPayload(start + m * SAMPLES_PER_MESSAGE * 2000, SAMPLES_PER_MESSAGE, 2000, m * 7 + u),
        });
      });
    }
    published = messages.length;
    const publisher = await openPublisher(mosquitto.url);
    await publisher.publishAll(messages);
    await publisher.close();
    await waitFor(`${N} rows`, async () => {
      const [row] = await queryRows<{ n: number }>(handles[0]!, 'select count(*)::int as n from telemetry_samples');
      return Number(row!.n) >= N && ingesters.every((i) => i.state().buffer.samples === 0);
    });
  });

  afterAll(async () => {
    for (const i of ingesters) await i.stop();
    for (const h of handles) await h.close();
    await db?.drop();
    await mosquitto?.dispose();
  });

  it('splits the messages between the two, each message taken once', () => {
    const taken = ingesters.map((i) => i.state().counters.messages);
    process.stdout.write(`shared-subscription: messages taken ${taken.join(' + ')} of ${published}\n`);
    expect(taken.every((n) => n > 0)).toBe(true);
    expect(taken.reduce((a, b) => a + b, 0)).toBe(published);
  });

  it('stores each sample once and counts it once in the rollups', async () => {
    const [rows] = await queryRows<{ n: number; d: number }>(handles[0]!, 'select count(*)::int as n, count(distinct (unit_key, ts))::int as d from telemetry_samples');
    expect({ rows: Number(rows!.n), distinct: Number(rows!.d) }).toEqual({ rows: N, distinct: N });
    for (const table of ['telemetry_rollups_10m', 'telemetry_rollups_daily']) {
      const [r] = await queryRows<{ n: number }>(handles[0]!, `select sum(samples)::int as n from ${table}`);
      expect(Number(r!.n), table).toBe(N);
    }
  });

  it('keeps energy exact although neighbouring samples were committed by the other ingester', async () => {
    for (const unit of fleet.units) {
      const series = await queryRows<{ t: number; kw: number }>(
        handles[0]!,
        `select (extract(epoch from s.ts) * 1000)::float8 as t, s.kw::float8 as kw from telemetry_samples s join units u on u.key = s.unit_key
         where u.id = $1 and s.kw is not null order by s.ts`,
        [unit.id],
      );
      const size = 600_000;
      const edges: number[] = [];
      for (let e = Math.floor(Number(series[0]!.t) / size) * size; e <= Number(series[series.length - 1]!.t) + size; e += size) edges.push(e);
      const reference = integrateIntoBuckets({ tsMs: series.map((r) => Number(r.t)), values: series.map((r) => Number(r.kw)) }, edges);
      const stored = await queryRows<{ b: number; kwh: number; covered_s: number }>(
        handles[0]!,
        `select (extract(epoch from r.bucket_start) * 1000)::float8 as b, r.kwh, r.covered_s from telemetry_rollups_10m r join units u on u.key = r.unit_key where u.id = $1`,
        [unit.id],
      );
      const byBucket = new Map(stored.map((r) => [Number(r.b), r]));
      for (let k = 0; k < edges.length - 1; k++) {
        expect(Number(byBucket.get(edges[k]!)?.kwh ?? 0), `${unit.id} ${new Date(edges[k]!).toISOString()}`).toBeCloseTo(reference.valueHours[k]!, 9);
        expect(Number(byBucket.get(edges[k]!)?.covered_s ?? 0)).toBeCloseTo(reference.coveredHours[k]! * 3600, 6);
      }
    }
  });
});
