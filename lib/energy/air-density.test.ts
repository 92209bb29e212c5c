import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { REFERENCE_AIR_DENSITY_KG_M3, normaliseWindSpeedMs } from './air-density';

describe('normaliseWindSpeedMs', () => {
  it('leaves the speed alone at the reference density', () => {
    expect(normaliseWindSpeedMs(8, REFERENCE_AIR_DENSITY_KG_M3)).toBe(8);
  });

  it('lowers the speed in thin air and raises it in dense air', () => {
    expect(normaliseWindSpeedMs(8, 1.0)).toBeCloseTo(8 * Math.cbrt(1 / 1.225), 12);
    expect(normaliseWindSpeedMs(8, 1.3)).toBeGreaterThan(8);
  });

  it('keeps the kinetic power of the wind: ρ·V³ = ρ₀·V_n³', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 40, noNaN: true }), fc.double({ min: 0.5, max: 1.6, noNaN: true }), (v, rho) => {
        const vn = normaliseWindSpeedMs(v, rho);
        expect(REFERENCE_AIR_DENSITY_KG_M3 * vn ** 3).toBeCloseTo(rho * v ** 3, 6);
      }),
    );
  });

  it('throws RangeError naming the bad value', () => {
    expect(() => normaliseWindSpeedMs(-1, 1.2)).toThrow(/windMs/);
    expect(() => normaliseWindSpeedMs(5, 0)).toThrow(/airKgM3/);
    expect(() => normaliseWindSpeedMs(5, 1.2, Number.NaN)).toThrow(/referenceKgM3/);
  });
});
