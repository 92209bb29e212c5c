/**
 * Downsampling of a time series to what a screen can draw: the range is cut
 * into equal time buckets and each keeps the minimum, maximum and mean of
 * what fell in it, so a spike survives as the bucket's max instead of being
 * averaged away or skipped. Works on raw samples (each a point of count 1)
 * and on stored rollups (each already a min/max/sum/count).
 */

/** One input point: a sample (min = max = sum, count 1) or a stored rollup. */
export interface SeriesPoint {
  /** Time, epoch ms. */
  readonly t: number;
  readonly min: number;
  readonly max: number;
  readonly sum: number;
  readonly count: number;
}

/** One output bucket. */
export interface SeriesBucket {
  /** Mean time of the points in the bucket, epoch ms (the bucket's place on the axis). */
  readonly t: number;
  readonly min: number;
  readonly max: number;
  readonly mean: number;
  /** Underlying samples the bucket stands for. */
  readonly count: number;
}

/** Points per series the screens ask for: more than a 1440 px chart has pixels across its plot. */
export const DEFAULT_MAX_POINTS = 1200;

/**
 * A sample value as a point; undefined when the value is missing.
 * @example samplePoint(1767225600000, 230) // { t: 1767225600000, min: 230, max: 230, sum: 230, count: 1 }
 */
export function samplePoint(t: number, value: number | null | undefined): SeriesPoint | undefined {
  if (value === null || value === undefined || !Number.isFinite(value)) return undefined;
  return { t, min: value, max: value, sum: value, count: 1 };
}

/**
 * At most `maxPoints` buckets of equal time span covering `fromMs`..`toMs`
 * (points outside are ignored), each with the min, max and mean of its points;
 * empty buckets are left out (a gap stays a gap). When the input already has
 * no more points than `maxPoints` each point is its own bucket.
 * @example downsampleSeries([{ t: 0, min: 1, max: 1, sum: 1, count: 1 }, { t: 1, min: 3, max: 3, sum: 3, count: 1 }], { fromMs: 0, toMs: 2, maxPoints: 1 }) // [{ t: 0.5, min: 1, max: 3, mean: 2, count: 2 }]
 */
export function downsampleSeries(
  points: readonly SeriesPoint[],
  { fromMs, toMs, maxPoints = DEFAULT_MAX_POINTS }: { fromMs: number; toMs: number; maxPoints?: number },
): SeriesBucket[] {
  if (!Number.isInteger(maxPoints) || maxPoints < 1) throw new RangeError(`maxPoints must be a whole number of at least 1, got ${maxPoints}`);
  if (!(toMs > fromMs)) throw new RangeError(`toMs must be after fromMs, got ${fromMs}..${toMs}`);
  const inRange = points.filter((p) => p.t >= fromMs && p.t <= toMs && p.count > 0);
  if (inRange.length <= maxPoints) {
    return inRange
      .slice()
      .sort((a, b) => a.t - b.t)
      .map((p) => ({ t: p.t, min: p.min, max: p.max, mean: p.sum / p.count, count: p.count }));
  }
  const width = (toMs - fromMs) / maxPoints;
  const min = new Float64Array(maxPoints).fill(Infinity);
  const max = new Float64Array(maxPoints).fill(-Infinity);
  const sum = new Float64Array(maxPoints);
  const count = new Float64Array(maxPoints);
  const tSum = new Float64Array(maxPoints);
  const pointsIn = new Float64Array(maxPoints);
  for (const p of inRange) {
    const b = Math.min(maxPoints - 1, Math.floor((p.t - fromMs) / width));
    if (p.min < (min[b] as number)) min[b] = p.min;
    if (p.max > (max[b] as number)) max[b] = p.max;
    sum[b] = (sum[b] as number) + p.sum;
    count[b] = (count[b] as number) + p.count;
    tSum[b] = (tSum[b] as number) + p.t;
    pointsIn[b] = (pointsIn[b] as number) + 1;
  }
  const out: SeriesBucket[] = [];
  for (let b = 0; b < maxPoints; b++) {
    const n = count[b] as number;
    if (n === 0) continue;
    out.push({ t: (tSum[b] as number) / (pointsIn[b] as number), min: min[b] as number, max: max[b] as number, mean: (sum[b] as number) / n, count: n });
  }
  return out;
}

/**
 * Every `step`-th item so that at most `maxPoints` remain, first and last kept
 * (for scatter plots, where buckets in time have no meaning).
 * @example thinEvenly([1, 2, 3, 4, 5], 3) // [1, 3, 5]
 */
export function thinEvenly<T>(items: readonly T[], maxPoints: number): T[] {
  if (!Number.isInteger(maxPoints) || maxPoints < 2) throw new RangeError(`maxPoints must be a whole number of at least 2, got ${maxPoints}`);
  if (items.length <= maxPoints) return items.slice();
  const out: T[] = [];
  const step = (items.length - 1) / (maxPoints - 1);
  for (let i = 0; i < maxPoints; i++) out.push(items[Math.round(i * step)] as T);
  return out;
}
