/**
 * The read layer of the screens and the read API against a real database
 * (PGlite by default, PostgreSQL with DATABASE_URL): viewer scoping, unit
 * states, worst-first order, energy of the site's own day, bounded raw reads
 * and downsampled series, and the API's answers and errors.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { createTestDatabase, type TestDatabase } from '@/test/support/backend';
import { getFleetSites, getSiteView, getSitesWithUnitIds } from '@/lib/fleet/queries';
import { upsertFleet } from '@/lib/setup/queries';
import { getUnitView, getUnitSeries, getUnitHealthReport, getUnitEmfView, getUnitKeHistory } from '@/lib/units/queries';
import { LOCAL_VIEWER, type Viewer } from '@/lib/auth/viewer';
import type { Fleet } from '@/lib/contract/nameplate';

let t: TestDatabase;
// 13:00 UTC: in Auckland (UTC+13 in December) it is already 02:00 the next day.
const NOW = Date.parse('2026-12-02T13:00:00Z');
const MIN = 60_000;
const crew: Viewer = { id: 'crew-1', role: 'crew', siteIds: ['upper-lea'] };

const unit = (id: string, siteId: string) => ({
  id,
  siteId,
  kind: 'hydro' as const,
  ratedKw: 50,
  ratedRpm: 300,
  maxRpm: 450,
  poles: 24,
  keVPerKrpm: 1000,
  keRefC: 20,
  magnet: 'ndfeb' as const,
  phaseOhm: 0.4,
  phaseMh: 3,
  designHeadM: 20,
  designFlowM3s: 0.3,
  efficiency: 0.8,
});

const fleet: Fleet = {
  sites: [
    { id: 'upper-lea', name: 'Upper Lea', timezone: 'Europe/London' },
    { id: 'far-shore', name: 'Far Shore', timezone: 'Pacific/Auckland' },
    { id: 'quiet-fen', name: 'Quiet Fen', timezone: 'Europe/London' },
  ],
  units: [unit('ul-1', 'upper-lea'), unit('ul-2', 'upper-lea'), unit('fs-1', 'far-shore'), unit('fs-2', 'far-shore'), unit('qf-1', 'quiet-fen')],
} as unknown as Fleet;

async function keyOf(id: string): Promise<number> {
  const rows = (await t.handle.db.execute(sql`select key from units where id = ${id}`)) as unknown as { rows?: Array<{ key: number }> } & Array<{ key: number }>;
  return Number((rows.rows ?? rows)[0]!.key);
}

async function status(id: string, lastMs: number | null) {
  await t.handle.db.execute(
    sql`insert into unit_status (unit_key, last_sample_ts) values (${await keyOf(id)}, ${lastMs === null ? null : new Date(lastMs).toISOString()}::timestamptz)`,
  );
}

async function health(id: string, verdict: string, findings: unknown[], keRatio: number | null) {
  const at = new Date(NOW - 2 * MIN).toISOString();
  await t.handle.db.execute(sql`
    insert into unit_health (unit_key, diagnosed_at, window_from, window_to, verdict, samples_used, ke_ratio, ke_ratio_low, ke_ratio_high,
                             unbalance_pct, speed_ratio, findings, detail)
    values (${await keyOf(id)}, ${at}::timestamptz, ${new Date(NOW - 6 * 60 * MIN).toISOString()}::timestamptz, ${at}::timestamptz, ${verdict}::verdict, 500,
            ${keRatio}, ${keRatio === null ? null : keRatio - 0.004}, ${keRatio === null ? null : keRatio + 0.004}, 0.4, 1.0,
            ${JSON.stringify(findings)}::jsonb, '{}'::jsonb)`);
}

async function rollup(id: string, bucketMs: number, kw: number, kwh: number) {
  await t.handle.db.execute(sql`
    insert into telemetry_rollups_10m (unit_key, bucket_start, samples, first_ts, last_ts, covered_s, kwh,
      rpm_min, rpm_max, rpm_sum, vll_min, vll_max, vll_sum, kw_min, kw_max, kw_sum, kw_count, stator_c_min, stator_c_max, stator_c_sum, stator_c_count)
    values (${await keyOf(id)}, ${new Date(bucketMs).toISOString()}::timestamptz, 60, ${new Date(bucketMs).toISOString()}::timestamptz,
            ${new Date(bucketMs + 590_000).toISOString()}::timestamptz, 600, ${kwh},
            200, 220, ${210 * 60}, 200, 240, ${220 * 60}, ${kw - 1}, ${kw + 1}, ${kw * 60}, 60, 40, 42, ${41 * 60}, 60)`);
}

beforeAll(async () => {
  t = await createTestDatabase();
  await upsertFleet({ db: t.handle.db, fleet });
  // ul-1 weakened magnets, reporting; ul-2 healthy, reporting; fs-1 healthy but silent for 2 h;
  // fs-2 reporting, never diagnosed; qf-1 never sent anything.
  await status('ul-1', NOW - MIN);
  await status('ul-2', NOW - MIN);
  await status('fs-1', NOW - 120 * MIN);
  await status('fs-2', NOW - MIN);
  await health('ul-1', 'demagnetised', [
    { code: 'demagnetised', severity: 'alarm', message: 'Ke is 0.912 of nameplate, below the 0.95 threshold. Check the magnets.' },
  ], 0.912);
  await health('ul-2', 'healthy', [{ code: 'unbalance-normal', severity: 'info', message: 'fine' }], 1.001);
  await health('fs-1', 'healthy', [], 0.998);
  // Energy: London's day started at 00:00 UTC, Auckland's at 11:00 UTC (13:00 UTC is 02:00 on 3 Dec there).
  const tenMin = 10 * MIN;
  const start = Date.parse('2026-12-02T00:00:00Z');
  await rollup('ul-1', start - tenMin, 30, 5); // yesterday in London: not counted
  await rollup('ul-1', start, 30, 5);
  await rollup('ul-1', NOW - tenMin, 30, 5);
  await rollup('ul-2', NOW - tenMin, 20, 3);
  await rollup('fs-2', Date.parse('2026-12-02T10:50:00Z'), 10, 7); // 23:50 on 2 Dec in Auckland: yesterday there
  await rollup('fs-2', Date.parse('2026-12-02T11:00:00Z'), 10, 2);
  await rollup('fs-2', NOW - tenMin, 12, 2);
}, 120_000);

afterAll(async () => {
  await t?.drop();
});

describe('fleet screen', () => {
  it('lists every site worst first, with per-state counts and one line per unit needing attention', async () => {
    const sites = await getFleetSites({ db: t.handle.db, viewer: LOCAL_VIEWER, nowMs: NOW });
    expect(sites.map((s) => s.id)).toEqual(['upper-lea', 'far-shore', 'quiet-fen']);
    const [upper, far, quiet] = sites;
    expect(upper!.counts).toEqual({ fault: 1, warning: 0, 'no-data': 0, 'not-judged': 0, healthy: 1 });
    expect(upper!.attention).toEqual([
      { id: 'ul-1', name: null, state: 'fault', label: 'Magnets weakened', reason: 'Ke is 0.912 of nameplate, below the 0.95 threshold.' },
    ]);
    expect(far!.counts).toEqual({ fault: 0, warning: 0, 'no-data': 1, 'not-judged': 1, healthy: 0 });
    expect(far!.attention.map((a) => [a.id, a.label])).toEqual([
      ['fs-1', 'No data for 2 h'],
      ['fs-2', 'Not yet judged'],
    ]);
    expect(quiet!.counts['no-data']).toBe(1);
    expect(quiet!.neverSent).toBe(true);
    expect(quiet!.oldestLastSampleMs).toBeNull();
    expect(far!.oldestLastSampleMs).toBe(NOW - 120 * MIN);
  });

  it('adds power now and energy of the site’s own calendar day from the rollups', async () => {
    const sites = await getFleetSites({ db: t.handle.db, viewer: LOCAL_VIEWER, nowMs: NOW });
    const upper = sites.find((s) => s.id === 'upper-lea')!;
    expect(upper.powerKw).toBeCloseTo(50, 9);
    expect(upper.energyTodayKwh).toBeCloseTo(13, 9);
    const far = sites.find((s) => s.id === 'far-shore')!;
    // Only fs-2 has a recent rollup; Auckland's day began at 11:00 UTC.
    expect(far.powerKw).toBeCloseTo(12, 9);
    expect(far.energyTodayKwh).toBeCloseTo(4, 9);
  });

  it('shows a viewer only their sites', async () => {
    expect((await getFleetSites({ db: t.handle.db, viewer: crew, nowMs: NOW })).map((s) => s.id)).toEqual(['upper-lea']);
    expect(await getFleetSites({ db: t.handle.db, viewer: { ...crew, siteIds: [] }, nowMs: NOW })).toEqual([]);
    expect((await getSitesWithUnitIds({ db: t.handle.db, viewer: crew })).map((s) => s.id)).toEqual(['upper-lea']);
  });
});

describe('site screen', () => {
  it('gives each unit its latest figures, Ke interval and a sparkline of the last hours', async () => {
    const site = (await getSiteView({ db: t.handle.db, viewer: LOCAL_VIEWER, siteId: 'upper-lea', nowMs: NOW }))!;
    const ul1 = site.units.find((u) => u.id === 'ul-1')!;
    expect(ul1.kw).toBeCloseTo(30, 9);
    expect(ul1.rpm).toBeCloseTo(210, 9);
    expect(ul1.voltsLl).toBeCloseTo(220, 9);
    expect(ul1.statorC).toBeCloseTo(41, 9);
    expect([ul1.keRatioLow, ul1.keRatio, ul1.keRatioHigh]).toEqual([0.908, 0.912, 0.916].map((v) => expect.closeTo(v, 9)));
    expect(site.sparklines['ul-1']!.map((p) => p.kw)).toEqual([30]);
  });

  it('is undefined for a site that does not exist and for one the viewer may not see', async () => {
    expect(await getSiteView({ db: t.handle.db, viewer: LOCAL_VIEWER, siteId: 'nowhere', nowMs: NOW })).toBeUndefined();
    expect(await getSiteView({ db: t.handle.db, viewer: crew, siteId: 'far-shore', nowMs: NOW })).toBeUndefined();
  });
});

describe('unit screen', () => {
  it('finds a unit only under its own site and for a viewer who may see it', async () => {
    expect((await getUnitView({ db: t.handle.db, viewer: LOCAL_VIEWER, siteId: 'upper-lea', unitId: 'ul-1', nowMs: NOW }))?.state.state).toBe('fault');
    expect(await getUnitView({ db: t.handle.db, viewer: LOCAL_VIEWER, siteId: 'far-shore', unitId: 'ul-1', nowMs: NOW })).toBeUndefined();
    expect(await getUnitView({ db: t.handle.db, viewer: crew, siteId: 'far-shore', unitId: 'fs-1', nowMs: NOW })).toBeUndefined();
  });

  it('reads raw samples for a day at most and downsamples them; longer ranges come from the rollups', async () => {
    const key = await keyOf('ul-2');
    // Two days of 10-second samples, by the database's own series generator.
    await t.handle.db.execute(sql`
      insert into telemetry_samples (unit_key, ts, rpm, hz, vab, vbc, vca, ia, ib, ic, kw, stator_c)
      select ${key}, to_timestamp(${NOW / 1000}::float8) - g * interval '10 seconds', 200 + (g % 7), 40, 230, 231, 229, 10, 10, 10, 4, 40
      from generate_series(0, 17279) g`);
    const day = (await getUnitSeries({ db: t.handle.db, viewer: LOCAL_VIEWER, siteId: 'upper-lea', unitId: 'ul-2', range: '1d', nowMs: NOW, maxPoints: 500 }))!;
    expect(day.source).toBe('raw');
    expect(day.rowsRead).toBe(8641);
    expect(day.series.rpm!.reduce((n, b) => n + b.count, 0)).toBe(8641);
    expect(day.series.rpm!.length).toBeLessThanOrEqual(500);
    expect(Math.max(...day.series.rpm!.map((b) => b.max))).toBe(206);
    expect(day.series.vab && day.series.vbc && day.series.vca && day.series.hz).toBeTruthy();
    const month = (await getUnitSeries({ db: t.handle.db, viewer: LOCAL_VIEWER, siteId: 'upper-lea', unitId: 'ul-1', range: '30d', nowMs: NOW }))!;
    expect(month.source).toBe('rollup-10m');
    // Three 10-minute rollups of 60 samples; two fall in one 36-minute bucket of the 30 days' 1,200.
    expect(month.series.kw!.every((b) => b.mean === 30)).toBe(true);
    expect(month.series.kw!.reduce((n, b) => n + b.count, 0)).toBe(180);
    expect(month.rowsRead).toBe(3);
    const year = (await getUnitSeries({ db: t.handle.db, viewer: LOCAL_VIEWER, siteId: 'upper-lea', unitId: 'ul-1', range: '1y', nowMs: NOW }))!;
    expect(year.source).toBe('rollup-daily');
    expect(await getUnitSeries({ db: t.handle.db, viewer: crew, siteId: 'far-shore', unitId: 'fs-1', range: '1h', nowMs: NOW })).toBeUndefined();
  });

  it('draws voltage against speed over the diagnosis window, with the nameplate line', async () => {
    const view = (await getUnitView({ db: t.handle.db, viewer: LOCAL_VIEWER, siteId: 'upper-lea', unitId: 'ul-2', nowMs: NOW }))!;
    const emf = await getUnitEmfView({ db: t.handle.db, view, nowMs: NOW });
    expect(emf.diagnosisWindow).toBe(true);
    expect(emf.samplesRead).toBeGreaterThan(2000);
    expect(emf.points.length).toBeLessThanOrEqual(1500);
    expect(emf.magnetC).toBe(40);
    expect(emf.lineKeVPerKrpm).toBeCloseTo(1000 * (1 - 0.0012 * 20), 9);
    expect(emf.points.every((p) => p.correctedV !== undefined && p.correctedV > p.terminalV)).toBe(true);
  });

  it('gives the Ke history per day and its trend', async () => {
    const view = (await getUnitView({ db: t.handle.db, viewer: LOCAL_VIEWER, siteId: 'upper-lea', unitId: 'ul-1', nowMs: NOW }))!;
    const key = view.unit.key;
    // 40 days sliding 1 % a month from 0.99.
    await t.handle.db.execute(sql`
      insert into unit_health_history (unit_key, diagnosed_at, window_from, window_to, verdict, samples_used, ke_ratio, ke_ratio_low, ke_ratio_high, findings, detail)
      select ${key}, to_timestamp(${NOW / 1000}::float8) - g * interval '1 day', to_timestamp(${NOW / 1000}::float8) - g * interval '1 day' - interval '6 hours',
             to_timestamp(${NOW / 1000}::float8) - g * interval '1 day', 'healthy', 500, 0.99 - (40 - g) * 0.01 / 30, 0.98 - (40 - g) * 0.01 / 30, 1.0 - (40 - g) * 0.01 / 30, '[]', '{}'
      from generate_series(0, 39) g`);
    const { days, trend } = await getUnitKeHistory({ db: t.handle.db, view, nowMs: NOW });
    expect(days.length).toBe(40);
    expect(trend.status).toBe('declining');
    expect(trend.slopePctPerMonth).toBeCloseTo(-1, 1);
    expect(trend.crossingMs).toBeGreaterThan(NOW);
  });
});

describe('read API', () => {
  it('answers the health of a diagnosed unit as the check object plus its time and window; 404 before the first diagnosis', async () => {
    const report = (await getUnitHealthReport({ db: t.handle.db, viewer: LOCAL_VIEWER, siteId: 'upper-lea', unitId: 'ul-1' }))!;
    expect(Object.keys(report).sort()).toEqual(
      ['samplesUsed', 'keRatio', 'keRatioLow', 'keRatioHigh', 'unbalancePct', 'speedRatio', 'verdict', 'findings', 'diagnosedAt', 'windowFrom', 'windowTo'].sort(),
    );
    expect(report.verdict).toBe('demagnetised');
    expect(report.diagnosedAt).toBe(new Date(NOW - 2 * MIN).toISOString());
    expect(await getUnitHealthReport({ db: t.handle.db, viewer: LOCAL_VIEWER, siteId: 'far-shore', unitId: 'fs-2' })).toBeUndefined();
    expect(await getUnitHealthReport({ db: t.handle.db, viewer: crew, siteId: 'far-shore', unitId: 'fs-1' })).toBeUndefined();
  });

  it('answers JSON with the contract’s errors: 400 naming the parameter, 404 for an unknown or unseen unit', async () => {
    const { sitesAnswer, unitHealthAnswer } = await import('@/lib/api/read');
    const db = t.handle.db;
    const sites = await sitesAnswer({ db, viewer: LOCAL_VIEWER });
    expect(sites.status).toBe(200);
    expect(sites.headers.get('content-type')).toContain('application/json');
    const body = (await sites.json()) as { sites: Array<{ id: string; units: string[] }> };
    expect(body.sites.find((s) => s.id === 'upper-lea')).toEqual({ id: 'upper-lea', name: 'Upper Lea', timezone: 'Europe/London', units: ['ul-1', 'ul-2'] });
    expect(((await (await sitesAnswer({ db, viewer: crew })).json()) as { sites: unknown[] }).sites).toHaveLength(1);
    const call = (siteId: string, unitId: string, viewer: Viewer = LOCAL_VIEWER) => unitHealthAnswer({ db, viewer, params: { siteId, unitId } });
    const ok = await call('upper-lea', 'ul-1');
    expect(ok.status).toBe(200);
    expect(((await ok.json()) as { verdict: string }).verdict).toBe('demagnetised');
    const bad = await call('Upper_Lea', 'ul-1');
    expect(bad.status).toBe(400);
    const badBody = (await bad.json()) as { error: { code: string; message: string } };
    expect(badBody.error.code).toBe('bad-parameter');
    expect(badBody.error.message).toMatch(/^siteId: /);
    const missing = await call('upper-lea', 'no-such-unit');
    expect(missing.status).toBe(404);
    expect(((await missing.json()) as { error: { code: string } }).error.code).toBe('not-found');
    // Before the first diagnosis, and for a unit of a site the viewer may not see: the same 404.
    expect((await call('far-shore', 'fs-2')).status).toBe(404);
    const unseen = await call('far-shore', 'fs-1', crew);
    expect(unseen.status).toBe(404);
    expect(((await unseen.json()) as { error: { code: string } }).error.code).toBe('not-found');
  });
});
