import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { STANDARD_GRAVITY_M_S2, WATER_DENSITY_KG_M3, hydroPowerKw } from './hydro-power';

describe('hydroPowerKw', () => {
  it('is ρ·g·Q·H·η in kW', () => {
    expect(hydroPowerKw(0.25, 40, 0.7)).toBeCloseTo((WATER_DENSITY_KG_M3 * STANDARD_GRAVITY_M_S2 * 0.25 * 40 * 0.7) / 1000, 12);
    expect(hydroPowerKw(0, 40, 0.7)).toBe(0);
  });

  it('scales linearly with flow and head', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 5, noNaN: true }), fc.double({ min: 0, max: 200, noNaN: true }), (q, h) => {
        expect(hydroPowerKw(2 * q, h, 0.8)).toBeCloseTo(2 * hydroPowerKw(q, h, 0.8), 9);
        expect(hydroPowerKw(q, 3 * h, 0.8)).toBeCloseTo(3 * hydroPowerKw(q, h, 0.8), 9);
      }),
    );
  });

  it('throws RangeError naming the bad value', () => {
    expect(() => hydroPowerKw(-1, 10, 0.8)).toThrow(/flowM3s/);
    expect(() => hydroPowerKw(1, Number.NaN, 0.8)).toThrow(/headM/);
    expect(() => hydroPowerKw(1, 10, 1.2)).toThrow(/efficiency/);
  });
});
