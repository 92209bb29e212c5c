/**
 * Benchmark of the screens' server work: seeds UNITS units (default 1,000, on
 * 50 sites) with DAYS days (default 90) of history into the configured
 * database: 10-minute and daily rollups for the whole span, Ke history every
 * 3 hours, raw 10-second samples for the last 2 days (all made by the
 * database itself with generate_series, so seeding costs no round trips), then
 * times the functions the fleet, site and unit pages call (the unit page on
 * its 30-day range) over RUNS runs each (default 50) and prints p50 and p95.
 *
 * With DATABASE_URL it seeds that database, which must hold no units (make a
 * fresh one: `createdb -h 127.0.0.1 -U postgres millrace_bench_x`, drop it
 * after); without, an embedded PGlite in a temporary folder, removed at the
 * end (BENCH_REUSE=1 times a database this bench seeded before, without
 * seeding again). Prints figures; asserts nothing. The last line reads
 * `queries: fleet p95 <X> ms, site p95 <Y> ms, unit p95 <Z> ms`.
 *
 *   npm run bench:queries [-- UNITS [DAYS [RUNS]]]
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { sql } from 'drizzle-orm';
import { openDatabase, rowsOf, type DatabaseHandle } from '@/db/client';
import { LOCAL_VIEWER } from '@/lib/auth/viewer';
import { readFleetScreen, readSiteScreen } from '@/lib/fleet/screen';
import { readUnitScreen } from '@/lib/units/screen';

const unitCount = Number(process.argv[2] ?? 1000);
const days = Number(process.argv[3] ?? 90);
const runs = Number(process.argv[4] ?? 50);
if (!Number.isInteger(unitCount) || unitCount < 1) throw new RangeError(`UNITS must be a whole number of at least 1, got ${process.argv[2]}`);
if (!Number.isInteger(days) || days < 3) throw new RangeError(`DAYS must be a whole number of at least 3, got ${process.argv[3]}`);
if (!Number.isInteger(runs) || runs < 5) throw new RangeError(`RUNS must be a whole number of at least 5, got ${process.argv[4]}`);
const UNITS_PER_SITE = 20;
const RAW_DAYS = 2;
/** Units per seeding statement: bounds each statement's memory (PGlite keeps everything in one process). */
const UNITS_PER_CHUNK = 50;

const log = (line: string) => process.stdout.write(`${line}\n`);

async function timed<T>(what: string, work: () => Promise<T>): Promise<T> {
  const started = performance.now();
  const result = await work();
  log(`  ${what}: ${((performance.now() - started) / 1000).toFixed(1)} s`);
  return result;
}

