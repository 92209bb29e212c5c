/**
 * Incremental rollups: what a set of newly stored samples adds to the
 * ten-minute and daily rollups of their unit.
 *
 * Counts, minima, maxima and sums come from the inserted samples only (a
 * redelivered duplicate is never inserted, so it never counts twice).
 * Energy and covered time are trapezoidal between consecutive samples that
 * carry `kw`, over intervals of at most 10 minutes (contract, section 5), an
 * interval that crosses a bucket edge being shared between the buckets in
 * proportion to time. Because a new sample can fall between two samples
 * stored before (late or out-of-order arrival, or another ingester's
 * samples), the energy change is computed exactly: the intervals of the
 * series before and after the insertion are compared, and only the intervals
 * that appear or disappear count.
 */
import type { TelemetrySample } from '../contract/telemetry';
import type { UnitKind } from '../contract/nameplate';
import { FIELD_INDEX, BLOCK_WIDTH, type SampleBlock } from './sample-block';

/** Length of the short rollup bucket, ms (10 minutes). */
export const TEN_MINUTES_MS = 600_000;
/** Length of a day, ms (daily rollups are UTC days). */
export const DAY_MS = 86_400_000;
/** Longest interval between samples that counts as covered, ms (contract, section 5). */
export const MAX_COVERED_INTERVAL_MS = 10 * 60_000;
const MS_PER_HOUR = 3_600_000;

/** One inserted sample reduced to what the rollups keep, values as stored (float4). */
export interface RollupSample {
  ts: number;
  rpm: number;
  /** Mean of the line voltages given. */
  vll: number;
  /** Mean of the phase currents given. */
  amps?: number;
  kw?: number;
  statorC?: number;
  /** Wind speed (wind units) or flow (hydro units). */
  resource?: number;
}

/** A stored sample that carries `kw`. */
export interface EnergyPoint {
  ts: number;
  kw: number;
}

/** What one batch adds to one rollup bucket of one unit. */
export interface RollupDelta {
  unitKey: number;
  bucketStartMs: number;
  samples: number;
  firstTsMs: number;
  lastTsMs: number;
  coveredS: number;
  kwh: number;
  rpm: Stat;
  vll: Stat;
  amps: Stat;
  kw: Stat;
  statorC: Stat;
  resource: Stat;
}

/** Minimum, maximum, sum and count of one quantity (min/max undefined when count is 0). */
export interface Stat {
  min?: number;
  max?: number;
  sum: number;
  count: number;
}

const f32 = Math.fround;

/** A value rounded to float4, as the `real` columns store it; undefined stays undefined. */
const stored = (v: number | undefined) => (v === undefined ? undefined : f32(v));

/** Mean of the present values among three (already rounded), without an array: it runs for every stored sample. */
function mean3(a: number | undefined, b: number | undefined, c: number | undefined): number | undefined {
  let sum = 0;
  let n = 0;
  if (a !== undefined) {
    sum += a;
    n++;
  }
  if (b !== undefined) {
    sum += b;
    n++;
  }
  if (c !== undefined) {
    sum += c;
    n++;
  }
  return n === 0 ? undefined : sum / n;
}

/**
 * The rollup view of a validated sample, rounded to the stored precision so
 * that rollups equal a recomputation from the stored rows.
 * @example rollupSampleOf({ ts: 0, rpm: 300, vab: 230, vbc: 232, windMs: 7 }, 'wind').vll // 231
 */
export function rollupSampleOf(sample: TelemetrySample, kind: UnitKind): RollupSample {
  const resource = kind === 'wind' ? sample.windMs : sample.flowM3s;
  return {
    ts: sample.ts,
    rpm: f32(sample.rpm),
    vll: mean3(stored(sample.vab), stored(sample.vbc), stored(sample.vca))!,
    amps: mean3(stored(sample.ia), stored(sample.ib), stored(sample.ic)),
    kw: stored(sample.kw),
    statorC: stored(sample.statorC),
    resource: stored(resource),
  };
}

