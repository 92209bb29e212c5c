/**
 * The alert evaluator: every few seconds, beside the live diagnosis and never
 * in the ingest path, it reads what is known of every unit (one statement),
 * reads each condition (lib/alerts/conditions.ts), and moves each alert along
 * its lifecycle (lib/alerts/lifecycle.ts), writing through lib/alerts/store.ts.
 * Its memory — since when each condition holds, for the on-delays — is in the
 * database (`alert_condition_states`), so a restart neither loses nor repeats
 * an alert, and two evaluators (two ingesters) write each change once.
 */
import { sql } from 'drizzle-orm';
import { z } from 'zod';
import { dbJson, dbNumber, dbNumberOrNull, parseRows, rowsOf, type Db } from '@/db/client';
import { alertConditionStates } from '@/db/schema';
import type { AlertCondition } from '@/lib/contract/alerts';
import { ALERT_CONDITIONS } from '@/lib/contract/alerts';
import { diagnosisLimitsSchema } from '@/lib/contract/nameplate';
import { resolveLimits, type ResolvedLimits } from '@/lib/diagnosis/limits';
import type { LivePublisher } from '@/lib/live/publisher';
import type { Logger } from '@/lib/log/logger';
import { readConditions, type ConditionReading, type UnitFacts } from './conditions';
import { openAlert, stepAlert } from './lifecycle';
import { CONDITION_TIMING, DEFAULT_ALERT_LIMITS, type AlertLimits } from './limits';
import { alertLifeOf, getOpenAlerts, insertAlert, updateAlert } from './store';
import type { UnitAlertRow } from '@/db/schema';
import { repeatEvery } from '@/lib/timing/repeat';

/** Seconds between evaluations (common practice: fast enough for an overspeed, light on the database). */
export const EVALUATE_EVERY_S = 15;

const factsRowSchema = z.object({
  key: dbNumber,
  id: z.string(),
  site_id: z.string(),
  max_rpm: dbNumber,
  registered_ms: dbNumber,
  diagnosis: dbJson(diagnosisLimitsSchema.nullable()),
  presence: z.enum(['online', 'offline']).nullable(),
  last_sample_ms: dbNumberOrNull,
  verdict: z.string().nullable(),
  ke_ratio: dbNumberOrNull,
  unbalance_pct: dbNumberOrNull,
  speed_ratio: dbNumberOrNull,
  findings: dbJson(z.array(z.object({ code: z.string(), severity: z.string(), message: z.string() })).nullable()),
  trend: dbJson(z.object({ crossingMs: z.number().optional() }).loose().nullable()),
  rpm_max: dbNumberOrNull,
  stator_c_max: dbNumberOrNull,
  set_aside: dbNumber,
});

/** One unit as the evaluator sees it. */
export interface UnitToJudge {
  readonly unitKey: number;
  readonly siteId: string;
  readonly unitId: string;
  readonly diag: ResolvedLimits;
  readonly facts: UnitFacts;
}