async function seed(handle: DatabaseHandle, nowMs: number): Promise<void> {
  const { db } = handle;
  const [existing] = rowsOf<{ n: number; bench: number }>(
    await db.execute(sql`select count(*)::int as n, count(*) filter (where id like 'bench-unit-%')::int as bench from units`),
  );
  if (process.env.BENCH_REUSE === '1' && Number(existing?.n) === unitCount && Number(existing?.bench) === unitCount) {
    log(`BENCH_REUSE=1: timing the ${unitCount} bench units already seeded in this database`);
    return;
  }
  if (Number(existing?.n) > 0) {
    throw new Error('the database already holds units: bench:queries seeds a fresh database only (createdb one, and drop it after)');
  }
  const now = sql`to_timestamp(${nowMs}::float8 / 1000.0)`;
  const sites = Math.ceil(unitCount / UNITS_PER_SITE);
  log(`seeding ${unitCount} units on ${sites} sites, ${days} days of rollups, ${RAW_DAYS} days of raw 10-second samples (${handle.backend})`);
  await timed('sites and units', async () => {
    await db.execute(sql`
      insert into sites (id, name, timezone)
      select 'bench-site-' || lpad(s::text, 3, '0'), 'Bench site ' || s,
             (array['Europe/Oslo', 'America/Denver', 'Pacific/Auckland', 'Asia/Kolkata'])[1 + s % 4]
      from generate_series(1, ${sites}) s`);
    await db.execute(sql`
      insert into units (id, site_id, name, kind, rated_kw, rated_rpm, max_rpm, poles, ke_v_per_krpm, ke_ref_c, magnet, phase_ohm, phase_mh,
                         power_curve, cut_in_ms, cut_out_ms, rotor_diameter_m)
      select 'bench-unit-' || lpad((i + 1)::text, 4, '0'), 'bench-site-' || lpad((i / ${UNITS_PER_SITE} + 1)::text, 3, '0'), 'Bench unit ' || (i + 1),
             'wind', 10, 300, 420, 24, 1400, 20, 'ndfeb', 0.35, 8, '[{"ms":3,"kw":0.2},{"ms":11,"kw":10}]'::jsonb, 3, 25, 7
      from generate_series(0, ${unitCount - 1}) i`);
  });
  await timed('latest status and health', async () => {
    // Every 97th unit silent for 3 hours; every 40th with weakened magnets, every 50th with a shorted turn.
    await db.execute(sql`
      insert into unit_status (unit_key, presence, presence_at, last_sample_ts, last_received_at)
      select key, 'online', ${now}, ${now} - case when key % 97 = 5 then interval '3 hours' else interval '5 seconds' end, ${now}
      from units`);
    await db.execute(sql`
      insert into unit_health (unit_key, diagnosed_at, window_from, window_to, verdict, samples_used, ke_ratio, ke_ratio_low, ke_ratio_high,
                               unbalance_pct, speed_ratio, findings, detail)
      select key, ${now} - interval '1 minute', ${now} - interval '6 hours', ${now} - interval '1 minute',
             (case when key % 40 = 7 then 'demagnetised' when key % 50 = 11 then 'shorted-turns' else 'healthy' end)::verdict, 2000,
             case when key % 40 = 7 then 0.91 else 0.995 end, case when key % 40 = 7 then 0.905 else 0.99 end, case when key % 40 = 7 then 0.915 else 1.0 end,
             case when key % 50 = 11 then 3.1 else 0.3 end, 1.0,
             case when key % 40 = 7 then '[{"code":"demagnetised","severity":"alarm","message":"Ke corrected for load and magnet temperature is 0.91 of nameplate, below the 0.95 alarm line. Next steps follow."},{"code":"unbalance-normal","severity":"info","message":"Line-voltage unbalance is 0.3 % (median)."}]'::jsonb
                  when key % 50 = 11 then '[{"code":"shorted-turns","severity":"alarm","message":"Line-voltage unbalance is 3.1 % (median), above the 2.0 % line."}]'::jsonb
                  else '[{"code":"unbalance-normal","severity":"info","message":"Line-voltage unbalance is 0.3 % (median)."},{"code":"corrections","severity":"info","message":"Corrections applied."}]'::jsonb end,
             '{"speedSource":"rpm"}'::jsonb
      from units`);
  });
  const keys = rowsOf<{ key: number }>(await db.execute(sql`select key from units order by key`)).map((r) => Number(r.key));
  const chunks: number[][] = [];
  for (let i = 0; i < keys.length; i += UNITS_PER_CHUNK) chunks.push(keys.slice(i, i + UNITS_PER_CHUNK));
  const keysOf = (chunk: number[]) => sql`${sql.param(chunk)}::int4[]`;
  await timed(`Ke history every 3 hours for ${days} days`, async () => {
    for (const chunk of chunks) {
      await db.execute(sql`
        insert into unit_health_history (unit_key, diagnosed_at, window_from, window_to, verdict, samples_used, ke_ratio, ke_ratio_low, ke_ratio_high,
                                         unbalance_pct, speed_ratio, findings, detail)
        select k, t, t - interval '6 hours', t, 'healthy', 2000, r, r - 0.004, r + 0.004, 0.3, 1.0, '[]'::jsonb, '{}'::jsonb
        from unnest(${keysOf(chunk)}) k
        cross join generate_series(${now} - ${days} * interval '1 day', ${now}, interval '3 hours') t
        cross join lateral (select 1.0 - (case when k % 40 = 7 then 0.0009 else 0.00005 end) * extract(epoch from t - (${now} - ${days} * interval '1 day')) / 86400
                                   + 0.002 * sin(k + extract(epoch from t) / 3600) as r) v`);
    }
  });
  const rollupSelect = (step: string, hours: number) => sql`
    select k, b, ${hours * 360}, b, b + ${step}::interval - interval '10 seconds', ${hours * 3600}, kw * ${hours},
           rpm - 20, rpm + 20, rpm * ${hours * 360}, v - 30, v + 30, v * ${hours * 360}, a - 2, a + 2, a * ${hours * 360}, ${hours * 360},
           kw - 2, kw + 2, kw * ${hours * 360}, ${hours * 360}, 38, 44, 41 * ${hours * 360}, ${hours * 360}, 4, 9, 6.5 * ${hours * 360}, ${hours * 360}`;
  const rollupColumns = sql`(unit_key, bucket_start, samples, first_ts, last_ts, covered_s, kwh, rpm_min, rpm_max, rpm_sum, vll_min, vll_max, vll_sum,
                              amps_min, amps_max, amps_sum, amps_count, kw_min, kw_max, kw_sum, kw_count, stator_c_min, stator_c_max, stator_c_sum,
                              stator_c_count, resource_min, resource_max, resource_sum, resource_count)`;
  await timed(`10-minute rollups for ${days} days`, async () => {
    for (const chunk of chunks) {
      await db.execute(sql`
        insert into telemetry_rollups_10m ${rollupColumns}
        ${rollupSelect('10 minutes', 1 / 6)}
        from unnest(${keysOf(chunk)}) k
        cross join generate_series(date_trunc('hour', ${now}) - ${days} * interval '1 day', ${now}, interval '10 minutes') b
        cross join lateral (select 200 + 60 * sin(extract(epoch from b) / 7200 + k) as rpm) s
        cross join lateral (select s.rpm * 1.4 as v, greatest(0, 5 + 4 * sin(extract(epoch from b) / 7200 + k)) as kw, 8 as a) m`);
    }
  });
  await timed(`daily rollups for ${days} days`, async () => {
    for (const chunk of chunks) {
      await db.execute(sql`
        insert into telemetry_rollups_daily ${rollupColumns}
        ${rollupSelect('1 day', 24)}
        from unnest(${keysOf(chunk)}) k
        cross join generate_series(date_trunc('day', ${now}) - ${days} * interval '1 day', ${now}, interval '1 day') b
        cross join lateral (select 200 + 20 * sin(extract(epoch from b) / 86400 + k) as rpm) s
        cross join lateral (select s.rpm * 1.4 as v, 5.0 as kw, 8 as a) m`);
    }
  });
  await timed(`raw 10-second samples for ${RAW_DAYS} days`, async () => {
    for (const chunk of chunks) {
      await db.execute(sql`
        insert into telemetry_samples (unit_key, ts, rpm, hz, vab, vbc, vca, ia, ib, ic, kw, stator_c, ambient_c, wind_ms)
        select k, ts, rpm, rpm * 0.2, rpm * 1.4, rpm * 1.401, rpm * 1.399, 8, 8, 8, 5 + 3 * sin(extract(epoch from ts) / 600), 41, 6, 8
        from unnest(${keysOf(chunk)}) k
        cross join generate_series(${now} - ${RAW_DAYS} * interval '1 day', ${now}, interval '10 seconds') ts
        cross join lateral (select 200 + 60 * sin(extract(epoch from ts) / 7200 + k) + 5 * sin(extract(epoch from ts) / 30) as rpm) s`);
    }
  });
  // What autovacuum does to a loaded table in time (hint bits, visibility map, statistics); timing right
  // after 30 M fresh rows would measure the bulk load's aftermath, not the screens.
  await timed('vacuum and analyze', () => db.execute(sql`vacuum (analyze)`));
}

