import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { MAX_COVERED_INTERVAL_MS, MS_PER_HOUR, integrateIntoBuckets } from './integrate';

const MIN = 60_000;

describe('integrateIntoBuckets', () => {
  it('takes the trapezoid between consecutive samples', () => {
    // 6 kW then 12 kW over 5 minutes: mean 9 kW for 1/12 h = 0.75 kWh.
    const r = integrateIntoBuckets({ tsMs: [0, 5 * MIN], values: [6, 12] }, [0, MS_PER_HOUR]);
    expect(r.valueHours[0]).toBeCloseTo(0.75, 12);
    expect(r.coveredHours[0]).toBeCloseTo(5 / 60, 12);
  });

  it('counts an interval of exactly 10 minutes and nothing across a longer one', () => {
    const tsMs = [0, 10 * MIN, 10 * MIN + 10 * MIN + 1, 10 * MIN + 10 * MIN + 1 + MIN];
    const r = integrateIntoBuckets({ tsMs, values: [6, 6, 6, 6] }, [0, MS_PER_HOUR]);
    expect(MAX_COVERED_INTERVAL_MS).toBe(10 * MIN);
    expect(r.coveredHours[0]).toBeCloseTo(11 / 60, 12);
    expect(r.valueHours[0]).toBeCloseTo(6 * (11 / 60), 12);
  });

  it('shares an interval crossing an edge in proportion to time', () => {
    // 4 minutes before the edge, 6 after; 0 kW rising to 10 kW: area 50 kW·min, 20 and 30 of it.
    const edge = 60 * MIN;
    const r = integrateIntoBuckets({ tsMs: [edge - 4 * MIN, edge + 6 * MIN], values: [0, 10] }, [0, edge, 2 * edge]);
    expect(r.valueHours[0]).toBeCloseTo(20 / 60, 12);
    expect(r.valueHours[1]).toBeCloseTo(30 / 60, 12);
    expect(r.coveredHours[0]).toBeCloseTo(4 / 60, 12);
    expect(r.coveredHours[1]).toBeCloseTo(6 / 60, 12);
  });

  it('leaves out time before the first and after the last edge', () => {
    const r = integrateIntoBuckets({ tsMs: [0, 8 * MIN], values: [3, 3] }, [2 * MIN, 5 * MIN]);
    expect(r.coveredHours[0]).toBeCloseTo(3 / 60, 12);
    expect(r.valueHours[0]).toBeCloseTo(3 * (3 / 60), 12);
  });

  it('adds nothing for repeated times and for a single sample', () => {
    expect(integrateIntoBuckets({ tsMs: [MIN, MIN], values: [5, 9] }, [0, MS_PER_HOUR]).valueHours[0]).toBe(0);
    expect(integrateIntoBuckets({ tsMs: [MIN], values: [5] }, [0, MS_PER_HOUR]).coveredHours[0]).toBe(0);
  });

  it('spreads one interval over many small buckets', () => {
    const edges = Array.from({ length: 11 }, (_, k) => k * MIN);
    const r = integrateIntoBuckets({ tsMs: [0, 10 * MIN], values: [60, 60] }, edges);
    for (let k = 0; k < 10; k++) expect(r.valueHours[k]).toBeCloseTo(1, 12);
  });

  it('honours a longer gap limit', () => {
    const r = integrateIntoBuckets({ tsMs: [0, 15 * MIN], values: [4, 4] }, [0, MS_PER_HOUR], { maxIntervalMs: 15 * MIN });
    expect(r.valueHours[0]).toBeCloseTo(1, 12);
  });

  it('throws RangeError on programmer errors, naming the value', () => {
    expect(() => integrateIntoBuckets({ tsMs: [0, 1], values: [1] }, [0, 1])).toThrow(/same length/);
    expect(() => integrateIntoBuckets({ tsMs: [5, 1], values: [1, 1] }, [0, 10])).toThrow(/tsMs\[1\] = 1/);
    expect(() => integrateIntoBuckets({ tsMs: [0, 1], values: [1, Number.NaN] }, [0, 10])).toThrow(/values\[1\]/);
    expect(() => integrateIntoBuckets({ tsMs: [0, 1], values: [1, 1] }, [0])).toThrow(/at least 2 edges/);
    expect(() => integrateIntoBuckets({ tsMs: [0, 1], values: [1, 1] }, [0, 5, 5])).toThrow(RangeError);
    expect(() => integrateIntoBuckets({ tsMs: [0, 1], values: [1, 1] }, [0, 5], { maxIntervalMs: 0 })).toThrow(/maxIntervalMs/);
  });
});

/** A sorted series of integer times with steps up to 15 minutes (some are gaps) and values −5..100 kW. */
const seriesArb = fc
  .array(fc.tuple(fc.integer({ min: 0, max: 15 * MIN }), fc.double({ min: -5, max: 100, noNaN: true })), { minLength: 0, maxLength: 60 })
  .map((steps) => {
    const tsMs: number[] = [];
    const values: number[] = [];
    let t = 1_000 * MIN;
    for (const [step, v] of steps) {
      t += step;
      tsMs.push(t);
      values.push(v);
    }
    return { tsMs, values };
  });

describe('integrateIntoBuckets properties', () => {
  it('the total over any split into buckets equals the total over one bucket', () => {
    fc.assert(
      fc.property(seriesArb, fc.uniqueArray(fc.integer({ min: 1, max: 20 * 60 * MIN - 1 }), { maxLength: 20 }), (series, cuts) => {
        const start = 0;
        const end = 1_000 * MIN + 60 * 15 * MIN + 1;
        const whole = integrateIntoBuckets(series, [start, end]);
        const inner = cuts.map((c) => c + 1_000 * MIN - 60 * MIN).filter((c) => c > start && c < end);
        const edges = [start, ...new Set(inner)].sort((a, b) => a - b).concat(end);
        const split = integrateIntoBuckets(series, edges);
        const sumValue = split.valueHours.reduce((a, b) => a + b, 0);
        const sumCovered = split.coveredHours.reduce((a, b) => a + b, 0);
        expect(sumValue).toBeCloseTo(whole.valueHours[0] as number, 9);
        expect(sumCovered).toBeCloseTo(whole.coveredHours[0] as number, 12);
      }),
    );
  });

  it('covered time never exceeds a bucket’s length', () => {
    fc.assert(
      fc.property(seriesArb, fc.integer({ min: 1, max: 120 }), (series, widthMin) => {
        const width = widthMin * MIN;
        const edges = Array.from({ length: 30 }, (_, k) => 1_000 * MIN + k * width);
        const r = integrateIntoBuckets(series, edges);
        r.coveredHours.forEach((h) => expect(h * MS_PER_HOUR).toBeLessThanOrEqual(width));
      }),
    );
  });

  it('a constant value P over fully covered buckets gives P × hours', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 100, noNaN: true }), fc.integer({ min: 1, max: 10 }), (p, stepMin) => {
        const tsMs = Array.from({ length: 200 }, (_, i) => i * stepMin * MIN);
        const edges = [0, (200 - 1) * stepMin * MIN];
        const r = integrateIntoBuckets({ tsMs, values: tsMs.map(() => p) }, edges);
        const hours = ((200 - 1) * stepMin) / 60;
        expect(r.coveredHours[0]).toBeCloseTo(hours, 12);
        expect(r.valueHours[0]).toBeCloseTo(p * hours, 9);
      }),
    );
  });
});
