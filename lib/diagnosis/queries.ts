/**
 * Data access of the live diagnosis: which units are due, a bounded window of
 * each one's samples, its recent history for the trend, and the write of
 * latest health plus history in one transaction.
 */
import { sql } from 'drizzle-orm';
import { rowsOf, type Db } from '@/db/client';
import { unitHealth, unitHealthHistory, type NewUnitHealthHistoryRow, type NewUnitHealthRow } from '@/db/schema';
import { diagnosisLimitsSchema, MAGNET_MATERIALS, type DiagnosisLimits, type MagnetMaterial } from '@/lib/contract/nameplate';
import { VERDICTS, type DiagnosisNameplate, type DiagnosisResult, type Verdict } from './diagnose';
import { SampleColumns } from './sample-columns';
import type { KeHistoryPoint, KeTrend } from './trend';

/** A unit whose newest samples have not been diagnosed yet. */
export interface UnitDue {
  readonly unitKey: number;
  readonly unitId: string;
  readonly siteId: string;
  readonly nameplate: DiagnosisNameplate;
  /** Newest sample time the ingester stored, epoch ms. */
  readonly lastSampleMs: number;
  /** Verdict of the unit's latest stored diagnosis, if any. */
  readonly lastVerdict?: Verdict;
  /** When the stored limits failed their schema: the reason (the defaults are used). */
  readonly limitsProblem?: string;
}

interface DueRow {
  unit_key: number;
  unit_id: string;
  site_id: string;
  rated_rpm: number;
  max_rpm: number;
  poles: number;
  ke_v_per_krpm: number;
  ke_ref_c: number;
  magnet: string;
  magnet_temp_coeff_pct_per_c: number | null;
  phase_ohm: number;
  phase_mh: number;
  diagnosis: unknown;
  last_sample_ms: number | string;
  last_verdict: string | null;
}

/**
 * Units with samples newer than their latest diagnosis: the newest sample is
 * past the window that diagnosis read, or samples (perhaps older ones) were
 * received after it ran. Units never diagnosed are due once they have samples.
 */
export async function getUnitsDueForDiagnosis({ db }: { db: Db }): Promise<UnitDue[]> {
  const rows = rowsOf<DueRow>(
    await db.execute(sql`
      select u.key as unit_key, u.id as unit_id, u.site_id, u.rated_rpm, u.max_rpm, u.poles, u.ke_v_per_krpm, u.ke_ref_c,
             u.magnet::text as magnet, u.magnet_temp_coeff_pct_per_c, u.phase_ohm, u.phase_mh, u.diagnosis,
             (extract(epoch from s.last_sample_ts) * 1000)::float8 as last_sample_ms, h.verdict::text as last_verdict
      from units u
      join unit_status s on s.unit_key = u.key
      left join unit_health h on h.unit_key = u.key
      where s.last_sample_ts is not null
        and (h.unit_key is null or s.last_sample_ts > h.window_to or s.last_received_at > h.diagnosed_at)
      order by u.key`),
  );
  return rows.map((r) => {
    let limits: DiagnosisLimits | undefined;
    let limitsProblem: string | undefined;
    if (r.diagnosis !== null && r.diagnosis !== undefined) {
      const parsed = diagnosisLimitsSchema.safeParse(typeof r.diagnosis === 'string' ? JSON.parse(r.diagnosis) : r.diagnosis);
      if (parsed.success) limits = parsed.data;
      else limitsProblem = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ');
    }
    if (!(MAGNET_MATERIALS as readonly string[]).includes(r.magnet)) {
      throw new RangeError(`unit ${r.unit_id}: magnet must be one of ${MAGNET_MATERIALS.join(', ')}, got ${r.magnet}`);
    }
    return {
      unitKey: Number(r.unit_key),
      unitId: r.unit_id,
      siteId: r.site_id,
      lastSampleMs: Number(r.last_sample_ms),
      ...(limitsProblem === undefined ? {} : { limitsProblem }),
      ...(r.last_verdict !== null && (VERDICTS as readonly string[]).includes(r.last_verdict) ? { lastVerdict: r.last_verdict as Verdict } : {}),
      nameplate: {
        ratedRpm: Number(r.rated_rpm),
        maxRpm: Number(r.max_rpm),
        poles: Number(r.poles),
        keVPerKrpm: Number(r.ke_v_per_krpm),
        keRefC: Number(r.ke_ref_c),
        magnet: r.magnet as MagnetMaterial,
        magnetTempCoeffPctPerC: r.magnet_temp_coeff_pct_per_c === null ? undefined : Number(r.magnet_temp_coeff_pct_per_c),
        phaseOhm: Number(r.phase_ohm),
        phaseMh: Number(r.phase_mh),
        diagnosis: limits,
      },
    };
  });
}

