import { describe, expect, it } from 'vitest';
import { theilSen } from './robust-slope';

describe('theilSen', () => {
  it('ignores a wild point that would drag least squares', () => {
    const fit = theilSen([0, 1, 2, 3, 4], [1, 3, 5, 7, 100])!;
    expect(fit.slope).toBe(2);
    expect(fit.intercept).toBe(1);
  });

  it('brackets the true slope of a noisy line', () => {
    // Deterministic noise from a linear congruential sequence (Numerical Recipes' constants).
    let seed = 12345;
    const noise = () => {
      seed = (1664525 * seed + 1013904223) % 4294967296;
      return seed / 4294967296 - 0.5;
    };
    const x = Array.from({ length: 120 }, (_, i) => i);
    const y = x.map((v) => 5 - 0.01 * v + 0.05 * noise());
    const fit = theilSen(x, y)!;
    expect(fit.low!).toBeLessThan(-0.01);
    expect(fit.high!).toBeGreaterThan(-0.01);
    expect(fit.high!).toBeLessThan(0);
  });

  it('thins long series evenly and keeps their slope', () => {
    const x = Array.from({ length: 5000 }, (_, i) => i);
    const y = x.map((v) => 2 * v + 7);
    const fit = theilSen(x, y)!;
    expect(fit.n).toBe(400);
    expect(fit.slope).toBeCloseTo(2, 12);
    expect(fit.intercept).toBeCloseTo(7, 9);
  });

  it('says undefined without two distinct x and names a bad value', () => {
    expect(theilSen([1, 1], [2, 3])).toBeUndefined();
    expect(() => theilSen([1, 2], [1])).toThrow(/equally long/);
  });
});
