/**
 * Temperature corrections against materials data: remanence coefficients of
 * permanent magnets and the resistance coefficient of copper.
 */
import { describe, expect, it } from 'vitest';
import { keAtMagnetC, keTemperatureFactor, remanenceCoeffPctPerC } from '@/lib/physics/magnet-temperature';
import { copperOhmAt } from '@/lib/physics/winding-resistance';

describe('reversible temperature coefficient of remanence', () => {
  it('uses the typical handbook values', () => {
    // Typical reversible α(Br), % per °C, of magnet makers' data and materials handbooks (from memory,
    // no table checked): sintered NdFeB −0.09 to −0.13, SmCo −0.03 to −0.045, hard (barium or strontium)
    // ferrite −0.18 to −0.20. The contract (section 5) takes −0.12, −0.035 and −0.20, also from memory.
    expect(remanenceCoeffPctPerC('ndfeb')).toBeGreaterThanOrEqual(-0.13);
    expect(remanenceCoeffPctPerC('ndfeb')).toBeLessThanOrEqual(-0.09);
    expect(remanenceCoeffPctPerC('smco')).toBeGreaterThanOrEqual(-0.045);
    expect(remanenceCoeffPctPerC('smco')).toBeLessThanOrEqual(-0.03);
    expect(remanenceCoeffPctPerC('ferrite')).toBeGreaterThanOrEqual(-0.2);
    expect(remanenceCoeffPctPerC('ferrite')).toBeLessThanOrEqual(-0.18);
  });

  it('a 1.30 T NdFeB magnet at 80 °C keeps 1.2064 T', () => {
    // Br(T) = Br(20) · (1 + α/100 · (T − 20)) = 1.30 · (1 − 0.0012 · 60) (handbook definition of α; arithmetic by hand).
    expect(1.3 * keTemperatureFactor(-0.12, 20, 80)).toBeCloseTo(1.2064, 10);
    // Ferrite at the contract's −0.20 %/°C (section 5; typical handbook value, from memory) loses 2 % per
    // 10 °C: Ke 400 V/krpm at 20 °C is 400 · (1 − 0.002 · 25) = 380 V/krpm at 45 °C (arithmetic by hand).
    expect(keAtMagnetC({ keVPerKrpm: 400, refC: 20, magnetC: 45, coeffPctPerC: -0.2 })).toBeCloseTo(380, 10);
  });
});

describe('copper resistance', () => {
  it('uses α20 = 0.00393 per °C (IEC 60028)', () => {
    // International Annealed Copper Standard, IEC 60028 (1925), International standard of resistance for
    // copper: annealed copper at 20 °C has a resistance temperature coefficient of 0.00393 per °C
    // (from memory; the documentation search shows the same 0.00393 at 20 °C only in software constants).
    expect(copperOhmAt(1, 21)).toBeCloseTo(1.00393, 12);
  });

  it('agrees with the 234.5 °C inferred-zero rule for copper windings within 0.05 %', () => {
    // R2/R1 = (234.5 + T2)/(234.5 + T1): 234.5 °C follows from IEC 60028's coefficient (1/0.00393 − 20 = 234.45),
    // and is the copper constant of the winding-resistance temperature correction in IEEE Std 118 (test code
    // for resistance measurement) and IEEE Std 115 (synchronous machine tests); IEC 60034-1 rounds it to 235
    // for the resistance method of temperature rise (all from memory).
    for (const t of [-20, 0, 40, 75, 115, 155]) {
      const rule = (234.5 + t) / (234.5 + 20);
      expect(Math.abs(copperOhmAt(1, t) / rule - 1)).toBeLessThan(5e-4);
    }
  });
});
