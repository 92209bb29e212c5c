import { describe, expect, it } from 'vitest';
import { copperOhmAt } from './winding-resistance';

describe('copperOhmAt', () => {
  it('is the nameplate value at 20 °C and linear in temperature', () => {
    expect(copperOhmAt(0.5, 20)).toBe(0.5);
    expect(copperOhmAt(0.5, 75)).toBeCloseTo(0.5 * (1 + 0.00393 * 55), 12);
    expect(copperOhmAt(0.5, -20)).toBeCloseTo(0.5 * (1 - 0.00393 * 40), 12);
    expect(copperOhmAt(0, 100)).toBe(0);
  });

  it('names a bad value', () => {
    expect(() => copperOhmAt(-1, 20)).toThrow(/ohmAt20.*-1/);
    expect(() => copperOhmAt(1, Number.NaN)).toThrow(/windingC.*NaN/);
  });
});
