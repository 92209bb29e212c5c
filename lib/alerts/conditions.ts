/**
 * The conditions of contract section 7 read from what the product knows of a
 * unit now: its latest diagnosis (verdict, findings, Ke trend), its newest
 * 10-minute rollup (highest speed and stator temperature), its link state and
 * the telemetry set aside from it. Pure: the evaluator gathers the facts.
 * A numeric condition that holds keeps holding until the value is back past
 * its deadband, so a value hovering at the line does not come and go.
 */
import type { AlertCondition } from '@/lib/contract/alerts';
import { splitFindingMessage } from '@/lib/diagnosis/findings';
import type { ResolvedLimits } from '@/lib/diagnosis/limits';
import { statorLimitC, type AlertLimits } from './limits';

export type AlertSeverity = 'info' | 'warning' | 'alarm';

/** What the evaluator knows of one unit at `nowMs`. */
export interface UnitFacts {
  readonly nowMs: number;
  readonly maxRpm: number;
  readonly lastSampleMs: number | null;
  /** When the unit was registered: one that never sent a sample is offline only once the offline time has passed since. */
  readonly registeredMs: number;
  readonly presence: 'online' | 'offline' | null;
  /** The latest diagnosis, if any. */
  readonly health?: {
    readonly verdict: string;
    readonly keRatio: number | null;
    readonly unbalancePct: number | null;
    readonly speedRatio: number | null;
    readonly findings: ReadonlyArray<{ code: string; severity: string; message: string }>;
    /** Projected crossing of the Ke alarm line, if the trend declines. */
    readonly crossingMs?: number;
  };
  /** The newest 10-minute rollup, if it is recent. */
  readonly latest?: { readonly rpmMax: number | null; readonly statorCMax: number | null };
  /** Messages and samples of this unit set aside in the last 10 minutes. */
  readonly setAsideLast10Min: number;
}

/** One condition as read now. */
export interface ConditionReading {
  readonly condition: AlertCondition;
  readonly holds: boolean;
  readonly severity: AlertSeverity;
  readonly value: number | null;
  readonly limit: number | null;
  /** Plain words with the reading and the line. */
  readonly message: string;
}

const DAY_MS = 86_400_000;
const fmt = (n: number, digits: number) => n.toFixed(digits);

/** The observation of the diagnosis's own finding of that code (its words, without next steps and caution). */
function findingWords(facts: UnitFacts, codes: readonly string[]): { words: string; severity: AlertSeverity } | undefined {
  const f = facts.health?.findings.find((x) => codes.includes(x.code) && (x.severity === 'alarm' || x.severity === 'warning'));
  return f ? { words: splitFindingMessage(f.message).observation, severity: f.severity as AlertSeverity } : undefined;
}

function overspeed(facts: UnitFacts, limits: AlertLimits, was: boolean): ConditionReading {
  const rpm = facts.latest?.rpmMax ?? null;
  const line = was ? facts.maxRpm * (1 - limits.overspeedDeadbandFraction) : facts.maxRpm;
  const holds = rpm !== null && rpm > line;
  return {
    condition: 'overspeed',
    holds,
    severity: 'alarm',
    value: rpm,
    limit: facts.maxRpm,
    message: `Speed reached ${rpm === null ? '–' : fmt(rpm, 0)} rpm in the last 10 minutes; the overspeed limit is ${fmt(facts.maxRpm, 0)} rpm.`,
  };
}

function statorTemperature(facts: UnitFacts, limits: AlertLimits, was: boolean): ConditionReading {
  const c = facts.latest?.statorCMax ?? null;
  const limit = statorLimitC(limits);
  const holds = c !== null && c > (was ? limit - limits.statorDeadbandK : limit);
  return {
    condition: 'stator-temperature',
    holds,
    severity: 'alarm',
    value: c,
    limit,
    message: `Stator temperature reached ${c === null ? '–' : fmt(c, 0)} °C; the line is ${fmt(limit, 0)} °C (insulation class ${limits.insulationClass} less ${limits.statorMarginK} K).`,
  };
}