/** {@link rollupSampleOf} for sample `i` of a block. */
export function rollupSampleFromBlock(block: SampleBlock, i: number, kind: UnitKind): RollupSample {
  const row = i * BLOCK_WIDTH;
  const v = (index: number) => {
    const x = block.values[row + index]!;
    return Number.isNaN(x) ? undefined : f32(x);
  };
  return {
    ts: block.ts[i]!,
    rpm: v(FIELD_INDEX.rpm)!,
    vll: mean3(v(FIELD_INDEX.vab), v(FIELD_INDEX.vbc), v(FIELD_INDEX.vca))!,
    amps: mean3(v(FIELD_INDEX.ia), v(FIELD_INDEX.ib), v(FIELD_INDEX.ic)),
    kw: v(FIELD_INDEX.kw),
    statorC: v(FIELD_INDEX.statorC),
    resource: v(kind === 'wind' ? FIELD_INDEX.windMs : FIELD_INDEX.flowM3s),
  };
}

function emptyStat(): Stat {
  return { sum: 0, count: 0 };
}

function addStat(stat: Stat, value: number | undefined): void {
  if (value === undefined) return;
  stat.min = stat.min === undefined || value < stat.min ? value : stat.min;
  stat.max = stat.max === undefined || value > stat.max ? value : stat.max;
  stat.sum += value;
  stat.count++;
}

function mergeStat(into: Stat, from: Stat): void {
  if (from.count === 0) return;
  if (from.min !== undefined) into.min = into.min === undefined || from.min < into.min ? from.min : into.min;
  if (from.max !== undefined) into.max = into.max === undefined || from.max > into.max ? from.max : into.max;
  into.sum += from.sum;
  into.count += from.count;
}

function emptyDelta(unitKey: number, bucketStartMs: number, placeholderTs: number): RollupDelta {
  return {
    unitKey,
    bucketStartMs,
    samples: 0,
    firstTsMs: placeholderTs,
    lastTsMs: placeholderTs,
    coveredS: 0,
    kwh: 0,
    rpm: emptyStat(),
    vll: emptyStat(),
    amps: emptyStat(),
    kw: emptyStat(),
    statorC: emptyStat(),
    resource: emptyStat(),
  };
}

/** Start of the bucket of `size` ms that holds `ms`. */
export function bucketStart(ms: number, size: number): number {
  return Math.floor(ms / size) * size;
}

function sortedUnique(points: EnergyPoint[]): EnergyPoint[] {
  const sorted = [...points].sort((a, b) => a.ts - b.ts);
  const out: EnergyPoint[] = [];
  for (const p of sorted) if (out.length === 0 || out[out.length - 1]!.ts !== p.ts) out.push(p);
  return out;
}

/** A point of the merged series, marked when it is new. */
interface MergedPoint extends EnergyPoint {
  fresh: boolean;
}

const counts = (a: EnergyPoint, b: EnergyPoint) => b.ts - a.ts > 0 && b.ts - a.ts <= MAX_COVERED_INTERVAL_MS;

/**
 * Adds `sign` × the interval (a, b) to the ten-minute buckets it spans, in
 * proportion to the time it spends in each.
 */
function addInterval(
  a: EnergyPoint,
  b: EnergyPoint,
  sign: 1 | -1,
  bucketOf: (start: number, placeholderTs: number) => RollupDelta,
): void {
  const meanKw = (a.kw + b.kw) / 2;
  let start = a.ts;
  while (start < b.ts) {
    const bucket = bucketStart(start, TEN_MINUTES_MS);
    const end = Math.min(b.ts, bucket + TEN_MINUTES_MS);
    const part = end - start;
    // A piece lies in the bucket of its start sample or of its end sample, both stored.
    const delta = bucketOf(bucket, bucket === bucketStart(a.ts, TEN_MINUTES_MS) ? a.ts : b.ts);
    delta.coveredS += (sign * part) / 1000;
    delta.kwh += (sign * meanKw * part) / MS_PER_HOUR;
    start = end;
  }
}

export interface UnitRollupInput {
  unitKey: number;
  /** Samples this batch actually inserted. */
  inserted: readonly RollupSample[];
  /**
   * Stored samples with `kw` next to the inserted ones, read before the
   * insert: the last within 10 minutes before a window holding every
   * inserted sample, every one inside it, the first within 10 minutes after.
   */
  stored: readonly EnergyPoint[];
}

/**
 * The ten-minute and daily rollup deltas of one unit's inserted samples.
 * @example
 * computeRollupDeltas({ unitKey: 1, stored: [], inserted: [
 *   { ts: 0, rpm: 300, vll: 230, kw: 6 }, { ts: 300_000, rpm: 300, vll: 230, kw: 12 } ] }).tenMinute[0].kwh // 0.75
 */
