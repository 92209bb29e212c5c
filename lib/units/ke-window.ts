/**
 * The Ke trend chart's projection and time window: the robust line of the
 * trend (lib/diagnosis/trend.ts) carried from the last day to where it
 * crosses the alarm line, and a window wide enough to show that crossing.
 */
import type { KeTrend } from '@/lib/diagnosis/trend';

const DAY_MS = 86_400_000;

/** The chart always shows at least the last 14 days, so a new unit's first points are not squeezed to the edges. */
export const KE_WINDOW_MIN_DAYS = 14;

/** A crossing further out than two years is not drawn to scale: the window stops there. */
export const KE_WINDOW_MAX_AHEAD_DAYS = 2 * 365;

/** The projection line of the chart, epoch ms and Ke ratios. */
export interface KeProjection {
  /** The last day with a ratio, and the trend's level there. */
  readonly fromT: number;
  readonly level: number;
  /** Projected crossing of the alarm line, and the earliest and latest from the slope's interval (absent when there is none). */
  readonly crossT: number;
  readonly earliestT?: number;
  readonly latestT?: number;
}

/**
 * The projection to draw: only when the trend projects a crossing (it does so
 * only when declining) and there is a last day to draw it from.
 * @example keProjection(trend, lastDayT) // { fromT: lastDayT, level: 0.97, crossT: … }
 */
export function keProjection(trend: KeTrend, lastDayT: number | undefined): KeProjection | undefined {
  if (trend.crossingMs === undefined || trend.level === undefined || lastDayT === undefined) return undefined;
  return {
    fromT: lastDayT,
    level: trend.level,
    crossT: trend.crossingMs,
    ...(trend.crossingEarliestMs === undefined ? {} : { earliestT: trend.crossingEarliestMs }),
    ...(trend.crossingLatestMs === undefined ? {} : { latestT: trend.crossingLatestMs }),
  };
}

/**
 * The chart's time axis: from the first day (at least {@link KE_WINDOW_MIN_DAYS}
 * back) to now, or on to the latest projected crossing (else the crossing),
 * but never more than {@link KE_WINDOW_MAX_AHEAD_DAYS} ahead.
 * @example keWindow({ firstDayT: undefined, projection: undefined, nowMs }) // { fromMs: nowMs - 14 days, toMs: nowMs }
 */
export function keWindow({ firstDayT, projection, nowMs }: { firstDayT: number | undefined; projection: KeProjection | undefined; nowMs: number }): { fromMs: number; toMs: number } {
  const earliestFrom = nowMs - KE_WINDOW_MIN_DAYS * DAY_MS;
  const fromMs = firstDayT === undefined ? earliestFrom : Math.min(firstDayT, earliestFrom);
  const toMs = Math.min(Math.max(nowMs, projection?.latestT ?? projection?.crossT ?? nowMs), nowMs + KE_WINDOW_MAX_AHEAD_DAYS * DAY_MS);
  return { fromMs, toMs };
}