function offline(facts: UnitFacts, limits: AlertLimits): ConditionReading {
  const silentMs = facts.lastSampleMs === null ? null : facts.nowMs - facts.lastSampleMs;
  const neverSent = silentMs === null && facts.nowMs - facts.registeredMs > limits.offlineAfterMs;
  const holds = facts.presence === 'offline' || neverSent || (silentMs !== null && silentMs > limits.offlineAfterMs);
  const minutes = silentMs === null ? null : Math.floor(silentMs / 60_000);
  return {
    condition: 'offline',
    holds,
    severity: 'warning',
    value: minutes,
    limit: limits.offlineAfterMs / 60_000,
    message:
      silentMs === null
        ? `The unit has sent no sample since it was registered ${Math.floor((facts.nowMs - facts.registeredMs) / 60_000)} minutes ago.`
        : facts.presence === 'offline'
          ? `The unit's link reports offline; last sample ${minutes} minutes ago.`
          : `No sample for ${minutes} minutes (offline after ${limits.offlineAfterMs / 60_000}).`,
  };
}

function badTelemetry(facts: UnitFacts, limits: AlertLimits): ConditionReading {
  const n = facts.setAsideLast10Min;
  return {
    condition: 'bad-telemetry',
    holds: n >= limits.badTelemetryCount,
    severity: 'warning',
    value: n,
    limit: limits.badTelemetryCount,
    message: `${n} of the unit's messages or samples were set aside in the last 10 minutes (${limits.badTelemetryCount} or more raise this); Data quality shows why.`,
  };
}

function fromVerdict(
  facts: UnitFacts,
  condition: AlertCondition,
  verdict: string,
  codes: readonly string[],
  reading: { value: number | null; limit: number | null; fallback: string },
): ConditionReading {
  const found = findingWords(facts, codes);
  const byVerdict = facts.health?.verdict === verdict;
  return {
    condition,
    holds: byVerdict || found !== undefined,
    severity: byVerdict ? 'alarm' : (found?.severity ?? 'warning'),
    value: reading.value,
    limit: reading.limit,
    message: found?.words ?? reading.fallback,
  };
}

function keTrend(facts: UnitFacts, limits: AlertLimits, diag: ResolvedLimits): ConditionReading {
  const crossing = facts.health?.crossingMs;
  const days = crossing === undefined ? null : Math.max(0, Math.round((crossing - facts.nowMs) / DAY_MS));
  return {
    condition: 'ke-trend',
    holds: days !== null && days <= limits.keTrendDays,
    severity: 'warning',
    value: days,
    limit: limits.keTrendDays,
    message:
      days === null
        ? 'The corrected Ke ratio is not projected to cross its alarm line.'
        : `The corrected Ke ratio is projected to cross its alarm line (${fmt(diag.keAlarmRatio, 2)} of nameplate) in about ${days} days.`,
  };
}

/**
 * Every condition of the unit as read now. `wasHolding` says which held at the last
 * evaluation: their deadbands apply.
 */
export function readConditions(
  facts: UnitFacts,
  limits: AlertLimits,
  diag: ResolvedLimits,
  wasHolding: ReadonlySet<AlertCondition>,
): ConditionReading[] {
  const h = facts.health;
  return [
    overspeed(facts, limits, wasHolding.has('overspeed')),
    statorTemperature(facts, limits, wasHolding.has('stator-temperature')),
    offline(facts, limits),
    badTelemetry(facts, limits),
    fromVerdict(facts, 'demagnetisation', 'demagnetised', ['demagnetised', 'ke-low'], {
      value: h?.keRatio ?? null,
      limit: diag.keAlarmRatio,
      fallback: `The corrected Ke ratio is ${h?.keRatio == null ? '–' : fmt(h.keRatio, 3)} of nameplate; the alarm line is ${fmt(diag.keAlarmRatio, 2)}.`,
    }),
    fromVerdict(facts, 'shorted-turns', 'shorted-turns', ['shorted-turns'], {
      value: h?.unbalancePct ?? null,
      limit: diag.unbalanceAlarmPct,
      fallback: `Line-voltage unbalance is ${h?.unbalancePct == null ? '–' : fmt(h.unbalancePct, 2)} %; the alarm line is ${fmt(diag.unbalanceAlarmPct, 1)} %.`,
    }),
    fromVerdict(facts, 'speed-sensor', 'speed-sensor-fault', ['speed-sensor-fault'], {
      value: h?.speedRatio ?? null,
      limit: 1 + diag.speedRatioTolerance,
      fallback: `The speed sensor and the terminal frequency disagree (ratio ${h?.speedRatio == null ? '–' : fmt(h.speedRatio, 3)}).`,
    }),
    keTrend(facts, limits, diag),
    {
      condition: 'nameplate-suspect',
      holds: h?.verdict === 'nameplate-suspect',
      severity: 'warning',
      value: h?.keRatio ?? null,
      limit: null,
      message: findingWords(facts, ['nameplate-suspect'])?.words ?? 'The readings suggest the nameplate was entered wrong: check it in the office before anyone is sent.',
    },
  ];
}