function percentile(sorted: number[], p: number): number {
  const i = Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1));
  return sorted[i] as number;
}

async function measure(name: string, work: (i: number) => Promise<unknown>): Promise<{ p50: number; p95: number }> {
  for (let i = 0; i < 3; i++) await work(i);
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const started = performance.now();
    await work(i);
    times.push(performance.now() - started);
  }
  times.sort((a, b) => a - b);
  const p50 = percentile(times, 50);
  const p95 = percentile(times, 95);
  log(`${name}: p50 ${p50.toFixed(1)} ms, p95 ${p95.toFixed(1)} ms, max ${(times.at(-1) as number).toFixed(1)} ms over ${runs} runs`);
  return { p50, p95 };
}

async function main(): Promise<void> {
  const url = process.env.DATABASE_URL || undefined;
  const folder = url ? undefined : mkdtempSync(join(tmpdir(), 'millrace-bench-queries-'));
  const handle = await openDatabase(url ? { url, maxConnections: 4 } : { dataDir: folder });
  try {
    const nowMs = Date.now();
    await seed(handle, nowMs);
    const { db } = handle;
    const siteIds = rowsOf<{ id: string }>(await db.execute(sql`select id from sites order by id`)).map((r) => r.id);
    const unitsBySite = rowsOf<{ id: string; site_id: string }>(await db.execute(sql`select id, site_id from units order by key`));
    const viewer = LOCAL_VIEWER;
    log(`timing the screens' server work (${handle.backend}), ${runs} runs each after 3 warm-up runs`);
    const fleet = await measure('fleet (every site, counts, power, energy today, attention lines)', () => readFleetScreen({ db, viewer, nowMs: Date.now() }));
    const site = await measure('site (20 units, latest figures, 6 h sparklines)', (i) =>
      readSiteScreen({ db, viewer, siteId: siteIds[i % siteIds.length] as string, search: {}, nowMs: Date.now() }),
    );
    const unit = await measure('unit, 30-day range (view, voltage against speed, Ke history and trend, series)', async (i) => {
      const u = unitsBySite[(i * 37) % unitsBySite.length] as { id: string; site_id: string };
      const screen = await readUnitScreen({ db, viewer, siteId: u.site_id, unitId: u.id, rangeParam: '30d', nowMs: Date.now() });
      if (screen === undefined) throw new Error(`unit ${u.id} not found`);
    });
    await measure('unit, 1-day range (raw samples)', async (i) => {
      const u = unitsBySite[(i * 37) % unitsBySite.length] as { id: string; site_id: string };
      await readUnitScreen({ db, viewer, siteId: u.site_id, unitId: u.id, rangeParam: '1d', nowMs: Date.now() });
    });
    await measure('unit, 1-year range (daily rollups)', async (i) => {
      const u = unitsBySite[(i * 37) % unitsBySite.length] as { id: string; site_id: string };
      await readUnitScreen({ db, viewer, siteId: u.site_id, unitId: u.id, rangeParam: '1y', nowMs: Date.now() });
    });
    log(`queries: fleet p95 ${Math.round(fleet.p95)} ms, site p95 ${Math.round(site.p95)} ms, unit p95 ${Math.round(unit.p95)} ms`);
  } finally {
    await handle.close();
    if (folder) rmSync(folder, { recursive: true, force: true });
  }
}

await main();
