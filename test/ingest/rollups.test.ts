/**
 * The rollups the ingester keeps as it writes equal a recomputation from the
 * stored raw samples, duplicates (QoS 1 redelivery) counted once, late and
 * out-of-order samples included. Energy is checked against lib/energy's
 * trapezoid (contract, section 5), an implementation independent of the
 * ingester's. Presence and last-seen times land in unit_status.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { integrateIntoBuckets } from '@/lib/energy/integrate';
import { startIngester, type Ingester } from '@/lib/ingest/ingester';
import { backendDescription, createTestDatabase, type TestDatabase } from '@/test/support/backend';
import { openPublisher, queryRows, registerFleet, startTestBroker, testFleet, testLogger, testTag, waitFor, type Outgoing, type TestBroker } from '@/test/support/ingest';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 3, hydroUnits: 1 });
const windSite = fleet.sites[0]!.id;
const hydroSite = fleet.sites[1]!.id;
const TEN_MIN = 600_000;
// Whole days back, so the series crosses midnight and the daily buckets split.
const start = Math.floor(Date.now() / 86_400_000) * 86_400_000 - 2 * 86_400_000 + 23 * 3_600_000;

/** A deterministic series for unit `u`: mostly 10 s apart, some gaps, some samples without kw. */
function series(u: number) {
  const out: Array<Record<string, number>> = [];
  let ts = start + u * 1000;
  for (let i = 0; i < 480; i++) {
    ts += i % 97 === 96 ? 11 * 60_000 : 10_000 + ((i * 7919 + u) % 3) * 1000; // a gap now and then
    const s: Record<string, number> = {
      ts,
      rpm: 150 + ((i * 31 + u * 7) % 120) + 0.25,
      vab: 200 + ((i * 13) % 40) + 0.1,
      vbc: 201 + ((i * 17) % 40),
      ia: 5 + ((i * 3) % 9) * 0.5,
      ib: 5.5 + ((i * 5) % 7) * 0.5,
      statorC: 35 + ((i * 11) % 20) * 0.3,
    };
    if (i % 13 !== 5) s.kw = ((i * 29 + u * 3) % 60) / 10 - 0.3; // some negative (motoring), some absent
    if (u < 3) s.windMs = 4 + ((i * 19) % 80) / 10;
    else s.flowM3s = 0.05 + ((i * 23) % 40) / 1000;
    out.push(s);
  }
  return out;
}

const unitTopics = fleet.units.map((unit) => `millrace/${unit.siteId}/${unit.id}/telemetry`);

