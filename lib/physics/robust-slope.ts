/**
 * Theil–Sen slope: the median of the slopes between all pairs of points,
 * robust to a few wild values, with Sen's distribution-free confidence
 * interval from the variance of Kendall's S, n(n − 1)(2n + 5)/18
 * (Sen 1968; Hollander & Wolfe, Nonparametric Statistical Methods; from memory).
 */
import { median } from './median';

/** A robust trend line y = intercept + slope · x. */
export interface RobustSlope {
  readonly n: number;
  /** Median pairwise slope, unit of y per unit of x. */
  readonly slope: number;
  /** Median of y − slope·x. */
  readonly intercept: number;
  /** Confidence interval of the slope; undefined bounds when too few points for that confidence. */
  readonly low: number | undefined;
  readonly high: number | undefined;
}

/** Largest number of points compared pairwise; more are thinned evenly (keeps the pair count near 80,000). */
export const MAX_PAIRWISE_POINTS = 400;

/** Two-sided standard normal quantiles of the confidences we use. */
const NORMAL_QUANTILE: Readonly<Record<string, number>> = { '0.9': 1.6448536269514722, '0.95': 1.959963984540054, '0.99': 2.5758293035489004 };

/**
 * Theil–Sen slope of points (`x`, `y`) with Sen's `confidence` interval (0.9, 0.95 or 0.99);
 * undefined with fewer than 2 points of distinct x.
 * @example theilSen([0, 1, 2, 3, 4], [1, 3, 5, 7, 100]).slope // 2 (the wild last point does not move it)
 */
export function theilSen(x: ArrayLike<number>, y: ArrayLike<number>, confidence: 0.9 | 0.95 | 0.99 = 0.95): RobustSlope | undefined {
  if (x.length !== y.length) throw new RangeError(`x and y must be equally long, got ${x.length} and ${y.length}`);
  const z = NORMAL_QUANTILE[String(confidence)];
  if (z === undefined) throw new RangeError(`confidence must be 0.9, 0.95 or 0.99, got ${confidence}`);
  const total = x.length;
  const n = Math.min(total, MAX_PAIRWISE_POINTS);
  const xs = new Float64Array(n);
  const ys = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const src = n === total ? i : Math.round((i * (total - 1)) / (n - 1));
    const xi = x[src] as number;
    const yi = y[src] as number;
    if (!Number.isFinite(xi) || !Number.isFinite(yi)) throw new RangeError(`point ${src} is not finite: (${xi}, ${yi})`);
    xs[i] = xi;
    ys[i] = yi;
  }
  const slopes = new Float64Array((n * (n - 1)) / 2);
  let m = 0;
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const dx = (xs[j] as number) - (xs[i] as number);
      if (dx !== 0) slopes[m++] = ((ys[j] as number) - (ys[i] as number)) / dx;
    }
  }
  if (m === 0) return undefined;
  const used = slopes.subarray(0, m);
  const slope = median(used) as number;
  const residuals = new Float64Array(n);
  for (let i = 0; i < n; i++) residuals[i] = (ys[i] as number) - slope * (xs[i] as number);
  const intercept = median(residuals) as number;
  used.sort();
  // Sen: ranks (N − C)/2 and (N + C)/2 + 1 of the ordered slopes, C = z·√Var(S), ties in x ignored.
  const c = z * Math.sqrt((n * (n - 1) * (2 * n + 5)) / 18);
  const lowRank = Math.floor((m - c) / 2);
  const highRank = Math.ceil((m + c) / 2) + 1;
  const low = lowRank >= 1 ? used[lowRank - 1] : undefined;
  const high = highRank <= m ? used[highRank - 1] : undefined;
  return { n, slope, intercept, low, high };
}
