/**
 * Data access of the unit screen and the unit read API. Every function takes
 * the viewer; a unit on a site the viewer may not see is undefined, like one
 * that does not exist. Raw telemetry is read only within a bounded window (at
 * most a day); longer ranges come from the rollups. Every series is
 * downsampled on the server (lib/charts/downsample.ts).
 */
import { and, eq, sql } from 'drizzle-orm';
import { rowsOf, type Db } from '@/db/client';
import { sites, units, unitHealth, unitStatus, type SiteRow, type StoredFinding, type UnitRow } from '@/db/schema';
import { canSeeSite, type Viewer } from '@/lib/auth/viewer';
import { downsampleSeries, thinEvenly, DEFAULT_MAX_POINTS, type SeriesBucket, type SeriesPoint } from '@/lib/charts/downsample';
import type { Nameplate } from '@/lib/contract/nameplate';
import { resolveLimits, type ResolvedLimits } from '@/lib/diagnosis/limits';
import { keTrend, type KeTrend } from '@/lib/diagnosis/trend';
import { nameplateOfUnit } from '@/lib/setup/queries';
import { unitStateOf, type UnitStateView } from '@/lib/fleet/unit-state';
import { emfChart, type EmfChart, type EmfSample } from './emf-points';

const HOUR_MS = 3_600_000;
const DAY_MS = 86_400_000;

/** Where a range's series come from. */
export type SeriesSource = 'raw' | 'rollup-10m' | 'rollup-daily';

/** The ranges the unit screen offers: raw samples up to a day, 10-minute rollups to 30 days, daily rollups beyond. */
export const SERIES_RANGES = {
  '1h': { label: 'Last hour', ms: HOUR_MS, source: 'raw' },
  '6h': { label: '6 hours', ms: 6 * HOUR_MS, source: 'raw' },
  '1d': { label: '1 day', ms: DAY_MS, source: 'raw' },
  '7d': { label: '7 days', ms: 7 * DAY_MS, source: 'rollup-10m' },
  '30d': { label: '30 days', ms: 30 * DAY_MS, source: 'rollup-10m' },
  '1y': { label: '1 year', ms: 365 * DAY_MS, source: 'rollup-daily' },
} as const satisfies Record<string, { label: string; ms: number; source: SeriesSource }>;
export type SeriesRange = keyof typeof SERIES_RANGES;
export const SERIES_RANGE_KEYS = Object.keys(SERIES_RANGES) as SeriesRange[];

/** Longest window of raw telemetry any screen reads. */
export const MAX_RAW_WINDOW_MS = DAY_MS;

/** The unit, its site, nameplate, latest status and health, as the unit screen shows them. */
export interface UnitView {
  readonly site: Pick<SiteRow, 'id' | 'name' | 'timezone'>;
  readonly unit: UnitRow;
  readonly nameplate: Nameplate;
  readonly limits: ResolvedLimits;
  readonly lastSampleMs: number | null;
  readonly presence: 'online' | 'offline' | null;
  readonly health: {
    readonly diagnosedAtMs: number;
    readonly windowFromMs: number;
    readonly windowToMs: number;
    readonly verdict: string;
    readonly samplesUsed: number;
    readonly keRatio: number | null;
    readonly keRatioLow: number | null;
    readonly keRatioHigh: number | null;
    readonly unbalancePct: number | null;
    readonly speedRatio: number | null;
    readonly findings: StoredFinding[];
    readonly detail: Record<string, unknown>;
  } | undefined;
  readonly state: UnitStateView;
}