export function computeRollupDeltas({ unitKey, inserted, stored }: UnitRollupInput): {
  tenMinute: RollupDelta[];
  daily: RollupDelta[];
} {
  const tenMinute = new Map<number, RollupDelta>();
  const bucketOf = (start: number, placeholderTs: number) => {
    let delta = tenMinute.get(start);
    if (!delta) {
      delta = emptyDelta(unitKey, start, placeholderTs);
      tenMinute.set(start, delta);
    }
    return delta;
  };

  for (const s of inserted) {
    const delta = bucketOf(bucketStart(s.ts, TEN_MINUTES_MS), s.ts);
    if (delta.samples === 0) {
      delta.firstTsMs = s.ts;
      delta.lastTsMs = s.ts;
    } else {
      if (s.ts < delta.firstTsMs) delta.firstTsMs = s.ts;
      if (s.ts > delta.lastTsMs) delta.lastTsMs = s.ts;
    }
    delta.samples++;
    addStat(delta.rpm, s.rpm);
    addStat(delta.vll, s.vll);
    addStat(delta.amps, s.amps);
    addStat(delta.kw, s.kw);
    addStat(delta.statorC, s.statorC);
    addStat(delta.resource, s.resource);
  }

  const fresh: MergedPoint[] = [];
  for (const s of inserted) if (s.kw !== undefined) fresh.push({ ts: s.ts, kw: s.kw, fresh: true });
  if (fresh.length > 0) {
    // The stored series and the series with the new points merged in differ only in
    // intervals that touch a new point (added) and the stored intervals a new point
    // now splits (removed); every other interval is in both and changes nothing.
    const old: MergedPoint[] = sortedUnique(stored.map((p) => ({ ts: p.ts, kw: f32(p.kw) }))).map((p) => ({ ...p, fresh: false }));
    fresh.sort((a, b) => a.ts - b.ts);
    const merged: MergedPoint[] = [];
    for (let i = 0, j = 0; i < old.length || j < fresh.length; ) {
      const o = old[i];
      const n = fresh[j];
      if (n === undefined || (o !== undefined && o.ts <= n.ts)) {
        // A stored point and a new one at the same time: the insert skipped it, keep the stored.
        if (n !== undefined && o!.ts === n.ts) j++;
        merged.push(o!);
        i++;
      } else {
        if (merged.length === 0 || merged[merged.length - 1]!.ts !== n.ts) merged.push(n);
        j++;
      }
    }
    let lastOld: MergedPoint | undefined;
    let splitSinceLastOld = false;
    for (let k = 0; k < merged.length; k++) {
      const p = merged[k]!;
      const before = merged[k - 1];
      if (before && (before.fresh || p.fresh) && counts(before, p)) addInterval(before, p, 1, bucketOf);
      if (!p.fresh) {
        if (lastOld && splitSinceLastOld && counts(lastOld, p)) addInterval(lastOld, p, -1, bucketOf);
        lastOld = p;
        splitSinceLastOld = false;
      } else splitSinceLastOld = true;
    }
  }

  const daily = new Map<number, RollupDelta>();
  for (const d of tenMinute.values()) {
    const day = bucketStart(d.bucketStartMs, DAY_MS);
    let into = daily.get(day);
    if (!into) {
      into = emptyDelta(unitKey, day, d.firstTsMs);
      into.firstTsMs = d.firstTsMs;
      into.lastTsMs = d.lastTsMs;
      daily.set(day, into);
    }
    if (d.samples > 0 && (into.samples === 0 || d.firstTsMs < into.firstTsMs)) into.firstTsMs = d.firstTsMs;
    if (d.samples > 0 && (into.samples === 0 || d.lastTsMs > into.lastTsMs)) into.lastTsMs = d.lastTsMs;
    into.samples += d.samples;
    into.coveredS += d.coveredS;
    into.kwh += d.kwh;
    mergeStat(into.rpm, d.rpm);
    mergeStat(into.vll, d.vll);
    mergeStat(into.amps, d.amps);
    mergeStat(into.kw, d.kw);
    mergeStat(into.statorC, d.statorC);
    mergeStat(into.resource, d.resource);
  }
  return { tenMinute: [...tenMinute.values()], daily: [...daily.values()] };
}
