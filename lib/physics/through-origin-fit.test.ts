import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { fitThroughOrigin } from './through-origin-fit';

describe('fitThroughOrigin', () => {
  it('computes Σxy/Σx² and its standard error by hand', () => {
    const fit = fitThroughOrigin([1, 2, 3], [2.1, 3.9, 6.0])!;
    expect(fit.slope).toBeCloseTo(27.9 / 14, 12);
    const sse = [2.1 - fit.slope, 3.9 - 2 * fit.slope, 6 - 3 * fit.slope].reduce((s, r) => s + r * r, 0);
    expect(fit.standardError).toBeCloseTo(Math.sqrt(sse / 2 / 14), 12);
    // t(0.975, 2) = 4.303 (NIST/SEMATECH e-Handbook, table of t critical values).
    expect(fit.high - fit.slope).toBeCloseTo(4.303 * fit.standardError, 3);
  });

  it('is exact on a noise-free line, scale-equivariant and order-free', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.double({ min: 1, max: 100, noNaN: true }), fc.double({ min: -1, max: 1, noNaN: true })), { minLength: 3, maxLength: 50 }),
        fc.double({ min: 0.1, max: 10, noNaN: true }),
        (points, k) => {
          const x = points.map((p) => p[0]);
          const y = points.map((p) => 3 * p[0] + p[1]);
          const fit = fitThroughOrigin(x, y)!;
          const scaled = fitThroughOrigin(x, y.map((v) => v * k))!;
          expect(scaled.slope).toBeCloseTo(fit.slope * k, 9);
          const reversed = fitThroughOrigin([...x].reverse(), [...y].reverse())!;
          expect(reversed.slope).toBeCloseTo(fit.slope, 12);
          expect(fit.low).toBeLessThanOrEqual(fit.slope);
          expect(fit.high).toBeGreaterThanOrEqual(fit.slope);
        },
      ),
    );
    expect(fitThroughOrigin([1, 2, 3], [3, 6, 9])!.standardError).toBe(0);
  });

  it('says undefined without enough data and names a bad value', () => {
    expect(fitThroughOrigin([1], [2])).toBeUndefined();
    expect(fitThroughOrigin([0, 0], [1, 2])).toBeUndefined();
    expect(() => fitThroughOrigin([1, Number.NaN], [1, 2])).toThrow(/point 1/);
  });
});