/** One unit of one site for the viewer, or undefined (no such unit, another site's, or not the viewer's). */
export async function getUnitView({
  db,
  viewer,
  siteId,
  unitId,
  nowMs = Date.now(),
}: {
  db: Db;
  viewer: Viewer;
  siteId: string;
  unitId: string;
  nowMs?: number;
}): Promise<UnitView | undefined> {
  if (!canSeeSite(viewer, siteId)) return undefined;
  const [row] = await db
    .select({ unit: units, site: { id: sites.id, name: sites.name, timezone: sites.timezone }, status: unitStatus, health: unitHealth })
    .from(units)
    .innerJoin(sites, eq(sites.id, units.siteId))
    .leftJoin(unitStatus, eq(unitStatus.unitKey, units.key))
    .leftJoin(unitHealth, eq(unitHealth.unitKey, units.key))
    .where(and(eq(units.id, unitId), eq(units.siteId, siteId)))
    .limit(1);
  if (row === undefined) return undefined;
  const lastSampleMs = row.status?.lastSampleTs?.getTime() ?? null;
  const h = row.health;
  const health =
    h === null
      ? undefined
      : {
          diagnosedAtMs: h.diagnosedAt.getTime(),
          windowFromMs: h.windowFrom.getTime(),
          windowToMs: h.windowTo.getTime(),
          verdict: h.verdict,
          samplesUsed: h.samplesUsed,
          keRatio: h.keRatio,
          keRatioLow: h.keRatioLow,
          keRatioHigh: h.keRatioHigh,
          unbalancePct: h.unbalancePct,
          speedRatio: h.speedRatio,
          findings: h.findings,
          detail: h.detail,
        };
  return {
    site: row.site,
    unit: row.unit,
    nameplate: nameplateOfUnit(row.unit),
    limits: resolveLimits(row.unit.diagnosis ?? undefined),
    lastSampleMs,
    presence: row.status?.presence ?? null,
    health,
    state: unitStateOf({ health, lastSampleMs, nowMs }),
  };
}

/** The check object of contract section 4 for the live diagnosis, plus when and over which samples. */
export interface UnitHealthReport {
  samplesUsed: number;
  keRatio: number | null;
  keRatioLow: number | null;
  keRatioHigh: number | null;
  unbalancePct: number | null;
  speedRatio: number | null;
  verdict: string;
  findings: Array<{ code: string; severity: string; message: string }>;
  diagnosedAt: string;
  windowFrom: string;
  windowTo: string;
}

/** `GET /api/v1/units/SITE/UNIT/health`: undefined when there is no such unit for the viewer or it was never diagnosed. */
export async function getUnitHealthReport({ db, viewer, siteId, unitId }: { db: Db; viewer: Viewer; siteId: string; unitId: string }): Promise<UnitHealthReport | undefined> {
  if (!canSeeSite(viewer, siteId)) return undefined;
  const [row] = await db
    .select({ health: unitHealth })
    .from(units)
    .innerJoin(unitHealth, eq(unitHealth.unitKey, units.key))
    .where(and(eq(units.id, unitId), eq(units.siteId, siteId)))
    .limit(1);
  if (row === undefined) return undefined;
  const h = row.health;
  return {
    samplesUsed: h.samplesUsed,
    keRatio: h.keRatio,
    keRatioLow: h.keRatioLow,
    keRatioHigh: h.keRatioHigh,
    unbalancePct: h.unbalancePct,
    speedRatio: h.speedRatio,
    verdict: h.verdict,
    findings: h.findings.map((f) => ({ code: f.code, severity: f.severity, message: f.message })),
    diagnosedAt: h.diagnosedAt.toISOString(),
    windowFrom: h.windowFrom.toISOString(),
    windowTo: h.windowTo.toISOString(),
  };
}

interface RawRow {
  ts_ms: number | string;
  rpm: number | null;
  hz: number | null;
  vab: number | null;
  vbc: number | null;
  vca: number | null;
  ia: number | null;
  ib: number | null;
  ic: number | null;
  kw: number | null;
  stator_c: number | null;
  ambient_c: number | null;
  wind_ms: number | null;
  flow_m3s: number | null;
}

/** Raw samples of one unit in a window of at most a day, time order. */
async function getRawWindow({ db, unitKey, fromMs, toMs }: { db: Db; unitKey: number; fromMs: number; toMs: number }): Promise<RawRow[]> {
  if (toMs - fromMs > MAX_RAW_WINDOW_MS) throw new RangeError(`raw telemetry is read at most ${MAX_RAW_WINDOW_MS} ms at a time, got ${toMs - fromMs}`);
  return rowsOf<RawRow>(
    await db.execute(sql`
      select (extract(epoch from ts) * 1000)::float8 as ts_ms, rpm, hz, vab, vbc, vca, ia, ib, ic, kw, stator_c, ambient_c, wind_ms, flow_m3s
      from telemetry_samples
      where unit_key = ${unitKey} and ts >= to_timestamp(${fromMs}::float8 / 1000.0) and ts <= to_timestamp(${toMs}::float8 / 1000.0)
      order by ts`),
  );
}

