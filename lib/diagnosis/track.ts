/**
 * The samples a diagnosis rests on: one speed reading (the sensor's `rpm`, or
 * the speed from the terminal frequency), the filters of contract section 5
 * (speed floor, a reading at speed, no speed transient) and the figures read
 * straight off the used samples.
 */
import { median } from '@/lib/physics/median';
import { meanOfPhases } from '@/lib/physics/phase-mean';
import { electricalHzFast, rpmFromHz } from '@/lib/physics/synchronous-speed';
import type { DiagnosisNameplate } from './nameplate';
import { TRANSIENT_NEIGHBOUR_MAX_S, type ResolvedLimits } from './limits';
import type { SampleColumns } from './sample-columns';

/** How many samples of one speed reading were used, and why the others were not. */
export interface TrackCounts {
  /** Which reading gave the speed. */
  readonly source: 'rpm' | 'hz';
  /** Samples used. */
  readonly count: number;
  /** Samples below the speed floor. */
  readonly belowSpeed: number;
  /** Samples at speed but in a speed transient. */
  readonly inTransient: number;
  /** Samples at speed reading 0 V on every line given. */
  readonly withoutVoltage: number;
  /** Samples without this speed reading. */
  readonly missing: number;
  /** Speed range of the used samples, rev/min (Infinity and −Infinity when none is used). */
  readonly minRpm: number;
  readonly maxRpm: number;
}

/** Samples of one speed reading that pass the filters, as positions in time order. */
export interface Track extends TrackCounts {
  /** Speed of every sample in time order, rev/min; NaN without the reading. */
  readonly speed: Float64Array;
  /** Positions (in time order) of the used samples; the first `count` are set. */
  readonly used: Uint32Array;
}

/**
 * Positions of the samples in time order; undefined when they already are.
 * @example timeOrder(Float64Array.of(3, 1, 2), 3) // Uint32Array [1, 2, 0]
 */
export function timeOrder(ts: Float64Array, n: number): Uint32Array | undefined {
  let sorted = true;
  for (let i = 1; i < n; i++) {
    if ((ts[i] as number) < (ts[i - 1] as number)) {
      sorted = false;
      break;
    }
  }
  if (sorted) return undefined;
  const order = new Uint32Array(n);
  for (let i = 0; i < n; i++) order[i] = i;
  order.sort((a, b) => (ts[a] as number) - (ts[b] as number) || a - b);
  return order;
}

/** Speed of every sample from one reading, in time order, rev/min (NaN without it). */
function speedsOf(source: 'rpm' | 'hz', cols: SampleColumns, order: Uint32Array | undefined, poles: number): Float64Array {
  const n = cols.length;
  const { rpm, hz } = cols.columns;
  const speed = new Float64Array(n);
  const hzToRpm = rpmFromHz(poles, 1);
  for (let k = 0; k < n; k++) {
    const i = order === undefined ? k : (order[k] as number);
    speed[k] = source === 'rpm' ? (rpm[i] as number) : (hz[i] as number) * hzToRpm;
  }
  return speed;
}

/**
 * The samples of one speed reading that the diagnosis uses: at or above the
 * speed floor, with voltage, and not in a transient against their nearest
 * neighbours in time that carry the reading.
 * @example selectTrack('rpm', cols, timeOrder(cols.ts, cols.length), nameplate, resolveLimits()).count // 720
 */