describe(`rollups equal a recomputation from raw samples (${backendDescription()})`, () => {
  let db: TestDatabase;
  let broker: TestBroker;
  let ingester: Ingester;
  let expectedRows = 0;

  beforeAll(async () => {
    db = await createTestDatabase();
    broker = await startTestBroker();
    process.stdout.write(`rollups: ${db.handle.location}, ${broker.description}\n`);
    await registerFleet(db.handle, fleet);
    ingester = await startIngester({
      handle: db.handle,
      brokerUrl: broker.url,
      mqtt5: broker.mqtt5,
      shareGroup: broker.shareGroup,
      clientId: `rollups-${tag}`,
      connections: 2,
      // Small batches, so that neighbours of a late sample sit in earlier batches.
      batchSamples: 120,
      batchMs: 20,
      bufferSamples: 5000,
      log: testLogger(),
      sessionExpirySeconds: 120,
    });
    await ingester.ready();
    const publisher = await openPublisher(broker.url, { mqtt5: broker.mqtt5 });

    // Messages of 8 samples; every unit's messages shuffled in blocks (late arrivals),
    // and every fifth message published twice (a redelivery).
    const perUnit: Outgoing[][] = [];
    fleet.units.forEach((_unit, u) => {
      const messages: Outgoing[] = [];
      perUnit.push(messages);
      const s = series(u);
      expectedRows += s.length;
      const chunks: string[] = [];
      for (let i = 0; i < s.length; i += 8) chunks.push(JSON.stringify(s.slice(i, i + 8)));
      for (let i = 0; i + 3 < chunks.length; i += 4) [chunks[i], chunks[i + 3]] = [chunks[i + 3]!, chunks[i]!];
      chunks.forEach((payload, k) => {
        messages.push({ topic: unitTopics[u]!, payload });
        if (k % 5 === 2) messages.push({ topic: unitTopics[u]!, payload });
      });
    });
    // Interleave units as devices would, each unit's messages in their (shuffled) order.
    const messages: Outgoing[] = [];
    for (let k = 0; perUnit.some((list) => k < list.length); k++) for (const list of perUnit) if (k < list.length) messages.push(list[k]!);
    messages.push({ topic: `millrace/${windSite}/${fleet.units[0]!.id}/presence`, payload: 'online', retain: true });
    messages.push({ topic: `millrace/${hydroSite}/${fleet.units[3]!.id}/presence`, payload: 'online', retain: true });
    await publisher.publishAll(messages, { window: 50 });
    await publisher.close();
    let have = 0;
    await waitFor('all samples committed', async () => {
      const [row] = await queryRows<{ n: number }>(db.handle, 'select count(*)::int as n from telemetry_samples');
      have = Number(row!.n);
      return have >= expectedRows && ingester.state().buffer.samples === 0;
    }).catch(async (error: Error) => {
      const reasons = await queryRows<{ reason: string; n: number }>(db.handle, 'select reason, count(*)::int as n from quarantine group by 1 order by 2 desc limit 3');
      throw new Error(`${error.message}: ${have} of ${expectedRows} rows; ${JSON.stringify(ingester.state().counters)}; quarantined: ${JSON.stringify(reasons)}`);
    });
    await waitFor('presence committed', () => ingester.state().counters.presenceUpdates >= 2);
  });

  afterAll(async () => {
    await ingester?.stop();
    await broker?.close();
    await db?.drop();
  });

  it('stores every sample once and counts the redelivered ones as duplicates', async () => {
    const [row] = await queryRows<{ n: number; d: number }>(db.handle, 'select count(*)::int as n, count(distinct (unit_key, ts))::int as d from telemetry_samples');
    expect(Number(row!.n)).toBe(expectedRows);
    expect(Number(row!.d)).toBe(expectedRows);
    expect(ingester.state().counters.duplicates).toBeGreaterThan(0);
  });

  for (const [table, size] of [
    ['telemetry_rollups_10m', TEN_MIN],
    ['telemetry_rollups_daily', 86_400_000],
  ] as const) {
    it(`${table}: counts, minima, maxima and sums match the raw samples`, async () => {
      const recomputed = await queryRows<Record<string, number>>(
        db.handle,
        `select unit_key, (floor(extract(epoch from ts) * 1000 / ${size}) * ${size})::float8 as b,
           count(*)::int as samples, (extract(epoch from min(ts)) * 1000)::float8 as first_ts, (extract(epoch from max(ts)) * 1000)::float8 as last_ts,
           min(rpm)::float8 as rpm_min, max(rpm)::float8 as rpm_max, sum(rpm::float8) as rpm_sum,
           min(vll)::float8 as vll_min, max(vll)::float8 as vll_max, sum(vll) as vll_sum,
           min(amps)::float8 as amps_min, max(amps)::float8 as amps_max, sum(amps) as amps_sum, count(amps)::int as amps_count,
           min(kw)::float8 as kw_min, max(kw)::float8 as kw_max, sum(kw::float8) as kw_sum, count(kw)::int as kw_count,
           min(stator_c)::float8 as stator_c_min, max(stator_c)::float8 as stator_c_max, sum(stator_c::float8) as stator_c_sum, count(stator_c)::int as stator_c_count,
           min(res)::float8 as resource_min, max(res)::float8 as resource_max, sum(res::float8) as resource_sum, count(res)::int as resource_count
         from (
           select s.*,
             (select avg(v) from unnest(array[s.vab::float8, s.vbc::float8, s.vca::float8]) as v) as vll,
             (select avg(v) from unnest(array[s.ia::float8, s.ib::float8, s.ic::float8]) as v) as amps,
             case when u.kind = 'wind' then s.wind_ms else s.flow_m3s end as res
           from telemetry_samples s join units u on u.key = s.unit_key
         ) x
         group by 1, 2 order by 1, 2`,
      );
      const stored = await queryRows<Record<string, number>>(
        db.handle,
        `select unit_key, (extract(epoch from bucket_start) * 1000)::float8 as b, samples, (extract(epoch from first_ts) * 1000)::float8 as first_ts,
           (extract(epoch from last_ts) * 1000)::float8 as last_ts,
           rpm_min::float8, rpm_max::float8, rpm_sum, vll_min::float8, vll_max::float8, vll_sum, amps_min::float8, amps_max::float8, amps_sum, amps_count,
           kw_min::float8, kw_max::float8, kw_sum, kw_count, stator_c_min::float8, stator_c_max::float8, stator_c_sum, stator_c_count,
           resource_min::float8, resource_max::float8, resource_sum, resource_count
         from ${table} where samples > 0 order by 1, 2`,
      );
      expect(stored.length).toBe(recomputed.length);
      recomputed.forEach((want, i) => {
        const got = stored[i]!;
        for (const [key, value] of Object.entries(want)) {
          if (value === null) expect(got[key], key).toBeNull();
          else if (key.endsWith('_min') || key.endsWith('_max')) expect(Number(got[key]), key).toBeCloseTo(Math.fround(Number(value)), 3);
          else expect(Number(got[key]), `${key} of unit ${want.unit_key} bucket ${want.b}`).toBeCloseTo(Number(value), 6);
        }
      });
    });

    it(`${table}: energy and covered time match the trapezoid over the stored series`, async () => {
      for (let u = 0; u < fleet.units.length; u++) {
        const rows = await queryRows<{ t: number; kw: number }>(
          db.handle,
          `select (extract(epoch from s.ts) * 1000)::float8 as t, s.kw::float8 as kw from telemetry_samples s join units x on x.key = s.unit_key
           where x.id = $1 and s.kw is not null order by s.ts`,
          [fleet.units[u]!.id],
        );
        const first = Math.floor(Number(rows[0]!.t) / size) * size;
        const edges: number[] = [];
        for (let e = first; e <= Number(rows[rows.length - 1]!.t) + size; e += size) edges.push(e);
        const reference = integrateIntoBuckets({ tsMs: rows.map((r) => Number(r.t)), values: rows.map((r) => Number(r.kw)) }, edges);
        const stored = await queryRows<{ b: number; kwh: number; covered_s: number }>(
          db.handle,
          `select (extract(epoch from r.bucket_start) * 1000)::float8 as b, r.kwh, r.covered_s from ${table} r join units x on x.key = r.unit_key where x.id = $1`,
          [fleet.units[u]!.id],
        );
        const byBucket = new Map(stored.map((r) => [Number(r.b), r]));
        let totalKwh = 0;
        for (let k = 0; k < edges.length - 1; k++) {
          const got = byBucket.get(edges[k]!);
          expect(Number(got?.kwh ?? 0), `kWh of bucket ${new Date(edges[k]!).toISOString()}`).toBeCloseTo(reference.valueHours[k]!, 9);
          expect(Number(got?.covered_s ?? 0)).toBeCloseTo(reference.coveredHours[k]! * 3600, 6);
          totalKwh += reference.valueHours[k]!;
        }
        expect(totalKwh).not.toBe(0);
      }
    });
  }

  it('keeps presence and the last sample per unit in unit_status', async () => {
    const rows = await queryRows<{ id: string; presence: string | null; presence_at: Date | null; last: number | null }>(
      db.handle,
      `select u.id, s.presence::text as presence, s.presence_at, (extract(epoch from s.last_sample_ts) * 1000)::float8 as last
       from unit_status s join units u on u.key = s.unit_key order by u.id`,
    );
    const byId = new Map(rows.map((r) => [r.id, r]));
    expect(byId.get(fleet.units[0]!.id)?.presence).toBe('online');
    // The hydro unit was online while it sent; now it stops, and its state must change.
    const hydro = fleet.units[3]!.id;
    expect(byId.get(hydro)?.presence).toBe('online');
    // postgres-js gives a timestamp as text through a raw query, PGlite as a Date.
    const onlineAt = new Date(byId.get(hydro)!.presence_at!).getTime();
    const updates = ingester.state().counters.presenceUpdates;
    const publisher = await openPublisher(broker.url, { mqtt5: broker.mqtt5 });
    await publisher.publishAll([{ topic: `millrace/${hydroSite}/${hydro}/presence`, payload: 'offline', retain: true }]);
    await publisher.close();
    await waitFor('offline presence committed', () => ingester.state().counters.presenceUpdates > updates);
    const [after] = await queryRows<{ presence: string | null; presence_at: Date | null }>(
      db.handle,
      'select s.presence::text as presence, s.presence_at from unit_status s join units u on u.key = s.unit_key where u.id = $1',
      [hydro],
    );
    expect(after!.presence).toBe('offline');
    expect(new Date(after!.presence_at!).getTime()).toBeGreaterThanOrEqual(onlineAt);
    fleet.units.forEach((unit, u) => {
      const s = series(u);
      expect(Number(byId.get(unit.id)?.last)).toBe(s[s.length - 1]!.ts);
    });
  });

  it('reports its state for /api/health', () => {
    const state = ingester.state();
    expect(state.status).toBe('ok');
    expect(state.database.reachable).toBe(true);
    expect(state.counters.rowsCommitted).toBe(expectedRows);
    expect(state.counters.batches).toBeGreaterThan(1);
    expect(state.buffer).toEqual({ samples: 0, limit: 5000, fillPct: 0, committing: 0, writing: false });
    expect(state.broker.connected).toBe(state.broker.connections.length);
    expect(typeof state.lagMs).toBe('number');
  });
});
