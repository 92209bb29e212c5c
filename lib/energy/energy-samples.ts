/**
 * Compact columns of the samples the energy figures need, gathered one
 * sample at a time (a log of millions of rows arrives as a stream, not always
 * in time order) and sorted by time once at the end. Each sample keeps its
 * time, its kW, its expected kW and whether the resource was there; what a
 * sample lacks is marked in its flags, never stood in for by a number.
 */
import type { TelemetrySample } from '@/lib/contract/telemetry';
import type { EnergyNameplate } from './energy-nameplate';
import { expectedPowerModel } from './expected-power';
import { resourcePresence } from './resource';

/** Flag: the sample measured `kw`. */
export const HAS_KW = 1;
/** Flag: the expected power of the sample is known (wind speed or flow measured). */
export const HAS_EXPECTED = 2;
/** Flag: whether the resource was there is known. */
export const HAS_RESOURCE = 4;
/** Flag: the resource was there. */
export const RESOURCE_PRESENT = 8;

/** Sample fields the energy figures read. */
export type EnergyInputSample = Readonly<Pick<TelemetrySample, 'ts' | 'kw' | 'windMs' | 'airKgM3' | 'flowM3s' | 'headM'>>;

/** Samples as columns, sorted by time (stable: samples of equal time keep their order of arrival). */
export interface EnergySamples {
  readonly length: number;
  /** Sample time, epoch ms. */
  readonly tsMs: Float64Array;
  /** Measured power, kW; 0 where the HAS_KW flag is clear. */
  readonly kw: Float64Array;
  /** Expected power, kW; 0 where the HAS_EXPECTED flag is clear. */
  readonly expectedKw: Float64Array;
  /** HAS_KW | HAS_EXPECTED | HAS_RESOURCE | RESOURCE_PRESENT. */
  readonly flags: Uint8Array;
}

/** How many samples lacked what, for a report that loses nothing silently. */
export interface EnergySampleCounts {
  readonly samples: number;
  /** Samples without `kw`: they take no part in energy, coverage or availability. */
  readonly withoutKw: number;
  /** Samples without `windMs` (wind) or `flowM3s` (hydro): no expected power, no part in availability. */
  readonly withoutResource: number;
  /** Samples that arrived earlier in time than the one before them. */
  readonly outOfOrder: number;
  /** Samples whose time equals that of the sample before them once sorted. */
  readonly repeatedTimes: number;
}

/** A collector of samples for the energy figures of one unit. */
export interface EnergySampleCollector {
  /** Adds one validated sample. */
  add(sample: EnergyInputSample): void;
  /** Sorts and hands back the columns and counts; the collector is spent afterwards. */
  finish(): { samples: EnergySamples; counts: EnergySampleCounts };
}

/**
 * Starts collecting samples of a unit described by `nameplate`.
 * @example
 * const collector = collectEnergySamples({ kind: 'hydro', ratedKw: 50, designHeadM: 12, efficiency: 0.8 });
 * collector.add({ ts: 1_767_225_600_000, kw: 20, flowM3s: 0.3 });
 * collector.finish().samples.length // 1
 */
export function collectEnergySamples(nameplate: Readonly<EnergyNameplate>): EnergySampleCollector {
  const expectedKwOf = expectedPowerModel(nameplate);
  const resourceOf = resourcePresence(nameplate);
  let capacity = 1024;
  let length = 0;
  let tsMs = new Float64Array(capacity);
  let kw = new Float64Array(capacity);
  let expectedKw = new Float64Array(capacity);
  let flags = new Uint8Array(capacity);
  let withoutKw = 0;
  let withoutResource = 0;
  let outOfOrder = 0;
  let lastTs = -Infinity;
  let spent = false;

  const grow = () => {
    capacity *= 2;
    const grown = <T extends Float64Array | Uint8Array>(old: T, make: (n: number) => T): T => {
      const next = make(capacity);
      next.set(old);
      return next;
    };
    tsMs = grown(tsMs, (n) => new Float64Array(n));
    kw = grown(kw, (n) => new Float64Array(n));
    expectedKw = grown(expectedKw, (n) => new Float64Array(n));
    flags = grown(flags, (n) => new Uint8Array(n));
  };

  return {
    add(sample) {
      if (spent) throw new RangeError('add() called after finish()');
      if (!Number.isFinite(sample.ts)) throw new RangeError(`ts must be a finite epoch ms, got ${sample.ts}`);
      if (sample.kw !== undefined && !Number.isFinite(sample.kw)) throw new RangeError(`kw must be finite, got ${sample.kw}`);
      if (length === capacity) grow();
      let f = 0;
      if (sample.kw === undefined) withoutKw++;
      else {
        f |= HAS_KW;
        kw[length] = sample.kw;
      }
      const expected = expectedKwOf(sample);
      if (expected !== undefined) {
        f |= HAS_EXPECTED;
        expectedKw[length] = expected;
      }
      const resource = resourceOf(sample);
      if (resource === undefined) withoutResource++;
      else f |= resource ? HAS_RESOURCE | RESOURCE_PRESENT : HAS_RESOURCE;
      flags[length] = f;
      tsMs[length] = sample.ts;
      if (sample.ts < lastTs) outOfOrder++;
      lastTs = sample.ts;
      length++;
    },

    finish() {
      if (spent) throw new RangeError('finish() called twice');
      spent = true;
      let samples: EnergySamples = {
        length,
        tsMs: tsMs.slice(0, length),
        kw: kw.slice(0, length),
        expectedKw: expectedKw.slice(0, length),
        flags: flags.slice(0, length),
      };
      if (outOfOrder > 0) samples = sortByTime(samples);
      let repeatedTimes = 0;
      for (let i = 1; i < length; i++) if (samples.tsMs[i] === samples.tsMs[i - 1]) repeatedTimes++;
      return { samples, counts: { samples: length, withoutKw, withoutResource, outOfOrder, repeatedTimes } };
    },
  };
}

function sortByTime(s: EnergySamples): EnergySamples {
  const order = new Uint32Array(s.length);
  for (let i = 0; i < s.length; i++) order[i] = i;
  const ts = s.tsMs;
  // Ties broken by arrival keep the sort stable whatever the engine does.
  order.sort((a, b) => (ts[a] as number) - (ts[b] as number) || a - b);
  const tsMs = new Float64Array(s.length);
  const kw = new Float64Array(s.length);
  const expectedKw = new Float64Array(s.length);
  const flags = new Uint8Array(s.length);
  for (let i = 0; i < s.length; i++) {
    const j = order[i] as number;
    tsMs[i] = ts[j] as number;
    kw[i] = s.kw[j] as number;
    expectedKw[i] = s.expectedKw[j] as number;
    flags[i] = s.flags[j] as number;
  }
  return { length: s.length, tsMs, kw, expectedKw, flags };
}

/**
 * Columns and counts of a list of samples, in one call.
 * @example energySamplesFrom({ kind: 'hydro', ratedKw: 50, designHeadM: 12, efficiency: 0.8 }, [{ ts: 1_767_225_600_000, kw: 20 }]).counts.withoutResource // 1
 */
export function energySamplesFrom(
  nameplate: Readonly<EnergyNameplate>,
  list: Iterable<EnergyInputSample>,
): { samples: EnergySamples; counts: EnergySampleCounts } {
  const collector = collectEnergySamples(nameplate);
  for (const sample of list) collector.add(sample);
  return collector.finish();
}
