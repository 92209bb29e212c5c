import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { downsampleSeries, samplePoint, thinEvenly, type SeriesPoint } from './downsample';

const raw = (values: number[], stepMs = 10_000): SeriesPoint[] => values.map((v, i) => samplePoint(i * stepMs, v) as SeriesPoint);

describe('downsampleSeries', () => {
  it('keeps every point when there are few enough', () => {
    const out = downsampleSeries(raw([1, 2, 3]), { fromMs: 0, toMs: 20_000, maxPoints: 10 });
    expect(out.map((b) => b.mean)).toEqual([1, 2, 3]);
  });

  it('keeps a one-sample spike as the bucket maximum', () => {
    const values = Array.from({ length: 8640 }, (_, i) => (i === 4321 ? 900 : 100));
    const out = downsampleSeries(raw(values), { fromMs: 0, toMs: 8640 * 10_000, maxPoints: 500 });
    expect(out.length).toBeLessThanOrEqual(500);
    expect(Math.max(...out.map((b) => b.max))).toBe(900);
    expect(out.every((b) => b.min === 100)).toBe(true);
  });

  it('merges stored rollups by their sums and counts, not by averaging means', () => {
    const rollups: SeriesPoint[] = [
      { t: 0, min: 1, max: 3, sum: 20, count: 10 },
      { t: 600_000, min: 5, max: 9, sum: 7, count: 1 },
    ];
    const [b] = downsampleSeries(rollups, { fromMs: 0, toMs: 1_200_000, maxPoints: 1 });
    expect(b).toMatchObject({ min: 1, max: 9, count: 11 });
    expect(b!.mean).toBeCloseTo(27 / 11, 12);
  });

  it('leaves a gap a gap and refuses a bad range', () => {
    const points = [...raw([1, 1, 1]), ...raw([2, 2, 2]).map((p) => ({ ...p, t: p.t + 10_000_000 }))];
    const out = downsampleSeries(points, { fromMs: 0, toMs: 10_020_000, maxPoints: 4 });
    expect(out.length).toBe(2);
    expect(() => downsampleSeries(points, { fromMs: 5, toMs: 5 })).toThrow(RangeError);
    expect(() => downsampleSeries(points, { fromMs: 0, toMs: 5, maxPoints: 0 })).toThrow(RangeError);
  });

  it('never returns more than maxPoints, and its buckets bound the data and keep the total count', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -1e4, max: 1e4, noNaN: true }), { minLength: 1, maxLength: 3000 }), fc.integer({ min: 1, max: 300 }), (values, maxPoints) => {
        const points = raw(values, 1000);
        const out = downsampleSeries(points, { fromMs: 0, toMs: values.length * 1000, maxPoints });
        expect(out.length).toBeLessThanOrEqual(maxPoints);
        expect(out.reduce((s, b) => s + b.count, 0)).toBe(values.length);
        expect(Math.min(...out.map((b) => b.min))).toBe(Math.min(...values));
        expect(Math.max(...out.map((b) => b.max))).toBe(Math.max(...values));
        for (const b of out) expect(b.mean).toBeGreaterThanOrEqual(b.min - 1e-9);
      }),
    );
  });
});

describe('thinEvenly', () => {
  it('keeps the first and last and at most maxPoints', () => {
    expect(thinEvenly([1, 2, 3, 4, 5], 3)).toEqual([1, 3, 5]);
    const many = Array.from({ length: 10_001 }, (_, i) => i);
    const out = thinEvenly(many, 2000);
    expect(out.length).toBe(2000);
    expect(out[0]).toBe(0);
    expect(out.at(-1)).toBe(10_000);
  });
});
