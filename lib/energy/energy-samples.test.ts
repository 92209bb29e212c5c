import { describe, expect, it } from 'vitest';
import { HAS_EXPECTED, HAS_KW, HAS_RESOURCE, RESOURCE_PRESENT, collectEnergySamples, energySamplesFrom } from './energy-samples';

const hydro = { kind: 'hydro' as const, ratedKw: 50, designHeadM: 10, efficiency: 0.8 };
const T = Date.UTC(2026, 2, 1);

describe('collectEnergySamples', () => {
  it('keeps time, kW, expected kW and flags per sample', () => {
    const { samples, counts } = energySamplesFrom(hydro, [
      { ts: T, kw: 20, flowM3s: 0.3 },
      { ts: T + 60_000, flowM3s: 0 },
      { ts: T + 120_000, kw: 5 },
    ]);
    expect(samples.length).toBe(3);
    expect(Array.from(samples.kw)).toEqual([20, 0, 5]);
    expect(samples.expectedKw[0]).toBeCloseTo(23.5360, 4);
    expect(Array.from(samples.flags)).toEqual([HAS_KW | HAS_EXPECTED | HAS_RESOURCE | RESOURCE_PRESENT, HAS_EXPECTED | HAS_RESOURCE, HAS_KW]);
    expect(counts).toEqual({ samples: 3, withoutKw: 1, withoutResource: 1, outOfOrder: 0, repeatedTimes: 0 });
  });

  it('sorts samples that arrive out of order, stably, and counts repeated times', () => {
    const { samples, counts } = energySamplesFrom(hydro, [
      { ts: T + 120_000, kw: 3 },
      { ts: T, kw: 1 },
      { ts: T + 60_000, kw: 2 },
      { ts: T + 60_000, kw: 2.5 },
      { ts: T + 30_000, kw: 1.5 },
    ]);
    expect(Array.from(samples.tsMs)).toEqual([T, T + 30_000, T + 60_000, T + 60_000, T + 120_000]);
    expect(Array.from(samples.kw)).toEqual([1, 1.5, 2, 2.5, 3]);
    expect(counts.outOfOrder).toBe(2);
    expect(counts.repeatedTimes).toBe(1);
  });

  it('grows past its first capacity', () => {
    const list = Array.from({ length: 5000 }, (_, i) => ({ ts: T + (5000 - i) * 1000, kw: i }));
    const { samples } = energySamplesFrom(hydro, list);
    expect(samples.length).toBe(5000);
    expect(samples.kw[0]).toBe(4999);
    expect(samples.tsMs[4999]).toBe(T + 5000 * 1000);
  });

  it('throws RangeError on misuse', () => {
    const c = collectEnergySamples(hydro);
    expect(() => c.add({ ts: Number.NaN })).toThrow(/ts/);
    expect(() => c.add({ ts: T, kw: Number.POSITIVE_INFINITY })).toThrow(/kw/);
    c.finish();
    expect(() => c.add({ ts: T })).toThrow(/after finish/);
    expect(() => c.finish()).toThrow(/twice/);
  });
});