/** Fields of the unit screen's time charts. Rollups keep means of the three lines and phases, not each one. */
export const SERIES_FIELDS = {
  rpm: { label: 'Speed', unit: 'rpm' },
  hz: { label: 'Frequency', unit: 'Hz' },
  vab: { label: 'Line voltage A–B', unit: 'V' },
  vbc: { label: 'Line voltage B–C', unit: 'V' },
  vca: { label: 'Line voltage C–A', unit: 'V' },
  vll: { label: 'Line voltage, mean of lines', unit: 'V' },
  ia: { label: 'Current phase A', unit: 'A' },
  ib: { label: 'Current phase B', unit: 'A' },
  ic: { label: 'Current phase C', unit: 'A' },
  amps: { label: 'Current, mean of phases', unit: 'A' },
  kw: { label: 'Power', unit: 'kW' },
  statorC: { label: 'Stator temperature', unit: '°C' },
  ambientC: { label: 'Ambient temperature', unit: '°C' },
  resource: { label: 'Wind speed or water flow', unit: '' },
} as const;
export type SeriesField = keyof typeof SERIES_FIELDS;

/** The time series of one unit over a range, downsampled. */
export interface UnitSeries {
  readonly range: SeriesRange;
  readonly source: SeriesSource;
  readonly fromMs: number;
  readonly toMs: number;
  /** Samples (raw) or rollup rows read. */
  readonly rowsRead: number;
  /** Each field that has data: buckets with min, max and mean. */
  readonly series: Partial<Record<SeriesField, SeriesBucket[]>>;
}


/**
 * Speed, frequency, line voltages, currents, power and temperatures of one
 * unit over `range` up to `nowMs`: raw samples up to a day, 10-minute rollups
 * up to 30 days, daily rollups beyond; at most `maxPoints` buckets a series.
 */
export async function getUnitSeries({
  db,
  viewer,
  siteId,
  unitId,
  range,
  nowMs = Date.now(),
  maxPoints = DEFAULT_MAX_POINTS,
}: {
  db: Db;
  viewer: Viewer;
  siteId: string;
  unitId: string;
  range: SeriesRange;
  nowMs?: number;
  maxPoints?: number;
}): Promise<UnitSeries | undefined> {
  const spec = SERIES_RANGES[range];
  if (spec === undefined) throw new RangeError(`range must be one of ${SERIES_RANGE_KEYS.join(', ')}, got ${String(range)}`);
  const unitKey = await getVisibleUnitKey({ db, viewer, siteId, unitId });
  if (unitKey === undefined) return undefined;
  const fromMs = nowMs - spec.ms;
  const toMs = nowMs;
  // Buckets of equal time in the database, so that at most `maxPoints` rows a
  // series come back (a day of raw samples is 8,640 rows, 30 days of rollups
  // 4,320); downsampleSeries then merges nothing and only guards the bound.
  const widthMs = Math.max(1, Math.ceil(spec.ms / maxPoints));
  const raw = spec.source === 'raw';
  if (raw && toMs - fromMs > MAX_RAW_WINDOW_MS) throw new RangeError(`raw telemetry is read at most ${MAX_RAW_WINDOW_MS} ms at a time`);
  const fields = raw ? RAW_SERIES_COLUMNS : ROLLUP_SERIES_COLUMNS;
  const time = raw ? sql`ts` : sql`bucket_start`;
  const table = raw ? sql`telemetry_samples` : spec.source === 'rollup-10m' ? sql`telemetry_rollups_10m` : sql`telemetry_rollups_daily`;
  const aggregates = sql.join(
    (fields as ReadonlyArray<readonly [SeriesField, string | RollupColumns]>).map(([field, c]) =>
      typeof c === 'string'
        ? sql.raw(`min(${c}) as "${field}_min", max(${c}) as "${field}_max", sum(${c}) as "${field}_sum", count(${c}) as "${field}_n"`)
        : sql.raw(
            `min(${c.min}) as "${field}_min", max(${c.max}) as "${field}_max", sum(${c.sum}) as "${field}_sum", ` +
              `sum(case when ${c.sum} is null then 0 else ${c.count} end) as "${field}_n"`,
          ),
    ),
    sql`, `,
  );
  const rows = rowsOf<Record<string, number | string | null>>(
    await db.execute(sql`
      select floor((extract(epoch from ${time}) * 1000 - ${fromMs}::float8) / ${widthMs}::float8) as b,
             avg(extract(epoch from ${time}) * 1000)::float8 as t, count(*) as "rows", ${aggregates}
      from ${table}
      where unit_key = ${unitKey} and ${time} >= to_timestamp(${fromMs}::float8 / 1000.0) and ${time} <= to_timestamp(${toMs}::float8 / 1000.0)
      group by 1
      order by 1`),
  );
  const series: UnitSeries['series'] = {};
  for (const [field] of fields) {
    const points: SeriesPoint[] = [];
    for (const r of rows) {
      const n = Number(r[`${field}_n`] ?? 0);
      if (!(n > 0) || r[`${field}_min`] === null) continue;
      points.push({ t: Number(r.t), min: Number(r[`${field}_min`]), max: Number(r[`${field}_max`]), sum: Number(r[`${field}_sum`]), count: n });
    }
    if (points.length > 0) series[field] = downsampleSeries(points, { fromMs, toMs, maxPoints });
  }
  const rowsRead = rows.reduce((n, r) => n + Number(r.rows), 0);
  return { range, source: spec.source, fromMs, toMs, rowsRead, series };
}

