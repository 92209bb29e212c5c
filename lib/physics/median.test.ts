import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { median } from './median';

describe('median', () => {
  it('matches the sorted middle', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 1, maxLength: 200 }), (values) => {
        const sorted = [...values].sort((a, b) => a - b);
        const n = sorted.length;
        const expected = n % 2 === 1 ? sorted[(n - 1) / 2]! : (sorted[n / 2 - 1]! + sorted[n / 2]!) / 2;
        // Compared with === so that -0 and 0 count as the same median.
        expect(median(values) === expected).toBe(true);
      }),
    );
  });

  it('uses only the first count values, leaves the input alone and says undefined when empty', () => {
    const values = new Float64Array([5, 1, 9, 100, 100]);
    expect(median(values, 3)).toBe(5);
    expect([...values]).toEqual([5, 1, 9, 100, 100]);
    expect(median([])).toBeUndefined();
    expect(() => median([1, Number.NaN])).toThrow(/values\[1\] is NaN/);
    expect(() => median([1], 2)).toThrow(/count.*2/);
  });
});
