/**
 * Trend of a unit's corrected Ke ratio over its diagnosis history: is it
 * sliding, how fast, and when will it cross the alarm threshold?
 *
 * The history is first reduced to one median per UTC day, because successive
 * live diagnoses share most of their window and are not independent. Then:
 * - a Theil–Sen slope with Sen's 95 % interval (robust to a few bad days):
 *   the unit is declining when the whole interval lies below zero and the
 *   slope is at least `minDeclinePctPerMonth`;
 * - a lower one-sided CUSUM against the unit's own baseline (median of its
 *   first days), k = 0.5 σ and h = 5 σ with σ from the day-to-day differences
 *   (the usual tabular CUSUM design, Montgomery, Introduction to Statistical
 *   Quality Control; from memory), which catches a slow shift the slope's
 *   interval is still too wide for;
 * - an EWMA (λ = 0.2, same source) as the smoothed current level.
 * The crossing date extrapolates the robust line to the threshold.
 */
import { median } from '@/lib/physics/median';
import { theilSen } from '@/lib/physics/robust-slope';

/** One diagnosis of the history. */
export interface KeHistoryPoint {
  /** Time of the diagnosis (or the end of its window), epoch ms. */
  readonly tsMs: number;
  /** Corrected Ke ratio; null when that diagnosis could not give one. */
  readonly keRatio: number | null;
}

export const TREND_STATUSES = ['insufficient', 'stable', 'declining', 'below-threshold'] as const;
export type TrendStatus = (typeof TREND_STATUSES)[number];

/** The trend of one unit; times as epoch ms, rates in % of nameplate Ke per 30-day month. */
export interface KeTrend {
  readonly status: TrendStatus;
  /** Days with at least one Ke ratio. */
  readonly days: number;
  /** From the first to the last day, days. */
  readonly spanDays: number;
  /** Robust slope, % of nameplate per month, and its 95 % interval (undefined when too few days). */
  readonly slopePctPerMonth: number | undefined;
  readonly slopeLowPctPerMonth: number | undefined;
  readonly slopeHighPctPerMonth: number | undefined;
  /** Level of the robust line at the last day. */
  readonly level: number | undefined;
  /** Smoothed latest level (EWMA). */
  readonly ewma: number | undefined;
  /** The unit's own baseline (median of its first days). */
  readonly baseline: number | undefined;
  /** When the downward CUSUM first passed its decision limit, if it did. */
  readonly cusumAlarmMs: number | undefined;
  /** The threshold the crossing is projected to. */
  readonly thresholdRatio: number;
  /** Projected crossing of the threshold along the robust line; undefined unless declining. */
  readonly crossingMs: number | undefined;
  /** Earliest and latest crossing from the slope's interval (latest undefined when the interval reaches zero). */
  readonly crossingEarliestMs: number | undefined;
  readonly crossingLatestMs: number | undefined;
}

export interface KeTrendOptions {
  /** Ratio whose crossing is projected; default 0.95, the demagnetisation alarm (contract, section 5). */
  readonly thresholdRatio?: number;
  /** Fewer days give `insufficient`; default 10 (common practice, no published source). */
  readonly minDays?: number;
  /** A significant slope gentler than this, % per month, still counts as stable; default 0.3 (common practice). */
  readonly minDeclinePctPerMonth?: number;
  /** Days whose median forms the baseline of the CUSUM; default 7. */
  readonly baselineDays?: number;
}

const DAY_MS = 86_400_000;
/** Days per month for the rate, a 30-day month. */
const MONTH_DAYS = 30;
/** EWMA weight of the newest day (Montgomery suggests 0.05–0.25; from memory). */
const EWMA_LAMBDA = 0.2;
/** CUSUM reference value and decision interval in σ (Montgomery: k = 0.5, h = 4 or 5; from memory). */
const CUSUM_K_SIGMA = 0.5;
const CUSUM_H_SIGMA = 5;
/** Scale factor of the median absolute deviation to σ for normal data (1/Φ⁻¹(3/4)). */
const MAD_TO_SIGMA = 1.4826;
/** Floor of σ: day-to-day noise below 0.05 % of nameplate is below what the fit can tell apart. */
const MIN_SIGMA = 0.0005;

/**
 * The Ke trend of a diagnosis history (any order; null ratios ignored).
 * @example keTrend(history).crossingMs // epoch ms of the projected crossing of 0.95, or undefined
 */
