/** Expected hydro power against the hydropower equation P = ρ·g·Q·H·η and its handbook worked example. */
import { describe, expect, it } from 'vitest';
import { STANDARD_GRAVITY_M_S2, hydroPowerKw } from '@/lib/energy/hydro-power';
import { expectedPowerModel } from '@/lib/energy/expected-power';
import { energySamplesFrom } from '@/lib/energy/energy-samples';
import { monthlyEnergy } from '@/lib/energy/monthly-energy';

describe('hydropower equation', () => {
  it('g is the standard acceleration of gravity', () => {
    // 3rd CGPM (1901), declaration on the standard value of g, kept in ISO 80000-3: g_n = 9.806 65 m/s²
    // exactly (from memory).
    expect(STANDARD_GRAVITY_M_S2).toBe(9.80665);
  });

  it('Q = 1 m³/s through H = 10 m at η = 0.8 gives 78.45 kW', () => {
    // P = ρ·g·Q·H·η, the hydropower equation of small-hydro handbooks (e.g. the European Small
    // Hydropower Association's Guide on How to Develop a Small Hydropower Plant, 2004; from memory).
    // ρ = 1000 kg/m³ as the contract (section 5) takes it: fresh water is about 999.7 kg/m³ at 10 °C
    // (water density tables, from memory), so 1000 is the handbooks' rounding, common practice.
    // A round example worked by hand, not copied from the guide:
    // 1000 kg/m³ · 9.80665 m/s² · 1 m³/s · 10 m · 0.8 = 78 453.2 W.
    expect(hydroPowerKw(1, 10, 0.8)).toBeCloseTo(78.4532, 10);
  });

  it('a 100 l/s, 25 m head micro-hydro set at η = 0.6 gives 14.71 kW', () => {
    // Same equation, an invented micro-hydro set worked by hand: 1000 · 9.80665 · 0.1 · 25 · 0.6 = 14 709.975 W.
    expect(hydroPowerKw(0.1, 25, 0.6)).toBeCloseTo(14.709975, 10);
  });

  it('caps expected power at the rating', () => {
    // Contract, section 5: ρ·g·Q·H·η capped at ratedKw.
    const model = expectedPowerModel({ kind: 'hydro', ratedKw: 50, designHeadM: 10, efficiency: 0.8 });
    expect(model({ flowM3s: 1 })).toBe(50);
    expect(model({ flowM3s: 0.5 })).toBeCloseTo(39.2266, 10);
  });

  it('integrates to 78.4532 kWh over an hour of steady flow', () => {
    // The 78.4532 kW above for 1 h (trapezoids of a constant are exact; arithmetic by hand).
    const list = [];
    for (let t = Date.UTC(2026, 5, 10, 12); t <= Date.UTC(2026, 5, 10, 13); t += 60_000) list.push({ ts: t, kw: 70, flowM3s: 1, headM: 10 });
    const plate = { kind: 'hydro' as const, ratedKw: 100, designHeadM: 12, efficiency: 0.8 };
    const [june] = monthlyEnergy(energySamplesFrom(plate, list).samples, { ratedKw: 100 });
    expect(june?.expectedKwh).toBeCloseTo(78.4532, 9);
    expect(june?.kwh).toBeCloseTo(70, 9);
    expect(june?.performanceRatio).toBeCloseTo(70 / 78.4532, 9);
    expect(june?.availabilityPct).toBe(100);
  });
});
