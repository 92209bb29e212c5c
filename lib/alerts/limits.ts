/**
 * The lines each alert condition is judged against, and how long it must hold
 * or be gone: per unit, the machine's own limits first (its nameplate's
 * overspeed limit, its diagnosis limits), then the defaults below. A deadband
 * and an on-delay keep a value hovering at a line from raising fifty alerts;
 * the hold-off keeps a condition that comes and goes to one alert.
 */
import type { AlertCondition } from '@/lib/contract/alerts';

export interface ConditionTiming {
  /** The condition must hold this long before an alert opens, ms. */
  readonly onDelayMs: number;
  /** An alert clears once its condition has been gone this long, ms (a return within it re-opens it). */
  readonly holdOffMs: number;
}

/**
 * On-delays and hold-offs, common practice with no published source: overspeed at once (a
 * machine past its limit is dangerous now); a temperature after a minute above; the
 * diagnosis-based conditions at once (each diagnosis already reads hours of samples).
 */
export const CONDITION_TIMING: Record<AlertCondition, ConditionTiming> = {
  overspeed: { onDelayMs: 0, holdOffMs: 10 * 60_000 },
  'stator-temperature': { onDelayMs: 60_000, holdOffMs: 10 * 60_000 },
  offline: { onDelayMs: 0, holdOffMs: 5 * 60_000 },
  'bad-telemetry': { onDelayMs: 0, holdOffMs: 30 * 60_000 },
  demagnetisation: { onDelayMs: 0, holdOffMs: 60 * 60_000 },
  'shorted-turns': { onDelayMs: 0, holdOffMs: 60 * 60_000 },
  'speed-sensor': { onDelayMs: 0, holdOffMs: 60 * 60_000 },
  'ke-trend': { onDelayMs: 0, holdOffMs: 24 * 3_600_000 },
  'nameplate-suspect': { onDelayMs: 0, holdOffMs: 60 * 60_000 },
};

/**
 * Thermal classes of electrical insulation, °C (IEC 60085: 130 B, 155 F, 180 H; from memory).
 * A stator sensor reads below the winding's hot spot, so the alert line sits a margin under the class.
 */
export const INSULATION_CLASS_C = { B: 130, F: 155, H: 180 } as const;
export type InsulationClass = keyof typeof INSULATION_CLASS_C;

export interface AlertLimits {
  /** Insulation class of the stator winding (default F, the usual class of small generators; common practice). */
  readonly insulationClass: InsulationClass;
  /** Kelvin the stator alert sits below the class temperature: sensor-to-hot-spot margin (common practice, from memory: 15–25 K). */
  readonly statorMarginK: number;
  /** Kelvin a stator temperature must fall below its line before the condition is gone. */
  readonly statorDeadbandK: number;
  /** Fraction of maxRpm the speed must fall below maxRpm before an overspeed is gone (common practice: 2 %). */
  readonly overspeedDeadbandFraction: number;
  /** Messages set aside in the last 10 minutes that make `bad-telemetry` hold (our choice: three, so one stray message is not an alert). */
  readonly badTelemetryCount: number;
  /** A projected Ke crossing within this many days raises `ke-trend` (common practice: a season ahead, 90 days). */
  readonly keTrendDays: number;
  /** No sample for this long, or presence offline, is `offline`, ms (the screens' offline time). */
  readonly offlineAfterMs: number;
}

export const DEFAULT_ALERT_LIMITS: AlertLimits = {
  insulationClass: 'F',
  statorMarginK: 20,
  statorDeadbandK: 5,
  overspeedDeadbandFraction: 0.02,
  badTelemetryCount: 3,
  keTrendDays: 90,
  offlineAfterMs: 15 * 60_000,
};

/**
 * The stator temperature line of a unit, °C: its insulation class less the margin.
 * @example statorLimitC(DEFAULT_ALERT_LIMITS) // 135
 */
export function statorLimitC(limits: Pick<AlertLimits, 'insulationClass' | 'statorMarginK'>): number {
  return INSULATION_CLASS_C[limits.insulationClass] - limits.statorMarginK;
}
