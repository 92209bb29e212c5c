import { describe, expect, it } from 'vitest';
import { lineEmfBehindTerminals, loadPowerFactor, magnetTempC, windingOhm, windingTempC } from './sample-emf';

describe('the per-sample correction shared by the diagnosis and the chart', () => {
  it('recovers E from the generator phasor equation E = V + I·(R + jX) with a lagging current', () => {
    // The synchronous generator's phasor equation E_A = V_φ + R_A·I_A + jX_S·I_A (any machines
    // textbook, e.g. Chapman, Electric Machinery Fundamentals, ch. 4; the equation from memory),
    // worked by hand: V_φ = 400/√3 = 230.940 V, I = 10 A at cos φ 0.8 lagging (sin φ 0.6),
    // R = 0.5 Ω, X = 3 Ω: E = 230.940 + 10·(0.5·0.8 + 3·0.6) + j·10·(3·0.8 − 0.5·0.6)
    //   = 252.940 + j21.000, |E| = 253.810 V, E_LL = √3 · 253.810 = 439.612 V.
    expect(lineEmfBehindTerminals(400, 10, 0.5, 3, 0.8)).toBeCloseTo(439.612, 2);
  });

  it('is the terminal voltage at open circuit, whatever R and X', () => {
    expect(lineEmfBehindTerminals(400, 0, 0.5, 3, 0.8)).toBeCloseTo(400, 9);
  });

  it('takes cos φ from kW, V and I, capped at 1, unity without kW or current', () => {
    // 10 kW at 400 V and 16 A: 10000 / (√3·400·16) = 0.90211 (worked by hand).
    expect(loadPowerFactor(10, 400, 16)).toBeCloseTo(0.90211, 5);
    expect(loadPowerFactor(20, 400, 16)).toBe(1);
    expect(loadPowerFactor(Number.NaN, 400, 16)).toBe(1);
    expect(loadPowerFactor(10, 400, 0)).toBe(1);
  });

  it('puts the copper resistance at winding temperature: +0.393 % per °C from 20 °C', () => {
    // IEC 60028 (annealed copper, α20 = 0.00393 per °C; value from memory): 0.35 Ω at 120 °C is 0.35·(1 + 0.393) = 0.48755 Ω.
    expect(windingOhm(0.35, 120)).toBeCloseTo(0.48755, 5);
    expect(windingOhm(0.35, 20)).toBe(0.35);
  });

  it('takes temperatures from the stator, else the ambient, else the default', () => {
    expect(windingTempC(60, 10)).toBe(60);
    expect(windingTempC(Number.NaN, 10)).toBe(10);
    expect(windingTempC(Number.NaN, Number.NaN)).toBe(20);
    expect(magnetTempC(Number.NaN, Number.NaN, 25)).toBe(25);
    expect(magnetTempC(Number.NaN, 5, 25)).toBe(5);
  });
});