/** What every unit looks like now: status, latest diagnosis, the last 10 minutes' rollups, telemetry set aside. */
export async function readUnitsToJudge({ db, nowMs }: { db: Db; nowMs: number }): Promise<UnitToJudge[]> {
  const now = sql`to_timestamp(${nowMs}::float8 / 1000.0)`;
  const rows = parseRows(
    'alert facts',
    factsRowSchema,
    await db.execute(sql`
      select u.key, u.id, u.site_id, u.max_rpm, u.diagnosis, (extract(epoch from u.created_at) * 1000)::float8 as registered_ms,
             st.presence::text as presence, (extract(epoch from st.last_sample_ts) * 1000)::float8 as last_sample_ms,
             h.verdict::text as verdict, h.ke_ratio, h.unbalance_pct, h.speed_ratio, h.findings, h.trend,
             r.rpm_max, r.stator_c_max, coalesce(q.n, 0)::int as set_aside
      from units u
      left join unit_status st on st.unit_key = u.key
      left join unit_health h on h.unit_key = u.key
      left join lateral (
        select max(x.rpm_max) as rpm_max, max(x.stator_c_max) as stator_c_max from telemetry_rollups_10m x
        where x.unit_key = u.key and x.bucket_start > ${now} - interval '20 minutes' and x.bucket_start <= ${now}
      ) r on true
      left join (
        select site_id, unit_id, count(*) as n from quarantine
        where received_at > ${now} - interval '10 minutes' and unit_id is not null
        group by site_id, unit_id
      ) q on q.site_id = u.site_id and q.unit_id = u.id
      order by u.key`),
  );
  return rows.map((r) => ({
    unitKey: r.key,
    siteId: r.site_id,
    unitId: r.id,
    diag: resolveLimits(r.diagnosis ?? undefined),
    facts: {
      nowMs,
      maxRpm: r.max_rpm,
      lastSampleMs: r.last_sample_ms,
      registeredMs: r.registered_ms,
      presence: r.presence,
      health:
        r.verdict === null
          ? undefined
          : { verdict: r.verdict, keRatio: r.ke_ratio, unbalancePct: r.unbalance_pct, speedRatio: r.speed_ratio, findings: r.findings ?? [], crossingMs: r.trend?.crossingMs },
      latest: { rpmMax: r.rpm_max, statorCMax: r.stator_c_max },
      setAsideLast10Min: r.set_aside,
    },
  }));
}

type Key = `${number}/${AlertCondition}`;
const keyOf = (unitKey: number, condition: AlertCondition): Key => `${unitKey}/${condition}`;

/** Since when each condition holds, as the last evaluation left it. */
async function readHoldsSince(db: Db): Promise<Map<Key, number>> {
  const rows = rowsOf<{ unit_key: number; condition: AlertCondition; holds_ms: number | string }>(
    await db.execute(sql`select unit_key, condition::text as condition, (extract(epoch from holds_since) * 1000)::float8 as holds_ms
      from alert_condition_states where holds_since is not null`),
  );
  return new Map(rows.map((r) => [keyOf(Number(r.unit_key), r.condition), Number(r.holds_ms)]));
}

/** Stores the conditions whose holding changed (a start, or an end). */
async function writeHoldsSince(db: Db, changed: ReadonlyArray<{ unitKey: number; condition: AlertCondition; holdsSinceMs: number | null; value: number | null }>, nowMs: number): Promise<void> {
  if (changed.length === 0) return;
  await db
    .insert(alertConditionStates)
    .values(changed.map((c) => ({ unitKey: c.unitKey, condition: c.condition, holdsSince: c.holdsSinceMs === null ? null : new Date(c.holdsSinceMs), lastValue: c.value, evaluatedAt: new Date(nowMs) })))
    .onConflictDoUpdate({
      target: [alertConditionStates.unitKey, alertConditionStates.condition],
      set: { holdsSince: sql`excluded.holds_since`, lastValue: sql`excluded.last_value`, evaluatedAt: sql`excluded.evaluated_at` },
    });
}

export interface EvaluationReport {
  units: number;
  opened: number;
  changed: number;
  elapsedMs: number;
}

function readingChanged(row: UnitAlertRow, reading: ConditionReading): boolean {
  return row.message !== reading.message || row.value !== reading.value || row.limitValue !== reading.limit || row.severity !== reading.severity;
}

interface PassContext {
  db: Db;
  nowMs: number;
  baseUrl: string;
  open: Map<Key, UnitAlertRow>;
  report: EvaluationReport;
  changedUnits: Set<UnitToJudge>;
}