export function keTrend(history: readonly KeHistoryPoint[], options: KeTrendOptions = {}): KeTrend {
  const thresholdRatio = options.thresholdRatio ?? 0.95;
  const minDays = options.minDays ?? 10;
  const minDecline = options.minDeclinePctPerMonth ?? 0.3;
  const baselineDays = options.baselineDays ?? 7;
  if (!(thresholdRatio > 0)) throw new RangeError(`thresholdRatio must be above 0, got ${thresholdRatio}`);
  if (!Number.isInteger(minDays) || minDays < 3) throw new RangeError(`minDays must be a whole number of at least 3, got ${minDays}`);

  const { x, y } = dailyMedians(history);
  const days = x.length;
  const spanDays = days > 0 ? (x[days - 1] as number) - (x[0] as number) : 0;
  const empty: KeTrend = {
    status: 'insufficient',
    days,
    spanDays,
    slopePctPerMonth: undefined,
    slopeLowPctPerMonth: undefined,
    slopeHighPctPerMonth: undefined,
    level: undefined,
    ewma: undefined,
    baseline: undefined,
    cusumAlarmMs: undefined,
    thresholdRatio,
    crossingMs: undefined,
    crossingEarliestMs: undefined,
    crossingLatestMs: undefined,
  };
  if (days < minDays) return empty;

  const fit = theilSen(x, y);
  if (fit === undefined) return empty;
  const toMonth = (perDay: number | undefined) => (perDay === undefined ? undefined : perDay * MONTH_DAYS * 100);
  const lastDay = x[days - 1] as number;
  const level = fit.intercept + fit.slope * lastDay;

  let ewma = y[0] as number;
  for (let i = 1; i < days; i++) ewma = EWMA_LAMBDA * (y[i] as number) + (1 - EWMA_LAMBDA) * ewma;
  const { baseline, cusumAlarmMs } = lowerCusum(x, y, baselineDays);

  const slopeMonth = toMonth(fit.slope) as number;
  const significant = fit.high !== undefined && fit.high < 0;
  const declining = slopeMonth <= -minDecline && (significant || cusumAlarmMs !== undefined);
  const crossingAt = (perDay: number | undefined) =>
    perDay !== undefined && perDay < 0 && level > thresholdRatio ? (lastDay + (level - thresholdRatio) / -perDay) * DAY_MS : undefined;
  const status: TrendStatus = level <= thresholdRatio && ewma <= thresholdRatio ? 'below-threshold' : declining ? 'declining' : 'stable';
  return {
    status,
    days,
    spanDays,
    slopePctPerMonth: slopeMonth,
    slopeLowPctPerMonth: toMonth(fit.low),
    slopeHighPctPerMonth: toMonth(fit.high),
    level,
    ewma,
    baseline,
    cusumAlarmMs,
    thresholdRatio,
    crossingMs: declining ? crossingAt(fit.slope) : undefined,
    crossingEarliestMs: declining ? crossingAt(fit.low) : undefined,
    crossingLatestMs: declining ? crossingAt(fit.high) : undefined,
  };
}

/** One median Ke ratio per UTC day, days in order: x the day's middle (days since 1970), y its median. */
function dailyMedians(history: readonly KeHistoryPoint[]): { x: number[]; y: number[] } {
  const byDay = new Map<number, number[]>();
  for (const p of history) {
    if (p.keRatio === null || !Number.isFinite(p.keRatio) || !Number.isFinite(p.tsMs)) continue;
    const day = Math.floor(p.tsMs / DAY_MS);
    const list = byDay.get(day);
    if (list) list.push(p.keRatio);
    else byDay.set(day, [p.keRatio]);
  }
  const dayKeys = [...byDay.keys()].sort((a, b) => a - b);
  return { x: dayKeys.map((d) => d + 0.5), y: dayKeys.map((d) => median(byDay.get(d) as number[]) as number) };
}

/**
 * A lower one-sided CUSUM of the daily medians against the median of the
 * first `baselineDays` (at least three days), σ from the day-to-day
 * differences: the first day it passes the decision interval, epoch ms.
 */
function lowerCusum(x: readonly number[], y: readonly number[], baselineDays: number): { baseline: number; cusumAlarmMs: number | undefined } {
  const days = x.length;
  const baseCount = Math.max(3, x.filter((d) => d - (x[0] as number) < baselineDays).length);
  const baseline = median(y.slice(0, baseCount)) as number;
  const diffs = y.slice(1).map((v, i) => Math.abs(v - (y[i] as number)));
  const sigma = Math.max(MIN_SIGMA, ((median(diffs) ?? 0) * MAD_TO_SIGMA) / Math.SQRT2);
  let cusum = 0;
  for (let i = baseCount; i < days; i++) {
    cusum = Math.max(0, cusum + (baseline - CUSUM_K_SIGMA * sigma) - (y[i] as number));
    if (cusum > CUSUM_H_SIGMA * sigma) return { baseline, cusumAlarmMs: (x[i] as number) * DAY_MS };
  }
  return { baseline, cusumAlarmMs: undefined };
}