/** The time window of one unit to read, epoch ms (both ends included). */
export interface SampleWindow {
  readonly unitKey: number;
  readonly fromMs: number;
  readonly toMs: number;
}

/** A row of the sample-window query, as the database returns it. */
interface SampleWindowRow {
  unit_key: number;
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
}

/**
 * The samples of several units in their windows, at most `maxSamples` per unit
 * (the newest), in one statement: a lateral index scan per unit on the
 * (unit_key, ts) key, pruned to the partitions the window touches.
 */
export async function getSampleWindowsByUnitKeys({
  db,
  windows,
  maxSamples,
}: {
  db: Db;
  windows: readonly SampleWindow[];
  maxSamples: number;
}): Promise<Map<number, SampleColumns>> {
  if (!Number.isInteger(maxSamples) || maxSamples < 1) throw new RangeError(`maxSamples must be a whole number of at least 1, got ${maxSamples}`);
  const result = new Map<number, SampleColumns>();
  if (windows.length === 0) return result;
  const rows = rowsOf<SampleWindowRow>(
    await db.execute(sql`
      select w.k as unit_key, (extract(epoch from t.ts) * 1000)::float8 as ts_ms,
             t.rpm, t.hz, t.vab, t.vbc, t.vca, t.ia, t.ib, t.ic, t.kw, t.stator_c, t.ambient_c
      from unnest(${sql.param(windows.map((w) => w.unitKey))}::int4[],
                  ${sql.param(windows.map((w) => w.fromMs))}::float8[],
                  ${sql.param(windows.map((w) => w.toMs))}::float8[]) as w(k, from_ms, to_ms)
      cross join lateral (
        select s.ts, s.rpm, s.hz, s.vab, s.vbc, s.vca, s.ia, s.ib, s.ic, s.kw, s.stator_c, s.ambient_c
        from telemetry_samples s
        where s.unit_key = w.k and s.ts >= to_timestamp(w.from_ms / 1000.0) and s.ts <= to_timestamp(w.to_ms / 1000.0)
        order by s.ts desc
        limit ${maxSamples}
      ) t`),
  );
  const counts = new Map<number, number>();
  for (const r of rows) counts.set(Number(r.unit_key), (counts.get(Number(r.unit_key)) ?? 0) + 1);
  for (const [key, count] of counts) result.set(key, new SampleColumns(count));
  // Rows come newest first; walking them backwards stores each unit in time order.
  for (let i = rows.length - 1; i >= 0; i--) {
    const r = rows[i] as SampleWindowRow;
    (result.get(Number(r.unit_key)) as SampleColumns).push({
      ts: Number(r.ts_ms),
      rpm: r.rpm,
      hz: r.hz,
      vab: r.vab,
      vbc: r.vbc,
      vca: r.vca,
      ia: r.ia,
      ib: r.ib,
      ic: r.ic,
      kw: r.kw,
      statorC: r.stator_c,
      ambientC: r.ambient_c,
    });
  }
  return result;
}

/** Time of each unit's newest history row, epoch ms (units without history are absent). */
export async function getLastHistoryTimesByUnitKeys({ db, unitKeys }: { db: Db; unitKeys: readonly number[] }): Promise<Map<number, number>> {
  if (unitKeys.length === 0) return new Map();
  // A correlated max per unit walks the (unit_key, diagnosed_at) index backwards: one row each.
  const rows = rowsOf<{ unit_key: number; last_ms: number | string | null }>(
    await db.execute(sql`
      select k as unit_key,
             (select (extract(epoch from max(h.diagnosed_at)) * 1000)::float8 from unit_health_history h where h.unit_key = k) as last_ms
      from unnest(${sql.param([...unitKeys])}::int4[]) as k`),
  );
  const result = new Map<number, number>();
  for (const r of rows) if (r.last_ms !== null) result.set(Number(r.unit_key), Number(r.last_ms));
  return result;
}

/**
 * Daily median Ke ratios of units' history since `fromMs`, the input of the
 * trend (one point per UTC day; diagnoses without a ratio left out).
 */
