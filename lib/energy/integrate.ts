/**
 * Trapezoidal integration of a sampled quantity (kW, or a 0/1 indicator) into
 * time buckets (contract, section 5): the area between two consecutive
 * samples is (v₀ + v₁)/2 · Δt; an interval longer than the gap limit counts
 * for nothing; an interval that crosses a bucket edge is shared between the
 * buckets in proportion to the time it spends in each.
 */

/** Longest interval between two samples that still counts as covered, ms: 10 minutes (contract, section 5). */
export const MAX_COVERED_INTERVAL_MS = 10 * 60_000;

/** Milliseconds in an hour. */
export const MS_PER_HOUR = 3_600_000;

/** A series sorted by time: parallel arrays of sample times and values. */
export interface SampledSeries {
  /** Sample times, epoch ms, non-decreasing. */
  readonly tsMs: ArrayLike<number>;
  /** Value at each sample (kW for energy), finite. */
  readonly values: ArrayLike<number>;
}

/** What {@link integrateIntoBuckets} gives back, one entry per bucket. */
export interface BucketIntegrals {
  /** Integral of the value over the bucket, value × hours (kWh for kW). */
  readonly valueHours: Float64Array;
  /** Time in the bucket covered by intervals no longer than the gap limit, hours. */
  readonly coveredHours: Float64Array;
}

/** Options of {@link integrateIntoBuckets}. */
export interface IntegrateOptions {
  /** Longest interval that counts, ms; default {@link MAX_COVERED_INTERVAL_MS}. */
  readonly maxIntervalMs?: number;
}

function checkSeries(series: SampledSeries): void {
  const { tsMs, values } = series;
  if (tsMs.length !== values.length) {
    throw new RangeError(`tsMs and values must have the same length, got ${tsMs.length} and ${values.length}`);
  }
  let before = -Infinity;
  for (let i = 0; i < tsMs.length; i++) {
    const t = tsMs[i] as number;
    if (!Number.isFinite(t)) throw new RangeError(`tsMs[${i}] must be a finite epoch ms, got ${t}`);
    if (t < before) throw new RangeError(`tsMs must not decrease, got tsMs[${i}] = ${t} after ${before}`);
    before = t;
    const v = values[i] as number;
    if (!Number.isFinite(v)) throw new RangeError(`values[${i}] must be finite, got ${v}`);
  }
}

function checkEdges(edgesMs: ArrayLike<number>): void {
  if (edgesMs.length < 2) throw new RangeError(`edgesMs must hold at least 2 edges (1 bucket), got ${edgesMs.length}`);
  let before = -Infinity;
  for (let i = 0; i < edgesMs.length; i++) {
    const e = edgesMs[i] as number;
    if (!Number.isFinite(e)) throw new RangeError(`edgesMs[${i}] must be a finite epoch ms, got ${e}`);
    if (e <= before) throw new RangeError(`edgesMs must rise strictly, got edgesMs[${i}] = ${e} after ${before}`);
    before = e;
  }
}

/**
 * Integrates a sorted series into the buckets [edgesMs[k], edgesMs[k+1]).
 * Time outside the first and last edge is left out.
 * @example
 * // 6 kW, then 12 kW five minutes later, one bucket of an hour:
 * integrateIntoBuckets({ tsMs: [0, 300_000], values: [6, 12] }, [0, 3_600_000]);
 * // valueHours [0.75] (kWh), coveredHours [0.08333] (5 minutes)
 */
export function integrateIntoBuckets(
  series: SampledSeries,
  edgesMs: ArrayLike<number>,
  options: IntegrateOptions = {},
): BucketIntegrals {
  const maxIntervalMs = options.maxIntervalMs ?? MAX_COVERED_INTERVAL_MS;
  if (!(maxIntervalMs > 0) || !Number.isFinite(maxIntervalMs)) {
    throw new RangeError(`maxIntervalMs must be a finite number of ms above 0, got ${maxIntervalMs}`);
  }
  checkSeries(series);
  checkEdges(edgesMs);

  const buckets = edgesMs.length - 1;
  // Sums in value·ms and ms: covered time stays an exact integer for integer timestamps.
  const valueMs = new Float64Array(buckets);
  const coveredMs = new Float64Array(buckets);
  const first = edgesMs[0] as number;
  const last = edgesMs[buckets] as number;
  const { tsMs, values } = series;
  let bucket = 0;

  for (let i = 1; i < tsMs.length; i++) {
    const t0 = tsMs[i - 1] as number;
    const t1 = tsMs[i] as number;
    const dt = t1 - t0;
    if (dt <= 0 || dt > maxIntervalMs || t1 <= first || t0 >= last) continue;
    const meanValue = ((values[i - 1] as number) + (values[i] as number)) / 2;
    // Samples are sorted, so the bucket of an interval's start never moves back.
    while (bucket < buckets - 1 && (edgesMs[bucket + 1] as number) <= t0) bucket++;
    let start = t0 > first ? t0 : first;
    for (let k = bucket; k < buckets && start < t1; k++) {
      const edge = edgesMs[k + 1] as number;
      const end = t1 < edge ? t1 : edge;
      const part = end - start;
      if (part > 0) {
        // Area shared in proportion to time: meanValue · dt · part/dt.
        valueMs[k] = (valueMs[k] as number) + meanValue * part;
        coveredMs[k] = (coveredMs[k] as number) + part;
      }
      start = end;
    }
  }

  const valueHours = new Float64Array(buckets);
  const coveredHours = new Float64Array(buckets);
  for (let k = 0; k < buckets; k++) {
    valueHours[k] = (valueMs[k] as number) / MS_PER_HOUR;
    coveredHours[k] = (coveredMs[k] as number) / MS_PER_HOUR;
  }
  return { valueHours, coveredHours };
}
