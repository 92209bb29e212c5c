import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { keAtMagnetC, keTemperatureFactor, keTemperatureFactorFast, remanenceCoeffPctPerC } from './magnet-temperature';

describe('magnet temperature', () => {
  it('uses the material coefficient unless overridden', () => {
    // Contract, section 5: NdFeB −0.12, SmCo −0.035, ferrite −0.20 % per °C, typical values of materials
    // handbooks and magnet makers' data (from memory, no table checked; the ranges are in
    // test/reference/magnet-and-copper.test.ts).
    expect(remanenceCoeffPctPerC('ndfeb')).toBe(-0.12);
    expect(remanenceCoeffPctPerC('smco')).toBe(-0.035);
    expect(remanenceCoeffPctPerC('ferrite')).toBe(-0.2);
    expect(remanenceCoeffPctPerC('ndfeb', -0.1)).toBe(-0.1);
  });

  it('raises Ke when cold and lowers it when hot', () => {
    // 400 · (1 + 0.0012 · 40) = 419.2 at −20 °C, 400 · (1 − 0.002 · 50) = 360 at 70 °C (arithmetic by hand).
    expect(keAtMagnetC({ keVPerKrpm: 400, refC: 20, magnetC: -20, coeffPctPerC: -0.12 })).toBeCloseTo(419.2, 9);
    expect(keAtMagnetC({ keVPerKrpm: 400, refC: 20, magnetC: 70, coeffPctPerC: -0.2 })).toBeCloseTo(360, 9);
    expect(keTemperatureFactor(-0.12, 20, 20)).toBe(1);
  });

  it('names a bad value', () => {
    expect(() => remanenceCoeffPctPerC('ndfeb', 0.1)).toThrow(/overridePctPerC.*0.1/);
    expect(() => keAtMagnetC({ keVPerKrpm: 0, refC: 20, magnetC: 20, coeffPctPerC: -0.1 })).toThrow(/keVPerKrpm.*0/);
    expect(() => keTemperatureFactor(-0.2, 20, 600)).toThrow(/magnetC 600/);
  });
});

describe('keTemperatureFactorFast (the per-sample correction of the diagnosis and the chart)', () => {
  it('is keTemperatureFactor without the checks, and reaches 0 where that one throws', () => {
    fc.assert(
      fc.property(fc.double({ min: -2, max: -0.01, noNaN: true }), fc.double({ min: -60, max: 200, noNaN: true }), fc.double({ min: -80, max: 400, noNaN: true }), (coeff, refC, magnetC) => {
        const fast = keTemperatureFactorFast(coeff, refC, magnetC);
        if (fast > 0) expect(fast).toBe(keTemperatureFactor(coeff, refC, magnetC));
        else expect(() => keTemperatureFactor(coeff, refC, magnetC)).toThrow(RangeError);
      }),
    );
    // Ferrite −0.2 % per °C, 600 °C from a 20 °C reference: 1 − 0.002 · 580 = −0.16 (arithmetic by hand).
    expect(keTemperatureFactorFast(-0.2, 20, 600)).toBeCloseTo(-0.16, 12);
  });
});