/** Raw sample columns of each series field (the resource is wind speed or water flow, whichever the unit sends). */
const RAW_SERIES_COLUMNS: ReadonlyArray<readonly [SeriesField, string]> = [
  ['rpm', 'rpm'],
  ['hz', 'hz'],
  ['vab', 'vab'],
  ['vbc', 'vbc'],
  ['vca', 'vca'],
  ['ia', 'ia'],
  ['ib', 'ib'],
  ['ic', 'ic'],
  ['kw', 'kw'],
  ['statorC', 'stator_c'],
  ['ambientC', 'ambient_c'],
  ['resource', 'coalesce(wind_ms, flow_m3s)'],
];

/** Rollup columns of each series field: min, max, sum and the count the sum is over. */
interface RollupColumns {
  readonly min: string;
  readonly max: string;
  readonly sum: string;
  readonly count: string;
}
const ROLLUP_SERIES_COLUMNS: ReadonlyArray<readonly [SeriesField, RollupColumns]> = [
  ['rpm', { min: 'rpm_min', max: 'rpm_max', sum: 'rpm_sum', count: 'samples' }],
  ['vll', { min: 'vll_min', max: 'vll_max', sum: 'vll_sum', count: 'samples' }],
  ['amps', { min: 'amps_min', max: 'amps_max', sum: 'amps_sum', count: 'amps_count' }],
  ['kw', { min: 'kw_min', max: 'kw_max', sum: 'kw_sum', count: 'kw_count' }],
  ['statorC', { min: 'stator_c_min', max: 'stator_c_max', sum: 'stator_c_sum', count: 'stator_c_count' }],
  ['resource', { min: 'resource_min', max: 'resource_max', sum: 'resource_sum', count: 'resource_count' }],
];

/** The unit's key when the viewer may see it on that site. */
async function getVisibleUnitKey({ db, viewer, siteId, unitId }: { db: Db; viewer: Viewer; siteId: string; unitId: string }): Promise<number | undefined> {
  if (!canSeeSite(viewer, siteId)) return undefined;
  const [row] = await db
    .select({ key: units.key })
    .from(units)
    .where(and(eq(units.id, unitId), eq(units.siteId, siteId)))
    .limit(1);
  return row?.key;
}

/** Points of the voltage-against-speed chart. */
export const MAX_SCATTER_POINTS = 1500;

