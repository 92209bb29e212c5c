import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { copperOhmAt, copperOhmAtFast } from './winding-resistance';

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

describe('copperOhmAtFast (the per-sample correction of the diagnosis and the chart)', () => {
  it('puts the copper resistance at winding temperature: +0.393 % per °C from 20 °C', () => {
    // IEC 60028 (annealed copper, α20 = 0.00393 per °C; value from memory): 0.35 Ω at 120 °C is 0.35·(1 + 0.393) = 0.48755 Ω.
    expect(copperOhmAtFast(0.35, 120)).toBeCloseTo(0.48755, 5);
    expect(copperOhmAtFast(0.35, 20)).toBe(0.35);
  });

  it('is copperOhmAt without the checks', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 50, noNaN: true }), fc.double({ min: -273, max: 400, noNaN: true }), (ohm, c) => {
        expect(copperOhmAtFast(ohm, c)).toBe(copperOhmAt(ohm, c));
      }),
    );
  });
});