export async function getKeHistoryByUnitKeys({
  db,
  unitKeys,
  fromMs,
}: {
  db: Db;
  unitKeys: readonly number[];
  fromMs: number;
}): Promise<Map<number, KeHistoryPoint[]>> {
  const result = new Map<number, KeHistoryPoint[]>();
  if (unitKeys.length === 0) return result;
  const rows = rowsOf<{ unit_key: number; day: number | string; ke: number | string }>(
    await db.execute(sql`
      select unit_key, floor(extract(epoch from diagnosed_at) / 86400)::float8 as day,
             percentile_cont(0.5) within group (order by ke_ratio) as ke
      from unit_health_history
      where unit_key = any(${sql.param([...unitKeys])}::int4[])
        and diagnosed_at >= to_timestamp(${fromMs} / 1000.0)
        and ke_ratio is not null and verdict <> 'insufficient-data'
      group by 1, 2
      order by 1, 2`),
  );
  for (const r of rows) {
    const key = Number(r.unit_key);
    const list = result.get(key) ?? [];
    // Noon of the day keeps the point inside its UTC day.
    list.push({ tsMs: (Number(r.day) + 0.5) * 86_400_000, keRatio: Number(r.ke) });
    result.set(key, list);
  }
  return result;
}

/** One unit's diagnosis to store. */
export interface HealthWrite {
  readonly unitKey: number;
  readonly diagnosedAtMs: number;
  readonly windowFromMs: number;
  readonly windowToMs: number;
  readonly result: DiagnosisResult;
  /** Also append a history row. */
  readonly history: boolean;
  /** A fresh trend; undefined keeps the stored one. */
  readonly trend?: KeTrend;
}

/** JSON form of a trend: times as ISO-8601, absent values null. */
export function trendForStorage(trend: KeTrend): Record<string, unknown> {
  const iso = (ms: number | undefined) => (ms === undefined ? null : new Date(ms).toISOString());
  const n = (v: number | undefined) => (v === undefined ? null : v);
  return {
    status: trend.status,
    days: trend.days,
    spanDays: trend.spanDays,
    slopePctPerMonth: n(trend.slopePctPerMonth),
    slopeLowPctPerMonth: n(trend.slopeLowPctPerMonth),
    slopeHighPctPerMonth: n(trend.slopeHighPctPerMonth),
    level: n(trend.level),
    ewma: n(trend.ewma),
    baseline: n(trend.baseline),
    thresholdRatio: trend.thresholdRatio,
    cusumAlarmAt: iso(trend.cusumAlarmMs),
    crossingAt: iso(trend.crossingMs),
    crossingEarliestAt: iso(trend.crossingEarliestMs),
    crossingLatestAt: iso(trend.crossingLatestMs),
  };
}

function healthValues(w: HealthWrite): NewUnitHealthHistoryRow {
  const r = w.result;
  return {
    unitKey: w.unitKey,
    diagnosedAt: new Date(w.diagnosedAtMs),
    windowFrom: new Date(w.windowFromMs),
    windowTo: new Date(w.windowToMs),
    verdict: r.verdict,
    samplesUsed: r.samplesUsed,
    keRatio: r.keRatio,
    keRatioLow: r.keRatioLow,
    keRatioHigh: r.keRatioHigh,
    unbalancePct: r.unbalancePct,
    speedRatio: r.speedRatio,
    findings: r.findings.map((f) => ({ code: f.code, severity: f.severity, message: f.message })),
    detail: r.details as unknown as Record<string, unknown>,
  };
}

/** Rows per insert statement: about 14 parameters a row keeps well under PostgreSQL's 65,535. */
const WRITE_CHUNK = 500;

/** Writes the latest health of every unit in `writes`, and their history rows, in one transaction. */
export async function upsertUnitHealthBatch({ db, writes }: { db: Db; writes: readonly HealthWrite[] }): Promise<void> {
  if (writes.length === 0) return;
  await db.transaction(async (tx) => {
    for (let start = 0; start < writes.length; start += WRITE_CHUNK) {
      const chunk = writes.slice(start, start + WRITE_CHUNK);
      const latest: NewUnitHealthRow[] = chunk.map((w) => ({
        ...healthValues(w),
        trend: w.trend === undefined ? null : trendForStorage(w.trend),
      }));
      await tx
        .insert(unitHealth)
        .values(latest)
        .onConflictDoUpdate({
          target: unitHealth.unitKey,
          set: {
            diagnosedAt: sql`excluded.diagnosed_at`,
            windowFrom: sql`excluded.window_from`,
            windowTo: sql`excluded.window_to`,
            verdict: sql`excluded.verdict`,
            samplesUsed: sql`excluded.samples_used`,
            keRatio: sql`excluded.ke_ratio`,
            keRatioLow: sql`excluded.ke_ratio_low`,
            keRatioHigh: sql`excluded.ke_ratio_high`,
            unbalancePct: sql`excluded.unbalance_pct`,
            speedRatio: sql`excluded.speed_ratio`,
            findings: sql`excluded.findings`,
            detail: sql`excluded.detail`,
            trend: sql`coalesce(excluded.trend, ${unitHealth.trend})`,
          },
        });
      const history = chunk.filter((w) => w.history).map(healthValues);
      if (history.length > 0) await tx.insert(unitHealthHistory).values(history);
    }
  });
}
