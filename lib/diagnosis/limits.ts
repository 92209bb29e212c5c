/**
 * Thresholds of the diagnosis and their defaults. Every default is common
 * practice for small permanent-magnet generators, not from a published
 * standard (contract, section 5); a unit may set its own in
 * `nameplate.diagnosis`.
 */
import type { DiagnosisLimits } from '@/lib/contract/nameplate';

/** All diagnosis thresholds, resolved. */
export interface ResolvedLimits {
  /** Samples below this share of ratedRpm are not used (common practice, no published source). */
  readonly minSpeedFraction: number;
  /** Fewer used samples give insufficient-data (common practice, no published source). */
  readonly minSamples: number;
  /** A used speed range narrower than this share of ratedRpm gives insufficient-data (common practice). */
  readonly minSpeedSpanFraction: number;
  /** |speedRatio − 1| above this is a speed-sensor fault (common practice, no published source). */
  readonly speedRatioTolerance: number;
  /** Line-voltage unbalance above this, %, points to shorted turns (common practice, no published source). */
  readonly unbalanceAlarmPct: number;
  /** keRatio below this is demagnetisation (common practice, no published source). */
  readonly keAlarmRatio: number;
  /** keRatio below this gives a warning (common practice, no published source). */
  readonly keWarnRatio: number;
  /**
   * A sample whose speed changes faster than this share of ratedRpm per
   * second against a neighbouring sample is in a transient and not used:
   * speed and voltage are rarely sampled at the same instant, and the skew
   * matters only while the speed moves (common practice, no published source).
   */
  readonly maxSpeedRateFractionPerS: number;
  /** Hours of samples the live diagnosis reads per unit. */
  readonly windowHours: number;
}

/** The defaults of contract section 5, plus our own transient rule and live window. */
export const DEFAULT_LIMITS: ResolvedLimits = {
  minSpeedFraction: 0.15,
  minSamples: 30,
  minSpeedSpanFraction: 0.1,
  speedRatioTolerance: 0.02,
  unbalanceAlarmPct: 2.0,
  keAlarmRatio: 0.95,
  keWarnRatio: 0.97,
  maxSpeedRateFractionPerS: 0.02,
  windowHours: 6,
};

/** Neighbours further apart than this are not compared for a speed transient, s (a gap in the log). */
export const TRANSIENT_NEIGHBOUR_MAX_S = 300;

/**
 * Neighbouring samples further apart than this are a gap when the time above
 * the overspeed limit is added up, s: the same 10 minutes as the energy
 * integration's gap (contract, section 5).
 */
export const OVERSPEED_GAP_S = 600;

/**
 * The thresholds for a unit: `override` over the nameplate's own over the defaults.
 * @example resolveLimits({ keAlarmRatio: 0.93 }).keAlarmRatio // 0.93
 */
export function resolveLimits(nameplateLimits?: DiagnosisLimits, override?: DiagnosisLimits): ResolvedLimits {
  const merged = { ...DEFAULT_LIMITS } as { -readonly [K in keyof ResolvedLimits]: ResolvedLimits[K] };
  for (const source of [nameplateLimits, override]) {
    if (source === undefined) continue;
    for (const [key, value] of Object.entries(source) as Array<[keyof ResolvedLimits, number | undefined]>) {
      if (value !== undefined) merged[key] = value;
    }
  }
  if (merged.keWarnRatio < merged.keAlarmRatio) {
    throw new RangeError(`keWarnRatio ${merged.keWarnRatio} must not be below keAlarmRatio ${merged.keAlarmRatio}`);
  }
  return merged;
}

/**
 * Whether a line-voltage unbalance is past the unit's alarm line (contract section 5: above, not at).
 * The verdict, the shorted-turns finding and the site table all ask this one question.
 * @example unbalanceIsAlarm(2.3, DEFAULT_LIMITS) // true
 */
export function unbalanceIsAlarm(pct: number | null | undefined, limits: Pick<ResolvedLimits, 'unbalanceAlarmPct'>): boolean {
  return pct !== null && pct !== undefined && pct > limits.unbalanceAlarmPct;
}