export function selectTrack(
  source: 'rpm' | 'hz',
  cols: SampleColumns,
  order: Uint32Array | undefined,
  nameplate: DiagnosisNameplate,
  limits: ResolvedLimits,
): Track {
  const n = cols.length;
  const { vab, vbc, vca } = cols.columns;
  const speed = speedsOf(source, cols, order, nameplate.poles);
  const floor = limits.minSpeedFraction * nameplate.ratedRpm;
  const maxRate = limits.maxSpeedRateFractionPerS * nameplate.ratedRpm;
  const used = new Uint32Array(n);
  let count = 0;
  let belowSpeed = 0;
  let inTransient = 0;
  let withoutVoltage = 0;
  let missing = 0;
  let minRpm = Infinity;
  let maxRpm = -Infinity;
  let prev = -1;
  for (let k = 0; k < n; k++) {
    const s = speed[k] as number;
    if (s !== s) {
      missing++;
      continue;
    }
    // Nearest neighbours in time that carry this speed reading.
    let next = k + 1;
    while (next < n && (speed[next] as number) !== (speed[next] as number)) next++;
    const thisPrev = prev;
    prev = k;
    if (s < floor) {
      belowSpeed++;
      continue;
    }
    const i = order === undefined ? k : (order[k] as number);
    if (!(meanOfPhases(vab[i] as number, vbc[i] as number, vca[i] as number) > 0)) {
      withoutVoltage++;
      continue;
    }
    if (inSpeedTransient(cols.ts, order, speed, k, thisPrev, next, maxRate)) {
      inTransient++;
      continue;
    }
    used[count++] = k;
    if (s < minRpm) minRpm = s;
    if (s > maxRpm) maxRpm = s;
  }
  return { source, speed, used, count, belowSpeed, inTransient, withoutVoltage, missing, minRpm, maxRpm };
}

/** Whether the speed at position `k` changes faster than `maxRate` rpm/s against either neighbour no more than a gap away. */
function inSpeedTransient(
  ts: Float64Array,
  order: Uint32Array | undefined,
  speed: Float64Array,
  k: number,
  prev: number,
  next: number,
  maxRate: number,
): boolean {
  const n = speed.length;
  const tsHere = ts[order === undefined ? k : (order[k] as number)] as number;
  const s = speed[k] as number;
  let transient = false;
  for (const other of [prev, next]) {
    if (other < 0 || other >= n) continue;
    const j = order === undefined ? other : (order[other] as number);
    const dtS = Math.abs((ts[j] as number) - tsHere) / 1000;
    if (dtS === 0 || dtS > TRANSIENT_NEIGHBOUR_MAX_S) continue;
    if (Math.abs((speed[other] as number) - s) / dtS > maxRate) transient = true;
  }
  return transient;
}

/**
 * Median of hz / (poles·rpm/120) over the track's samples that carry both;
 * with `invert`, of its inverse (for a sensor that reads too low to pass the floor).
 * @example medianSpeedRatio(track, cols, undefined, 24, false) // 1.0003
 */
export function medianSpeedRatio(track: Track, cols: SampleColumns, order: Uint32Array | undefined, poles: number, invert: boolean): number | undefined {
  const ratios = new Float64Array(track.count);
  let m = 0;
  const { rpm, hz } = cols.columns;
  for (let u = 0; u < track.count; u++) {
    const k = track.used[u] as number;
    const i = order === undefined ? k : (order[k] as number);
    const f = hz[i] as number;
    const r = rpm[i] as number;
    if (f !== f || r !== r) continue;
    const fromRpm = electricalHzFast(poles, r);
    if (invert) {
      if (f > 0) ratios[m++] = fromRpm / f;
    } else if (fromRpm > 0) ratios[m++] = f / fromRpm;
  }
  return median(ratios, m);
}

/**
 * Times of the first and last used sample, ISO-8601 UTC; undefined when none is used.
 * @example usedTimeRange(track, cols, undefined) // ['2026-03-01T00:00:00.000Z', '2026-03-01T01:59:50.000Z']
 */
export function usedTimeRange(track: Track, cols: SampleColumns, order: Uint32Array | undefined): [string, string] | undefined {
  if (track.count === 0) return undefined;
  const first = track.used[0] as number;
  const last = track.used[track.count - 1] as number;
  const at = (k: number) => new Date(cols.ts[order === undefined ? k : (order[k] as number)] as number).toISOString();
  return [at(first), at(last)];
}