/** One condition of one unit: open its alert past the on-delay, or move the open one along. */
async function judgeReading(ctx: PassContext, unit: UnitToJudge, reading: ConditionReading, holdsSinceMs: number | null): Promise<void> {
  const timing = CONDITION_TIMING[reading.condition];
  const row = ctx.open.get(keyOf(unit.unitKey, reading.condition));
  const opening = { severity: reading.severity, message: reading.message, value: reading.value, limit: reading.limit };
  if (row === undefined) {
    if (!reading.holds || holdsSinceMs === null || ctx.nowMs - holdsSinceMs < timing.onDelayMs) return;
    const made = await insertAlert({ db: ctx.db, opening: { unitKey: unit.unitKey, condition: reading.condition, ...opening }, step: openAlert(ctx.nowMs), nowMs: ctx.nowMs, baseUrl: ctx.baseUrl });
    if (made) {
      ctx.report.opened++;
      ctx.changedUnits.add(unit);
    }
    return;
  }
  const next = (life: ReturnType<typeof alertLifeOf>) => stepAlert(life, { holds: reading.holds, nowMs: ctx.nowMs, holdOffMs: timing.holdOffMs });
  const preview = next(alertLifeOf(row));
  const moved = preview.changes.length > 0 || preview.life.goneSinceMs !== alertLifeOf(row).goneSinceMs;
  if (!moved && !(reading.holds && readingChanged(row, reading))) return;
  const done = await updateAlert({ db: ctx.db, alertId: row.id, next, reading: reading.holds ? opening : undefined, actor: { label: 'evaluator' }, nowMs: ctx.nowMs, baseUrl: ctx.baseUrl });
  if (done && done.changes.length > 0) {
    ctx.report.changed++;
    ctx.changedUnits.add(unit);
  }
}

/**
 * One evaluation of every unit at `nowMs`. Alerts open when a condition has held past its
 * on-delay, clear after its hold-off, and re-open when it returns within it.
 */
export async function evaluateAlerts({
  db,
  nowMs,
  limits = DEFAULT_ALERT_LIMITS,
  baseUrl = '',
  live,
}: {
  db: Db;
  nowMs: number;
  limits?: AlertLimits;
  baseUrl?: string;
  live?: LivePublisher;
}): Promise<EvaluationReport> {
  const started = Date.now();
  const [units, holdsSince, openRows] = await Promise.all([readUnitsToJudge({ db, nowMs }), readHoldsSince(db), getOpenAlerts({ db })]);
  const ctx: PassContext = { db, nowMs, baseUrl, open: new Map(openRows.map((r) => [keyOf(r.unitKey, r.condition), r])), report: { units: units.length, opened: 0, changed: 0, elapsedMs: 0 }, changedUnits: new Set() };
  const changedHolds: Array<{ unitKey: number; condition: AlertCondition; holdsSinceMs: number | null; value: number | null }> = [];
  for (const unit of units) {
    const was = new Set(ALERT_CONDITIONS.filter((c) => holdsSince.has(keyOf(unit.unitKey, c))));
    for (const reading of readConditions(unit.facts, limits, unit.diag, was)) {
      const before = holdsSince.get(keyOf(unit.unitKey, reading.condition)) ?? null;
      const since = reading.holds ? (before ?? nowMs) : null;
      if (since !== before) changedHolds.push({ unitKey: unit.unitKey, condition: reading.condition, holdsSinceMs: since, value: reading.value });
      await judgeReading(ctx, unit, reading, since);
    }
  }
  await writeHoldsSince(db, changedHolds, nowMs);
  live?.publish([...ctx.changedUnits].map((u) => ({ type: 'alert' as const, siteId: u.siteId, unitId: u.unitId })));
  return { ...ctx.report, elapsedMs: Date.now() - started };
}

/** Runs evaluateAlerts every `intervalS` until stopped; a failed pass is logged and the next one runs. */
export function startAlertEvaluator({
  db,
  log,
  live,
  intervalS = EVALUATE_EVERY_S,
  baseUrl,
  clock = () => Date.now(),
  onChanges,
}: {
  db: Db;
  log: Logger;
  live?: LivePublisher;
  intervalS?: number;
  baseUrl?: string;
  clock?: () => number;
  /** Called after a pass that changed an alert (the webhook loop's kick). */
  onChanges?: () => void;
}): () => Promise<void> {
  if (!(intervalS > 0)) throw new RangeError(`intervalS must be above 0, got ${intervalS}`);
  return repeatEvery(
    () => intervalS * 1000,
    async () => {
      try {
        const r = await evaluateAlerts({ db, nowMs: clock(), baseUrl, live });
        if (r.opened + r.changed > 0) {
          log.info('alert evaluation', { ...r });
          onChanges?.();
        }
      } catch (error) {
        log.error('alert evaluation failed', { error });
      }
    },
  );
}
