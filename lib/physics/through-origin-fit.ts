/**
 * Least-squares line through the origin, y = b·x, with the standard error of
 * b and its confidence interval from Student's t on n − 1 degrees of freedom
 * (one fitted parameter). Textbook regression without intercept (e.g.
 * Draper & Smith, Applied Regression Analysis; from memory).
 */
import { studentTQuantile } from './student-t';

/** A fitted slope through the origin. */
export interface OriginFit {
  /** Number of points used. */
  readonly n: number;
  /** Fitted slope b = Σxy / Σx², unit of y per unit of x. */
  readonly slope: number;
  /** Standard error of the slope, same unit. */
  readonly standardError: number;
  /** Lower and upper bound of the confidence interval of the slope. */
  readonly low: number;
  readonly high: number;
  /** Residual standard deviation, unit of y. */
  readonly residualSd: number;
}

/**
 * Slope through the origin of the first `count` points (`x`, `y`) with a `confidence` interval (default 95 %);
 * undefined with fewer than 2 points or all x zero.
 * @example fitThroughOrigin([1, 2, 3], [2.1, 3.9, 6.0]).slope // 1.9929 (= 27.9 / 14)
 */
export function fitThroughOrigin(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  count: number = x.length,
  confidence = 0.95,
): OriginFit | undefined {
  if (y.length < count || x.length < count || !Number.isInteger(count) || count < 0) {
    throw new RangeError(`count must be a whole number no larger than both lists, got ${count}`);
  }
  if (!(confidence > 0 && confidence < 1)) throw new RangeError(`confidence must be strictly between 0 and 1, got ${confidence}`);
  if (count < 2) return undefined;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < count; i++) {
    const xi = x[i] as number;
    const yi = y[i] as number;
    if (!Number.isFinite(xi) || !Number.isFinite(yi)) throw new RangeError(`point ${i} is not finite: (${xi}, ${yi})`);
    sxx += xi * xi;
    sxy += xi * yi;
  }
  if (sxx === 0) return undefined;
  const slope = sxy / sxx;
  // Second pass for the residuals: no cancellation between large sums.
  let sse = 0;
  for (let i = 0; i < count; i++) {
    const r = (y[i] as number) - slope * (x[i] as number);
    sse += r * r;
  }
  const residualSd = Math.sqrt(sse / (count - 1));
  const standardError = residualSd / Math.sqrt(sxx);
  const t = studentTQuantile(0.5 + confidence / 2, count - 1);
  return { n: count, slope, standardError, low: slope - t * standardError, high: slope + t * standardError, residualSd };
}
