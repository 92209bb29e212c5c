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
import type { TelemetrySample } from '@/lib/contract/telemetry';
import type { UnitKind } from '@/lib/contract/nameplate';
import { meanOfPhases } from '@/lib/physics/phase-mean';
import { FIELD_INDEX, BLOCK_WIDTH, sampleBlockOf, type SampleBlock } from './sample-block';

/** Length of the short rollup bucket, ms (10 minutes). */
export const TEN_MINUTES_MS = 600_000;
/** Length of a day, ms (daily rollups are UTC days). */
export const DAY_MS = 86_400_000;
/** Longest interval between samples that counts as covered, ms (contract, section 5). */
export const MAX_COVERED_INTERVAL_MS = 10 * 60_000;
const MS_PER_HOUR = 3_600_000;

/**
 * Inserted samples reduced to what the rollups keep, column by column,
 * values as stored (float4), NaN where absent. Columns rather than an
 * object per sample: a batch holds tens of thousands of them.
 */
export interface RollupRows {
  count: number;
  ts: Float64Array;
  rpm: Float64Array;
  /** Mean of the line voltages given. */
  vll: Float64Array;
  /** Mean of the phase currents given. */
  amps: Float64Array;
  kw: Float64Array;
  statorC: Float64Array;
  /** Wind speed (wind units) or flow (hydro units). */
  resource: Float64Array;
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

/** Room for `capacity` rows, none filled. */
export function createRollupRows(capacity: number): RollupRows {
  const all = new Float64Array(capacity * 7);
  const column = (k: number) => all.subarray(k * capacity, (k + 1) * capacity);
  return { count: 0, ts: column(0), rpm: column(1), vll: column(2), amps: column(3), kw: column(4), statorC: column(5), resource: column(6) };
}

/**
 * Appends the rollup view of sample `i` of a block, rounded to the stored
 * precision so that rollups equal a recomputation from the stored rows. One
 * unit's rows must be appended in time order.
 */
export function appendRollupRow(rows: RollupRows, block: SampleBlock, i: number, kind: UnitKind): void {
  const at = i * BLOCK_WIDTH;
  const v = block.values;
  const r = rows.count++;
  rows.ts[r] = block.ts[i]!;
  rows.rpm[r] = f32(v[at + FIELD_INDEX.rpm]!);
  rows.vll[r] = meanOfPhases(f32(v[at + FIELD_INDEX.vab]!), f32(v[at + FIELD_INDEX.vbc]!), f32(v[at + FIELD_INDEX.vca]!));
  rows.amps[r] = meanOfPhases(f32(v[at + FIELD_INDEX.ia]!), f32(v[at + FIELD_INDEX.ib]!), f32(v[at + FIELD_INDEX.ic]!));
  rows.kw[r] = f32(v[at + FIELD_INDEX.kw]!);
  rows.statorC[r] = f32(v[at + FIELD_INDEX.statorC]!);
  rows.resource[r] = f32(v[at + (kind === 'wind' ? FIELD_INDEX.windMs : FIELD_INDEX.flowM3s)]!);
}

/**
 * The rollup rows of validated samples, in time order (stable).
 * @example rollupRowsOf([{ ts: 0, rpm: 300, vab: 230, vbc: 232, windMs: 7 }], 'wind').vll[0] // 231
 */
export function rollupRowsOf(samples: readonly TelemetrySample[], kind: UnitKind): RollupRows {
  const block = sampleBlockOf([...samples].sort((a, b) => a.ts - b.ts));
  const rows = createRollupRows(block.count);
  for (let i = 0; i < block.count; i++) appendRollupRow(rows, block, i, kind);
  return rows;
}

function emptyStat(): Stat {
  return { sum: 0, count: 0 };
}

/** The quantities of a row that the rollups keep statistics of. */
const STAT_NAMES = ['rpm', 'vll', 'amps', 'kw', 'statorC', 'resource'] as const;
const statColumns = (rows: RollupRows) => STAT_NAMES.map((name) => rows[name]);
/** Minimum, maximum, sum and count of each of the six quantities, in one Float64Array (no boxed numbers per row). */
const ACC_WIDTH = 4;

function resetAccumulator(acc: Float64Array): void {
  for (let k = 0; k < STAT_NAMES.length; k++) {
    acc[k * ACC_WIDTH] = Infinity;
    acc[k * ACC_WIDTH + 1] = -Infinity;
    acc[k * ACC_WIDTH + 2] = 0;
    acc[k * ACC_WIDTH + 3] = 0;
  }
}

function statOf(acc: Float64Array, k: number): Stat {
  const count = acc[k * ACC_WIDTH + 3]!;
  if (count === 0) return emptyStat();
  return { min: acc[k * ACC_WIDTH]!, max: acc[k * ACC_WIDTH + 1]!, sum: acc[k * ACC_WIDTH + 2]!, count };
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

/** The stored points in time order, one per time, `kw` as stored (float4). */
function sortedUnique(points: readonly EnergyPoint[]): EnergyPoint[] {
  const sorted = [...points].sort((a, b) => a.ts - b.ts);
  const out: EnergyPoint[] = [];
  for (const p of sorted) if (out.length === 0 || out[out.length - 1]!.ts !== p.ts) out.push({ ts: p.ts, kw: f32(p.kw) });
  return out;
}

/** Whether the interval from a to b counts as covered (contract, section 5). */
const counts = (aTs: number, bTs: number) => bTs - aTs > 0 && bTs - aTs <= MAX_COVERED_INTERVAL_MS;

/**
 * Adds `sign` × the interval from (aTs, aKw) to (bTs, bKw) to the ten-minute
 * buckets it spans, in proportion to the time it spends in each.
 */
function addInterval(aTs: number, aKw: number, bTs: number, bKw: number, sign: 1 | -1, bucketOf: BucketOf): void {
  const meanKw = (aKw + bKw) / 2;
  let start = aTs;
  while (start < bTs) {
    const bucket = bucketStart(start, TEN_MINUTES_MS);
    const end = Math.min(bTs, bucket + TEN_MINUTES_MS);
    const part = end - start;
    // A piece lies in the bucket of its start sample or of its end sample, both stored.
    const delta = bucketOf(bucket, bucket === bucketStart(aTs, TEN_MINUTES_MS) ? aTs : bTs);
    delta.coveredS += (sign * part) / 1000;
    delta.kwh += (sign * meanKw * part) / MS_PER_HOUR;
    start = end;
  }
}

export interface UnitRollupInput {
  unitKey: number;
  /** Samples this batch actually inserted: rows `from` to `to` (exclusive) of `rows`, in time order. */
  rows: RollupRows;
  from?: number;
  to?: number;
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
 * computeRollupDeltas({ unitKey: 1, stored: [], rows: rollupRowsOf([
 *   { ts: 0, rpm: 300, vab: 230, kw: 6 }, { ts: 300_000, rpm: 300, vab: 230, kw: 12 } ], 'wind') }).tenMinute[0].kwh // 0.75
 */
export function computeRollupDeltas({ unitKey, rows, from = 0, to = rows.count, stored }: UnitRollupInput): {
  tenMinute: RollupDelta[];
  daily: RollupDelta[];
} {
  const tenMinute = new Map<number, RollupDelta>();
  const bucketOf: BucketOf = (start, placeholderTs) => {
    let delta = tenMinute.get(start);
    if (!delta) {
      delta = emptyDelta(unitKey, start, placeholderTs);
      tenMinute.set(start, delta);
    }
    return delta;
  };
  const freshKw = addStatistics(rows, from, to, bucketOf);
  if (freshKw > 0) addEnergyChange(rows, from, to, stored, bucketOf);
  return { tenMinute: [...tenMinute.values()], daily: dailyOf(unitKey, tenMinute.values()) };
}

/** The ten-minute delta of the bucket starting at `start`, made (with `placeholderTs` as its times) when new. */
type BucketOf = (start: number, placeholderTs: number) => RollupDelta;

/**
 * Adds the sample counts, times and statistics of rows `from` to `to` to
 * their ten-minute deltas; returns how many of those rows have `kw`.
 */
function addStatistics(rows: RollupRows, from: number, to: number, bucketOf: BucketOf): number {
  // Rows are in time order, so each bucket's rows come together: their statistics are
  // gathered in an accumulator and handed to the bucket's delta when the bucket ends.
  const columns = statColumns(rows);
  const acc = new Float64Array(STAT_NAMES.length * ACC_WIDTH);
  let freshKw = 0;
  let current = Number.NaN;
  let samples = 0;
  let firstTs = 0;
  let lastTs = 0;
  const endBucket = () => {
    if (samples === 0) return;
    const delta = bucketOf(current, firstTs);
    if (delta.samples === 0 || firstTs < delta.firstTsMs) delta.firstTsMs = firstTs;
    if (delta.samples === 0 || lastTs > delta.lastTsMs) delta.lastTsMs = lastTs;
    delta.samples += samples;
    STAT_NAMES.forEach((name, k) => mergeStat(delta[name], statOf(acc, k)));
  };
  for (let r = from; r < to; r++) {
    const ts = rows.ts[r]!;
    const bucket = bucketStart(ts, TEN_MINUTES_MS);
    if (bucket !== current) {
      endBucket();
      current = bucket;
      resetAccumulator(acc);
      samples = 0;
      firstTs = ts;
      lastTs = ts;
    }
    samples++;
    if (ts < firstTs) firstTs = ts;
    if (ts > lastTs) lastTs = ts;
    for (let k = 0; k < columns.length; k++) {
      const v = columns[k]![r]!;
      if (v !== v) continue; // NaN: absent
      const at = k * ACC_WIDTH;
      if (v < acc[at]!) acc[at] = v;
      if (v > acc[at + 1]!) acc[at + 1] = v;
      acc[at + 2]! += v;
      acc[at + 3]!++;
    }
    if (rows.kw[r] === rows.kw[r]) freshKw++;
  }
  endBucket();
  return freshKw;
}

/**
 * Adds to the ten-minute deltas the energy and covered time that inserting
 * rows `from` to `to` changes, given the `stored` points around them.
 *
 * The stored series and the series with the new points merged in differ only in
 * intervals that touch a new point (added) and the stored intervals a new point
 * now splits (removed); every other interval is in both and changes nothing.
 * The two series are walked together, point by point, without building the merged one.
 */
function addEnergyChange(rows: RollupRows, from: number, to: number, stored: readonly EnergyPoint[], bucketOf: BucketOf): void {
  const old = sortedUnique(stored);
  let i = 0;
  let r = from;
  const nextFresh = () => {
    while (r < to && rows.kw[r] !== rows.kw[r]) r++;
  };
  nextFresh();
  let havePrev = false;
  let prevTs = 0;
  let prevKw = 0;
  let prevFresh = false;
  let haveLastOld = false;
  let lastOldTs = 0;
  let lastOldKw = 0;
  let splitSinceLastOld = false;
  while (i < old.length || r < to) {
    const o = old[i];
    let ts: number;
    let kw: number;
    let fresh: boolean;
    if (r >= to || (o !== undefined && o.ts <= rows.ts[r]!)) {
      // A stored point and a new one at the same time: the insert skipped it, keep the stored.
      if (r < to && o!.ts === rows.ts[r]) {
        r++;
        nextFresh();
      }
      ts = o!.ts;
      kw = o!.kw;
      fresh = false;
      i++;
    } else {
      ts = rows.ts[r]!;
      kw = rows.kw[r]!;
      fresh = true;
      r++;
      nextFresh();
      if (havePrev && prevTs === ts) continue;
    }
    if (havePrev && (prevFresh || fresh) && counts(prevTs, ts)) addInterval(prevTs, prevKw, ts, kw, 1, bucketOf);
    if (!fresh) {
      if (haveLastOld && splitSinceLastOld && counts(lastOldTs, ts)) addInterval(lastOldTs, lastOldKw, ts, kw, -1, bucketOf);
      haveLastOld = true;
      lastOldTs = ts;
      lastOldKw = kw;
      splitSinceLastOld = false;
    } else splitSinceLastOld = true;
    havePrev = true;
    prevTs = ts;
    prevKw = kw;
    prevFresh = fresh;
  }
}

/** The daily deltas: the ten-minute deltas summed by day. */
function dailyOf(unitKey: number, tenMinute: Iterable<RollupDelta>): RollupDelta[] {
  const daily = new Map<number, RollupDelta>();
  for (const d of tenMinute) {
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
    for (const name of STAT_NAMES) mergeStat(into[name], d[name]);
  }
  return [...daily.values()];
}