/** The voltage-against-speed evidence and the window it was drawn from. */
export interface UnitEmfView extends EmfChart {
  readonly fromMs: number;
  readonly toMs: number;
  /** Whether the window is the latest diagnosis's (else the last hours). */
  readonly diagnosisWindow: boolean;
  readonly samplesRead: number;
}

/**
 * Terminal voltage and corrected EMF against speed over the latest diagnosis's
 * window (at most a day; the last 6 hours when never diagnosed), thinned to
 * {@link MAX_SCATTER_POINTS}; speed from the frequency when the diagnosis judged the sensor faulty.
 */
export async function getUnitEmfView({ db, view, nowMs = Date.now() }: { db: Db; view: UnitView; nowMs?: number }): Promise<UnitEmfView> {
  const h = view.health;
  const toMs = h?.windowToMs ?? nowMs;
  const fromMs = Math.max(h?.windowFromMs ?? toMs - view.limits.windowHours * HOUR_MS, toMs - MAX_RAW_WINDOW_MS);
  const rows = await getRawWindow({ db, unitKey: view.unit.key, fromMs, toMs });
  const n = (v: number | null) => (v === null ? null : Number(v));
  const samples: EmfSample[] = rows.map((r) => ({
    ts: Number(r.ts_ms),
    rpm: n(r.rpm),
    hz: n(r.hz),
    vab: n(r.vab),
    vbc: n(r.vbc),
    vca: n(r.vca),
    ia: n(r.ia),
    ib: n(r.ib),
    ic: n(r.ic),
    kw: n(r.kw),
    statorC: n(r.stator_c),
    ambientC: n(r.ambient_c),
  }));
  const speedFrom = h?.detail?.speedSource === 'hz' ? 'hz' : 'rpm';
  const chart = emfChart({ nameplate: nameplateOfUnit(view.unit), samples: thinEvenly(samples, Math.max(2, MAX_SCATTER_POINTS)), speedFrom });
  return { ...chart, fromMs, toMs, diagnosisWindow: h !== undefined, samplesRead: rows.length };
}

/** One day of the Ke history. */
export interface KeDay {
  /** Noon UTC of the day, epoch ms. */
  readonly t: number;
  /** Median corrected Ke ratio of the day's diagnoses. */
  readonly ke: number;
  /** Lowest lower and highest upper bound of the day's 95 % intervals. */
  readonly low: number | null;
  readonly high: number | null;
  readonly diagnoses: number;
}

/** Days of Ke history the unit screen shows (the trend looks back as far). */
export const KE_HISTORY_DAYS = 180;

/** The corrected Ke ratio per day over the last {@link KE_HISTORY_DAYS} and its trend (lib/diagnosis/trend.ts). */
export async function getUnitKeHistory({
  db,
  view,
  nowMs = Date.now(),
}: {
  db: Db;
  view: UnitView;
  nowMs?: number;
}): Promise<{ days: KeDay[]; trend: KeTrend; fromMs: number }> {
  const fromMs = nowMs - KE_HISTORY_DAYS * DAY_MS;
  const rows = rowsOf<{ day: number | string; ke: number | string; low: number | null; high: number | null; n: number | string }>(
    await db.execute(sql`
      select floor(extract(epoch from diagnosed_at) / 86400)::float8 as day,
             percentile_cont(0.5) within group (order by ke_ratio) as ke,
             min(ke_ratio_low) as low, max(ke_ratio_high) as high, count(*) as n
      from unit_health_history
      where unit_key = ${view.unit.key} and diagnosed_at >= to_timestamp(${fromMs}::float8 / 1000.0)
        and ke_ratio is not null and verdict <> 'insufficient-data'
      group by 1
      order by 1`),
  );
  const days = rows.map((r) => ({
    t: (Number(r.day) + 0.5) * DAY_MS,
    ke: Number(r.ke),
    low: r.low === null ? null : Number(r.low),
    high: r.high === null ? null : Number(r.high),
    diagnoses: Number(r.n),
  }));
  const trend = keTrend(
    days.map((d) => ({ tsMs: d.t, keRatio: d.ke })),
    { thresholdRatio: view.limits.keAlarmRatio },
  );
  return { days, trend, fromMs };
}
