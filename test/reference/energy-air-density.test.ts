/**
 * Expected wind power at a measured air density, against the normalisation of
 * IEC 61400-12-1 and the ISO 2533 standard atmosphere.
 */
import { describe, expect, it } from 'vitest';
import { REFERENCE_AIR_DENSITY_KG_M3, normaliseWindSpeedMs } from '@/lib/energy/air-density';
import { expectedPowerModel } from '@/lib/energy/expected-power';

describe('reference air density', () => {
  it('1.225 kg/m³ is the ISO 2533 sea-level density', () => {
    // ISO 2533:1975 standard atmosphere, sea-level values (from memory): p = 101 325 Pa, T = 288.15 K,
    // specific gas constant of dry air R = 287.052 87 J/(kg·K); ideal gas ρ = p / (R·T) = 1.2250 kg/m³
    // (arithmetic by hand: 101 325 / (287.052 87 × 288.15) = 1.225 000 02).
    expect(101_325 / (287.052_87 * 288.15)).toBeCloseTo(REFERENCE_AIR_DENSITY_KG_M3, 6);
  });
});

describe('IEC 61400-12-1 wind-speed normalisation, V_n = V · (ρ / ρ₀)^(1/3)', () => {
  // IEC 61400-12-1 (2005 clause 8.1, 2017 clause 9.1; from memory): for a turbine with active power
  // control the measured wind speed is normalised to the reference density by V_n = V·(ρ/ρ₀)^(1/3).
  it('8 m/s in air of 1.0 kg/m³ is 7.4767 m/s at 1.225 kg/m³', () => {
    // (1.0 / 1.225)^(1/3) = 0.934590; × 8 = 7.47672 (worked by hand with the cube root).
    expect(normaliseWindSpeedMs(8, 1.0)).toBeCloseTo(7.47672, 5);
  });

  it('10 m/s in cold dense air of 1.3 kg/m³ is 10.2001 m/s', () => {
    // Same IEC 61400-12-1 formula: (1.3 / 1.225)^(1/3) = 1.020005; × 10 = 10.20005 (worked by hand with the cube root).
    expect(normaliseWindSpeedMs(10, 1.3)).toBeCloseTo(10.20005, 5);
  });

  it('the expected power reads the curve at the normalised speed', () => {
    // An invented curve, 7 m/s -> 4 kW, 8 m/s -> 5.5 kW, read linearly between points (contract, section 5;
    // common practice, no published source); in 1.0 kg/m³ air 8 m/s reads as 7.47672 m/s, so
    // 4 + 1.5 · 0.47672 = 4.7151 kW (arithmetic by hand), not the 5.5 kW at the speed as measured.
    const model = expectedPowerModel({
      kind: 'wind',
      ratedKw: 10,
      powerCurve: [
        { ms: 3, kw: 0 },
        { ms: 7, kw: 4 },
        { ms: 8, kw: 5.5 },
        { ms: 12, kw: 10 },
      ],
      cutInMs: 3,
      cutOutMs: 25,
    });
    expect(model({ windMs: 8, airKgM3: 1.0 })).toBeCloseTo(4.71508, 5);
    expect(model({ windMs: 8 })).toBe(5.5);
    expect(model({ windMs: 8, airKgM3: 1.225 })).toBe(5.5);
  });
});
