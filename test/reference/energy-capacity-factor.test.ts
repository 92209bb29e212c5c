/**
 * Capacity factor, coverage and availability against their common
 * definitions. No IEC standard defines capacity factor (IEC 61400-12-1 gives
 * power curves and annual energy production); the definition used is that of
 * the wind-energy textbooks and energy statistics: actual energy over the
 * energy at rated power for the whole period.
 */
import { describe, expect, it } from 'vitest';
import { energySamplesFrom, type EnergyInputSample } from '@/lib/energy/energy-samples';
import { monthlyEnergy } from '@/lib/energy/monthly-energy';
import { energyFigures } from '@/lib/energy/energy-figures';

const MIN = 60_000;
const hydro = { kind: 'hydro' as const, ratedKw: 10, designHeadM: 10, efficiency: 0.8 };

function everyTenMinutes(fromMs: number, toMs: number, make: (ts: number) => Omit<EnergyInputSample, 'ts'>): EnergyInputSample[] {
  const list: EnergyInputSample[] = [];
  for (let t = fromMs; t <= toMs; t += 10 * MIN) list.push({ ts: t, ...make(t) });
  return list;
}

describe('capacity factor = E / (P_rated × T)', () => {
  it('a 1 MW turbine making 2 190 MWh in a year of 8 760 h runs at 25 %', () => {
    // Manwell, McGowan & Rogers, Wind Energy Explained: Theory, Design and Application, definition of
    // capacity factor (from memory; the 1 MW / 2 190 MWh figures are a round example worked by hand, not
    // copied from the book). 2 190 000 / (1 000 × 8 760) = 0.25.
    const f = energyFigures(
      {
        periodHours: 8760,
        kwh: 2_190_000,
        coveredHours: 8760,
        expectedKwh: 0,
        expectedCoveredHours: 0,
        pairedKwh: 0,
        pairedExpectedKwh: 0,
        pairedCoveredHours: 0,
        resourceHours: 0,
        deliveringHours: 0,
      },
      1000,
    );
    expect(f.capacityFactorPct).toBeCloseTo(25, 12);
  });

  it('2.5 kW steady on a 10 kW unit through March is 1 860 kWh and 25 % in UTC', () => {
    // March has 31 days, 744 h: 2.5 kW × 744 h = 1 860 kWh, over 10 kW × 744 h = 25 % (the definition
    // above; arithmetic by hand).
    const list = everyTenMinutes(Date.UTC(2026, 2, 1), Date.UTC(2026, 3, 1), () => ({ kw: 2.5, flowM3s: 0.2 }));
    const [march] = monthlyEnergy(energySamplesFrom(hydro, list).samples, { ratedKw: 10 });
    expect(march?.kwh).toBeCloseTo(1860, 9);
    expect(march?.capacityFactorPct).toBeCloseTo(25, 9);
    expect(march?.coveragePct).toBe(100);
  });

  it('uses the calendar month’s hours even when the log covers part of it (common practice)', () => {
    // Half of April (360 h) at 10 kW on a 10 kW unit: 3 600 kWh over 7 200 kWh possible = 50 %, coverage 50 %
    // (contract, section 5: the whole calendar month's hours; arithmetic by hand).
    const list = everyTenMinutes(Date.UTC(2026, 3, 1), Date.UTC(2026, 3, 16), () => ({ kw: 10 }));
    const [april] = monthlyEnergy(energySamplesFrom(hydro, list).samples, { ratedKw: 10 });
    expect(april?.kwh).toBeCloseTo(3600, 9);
    expect(april?.capacityFactorPct).toBeCloseTo(50, 9);
    expect(april?.coveragePct).toBeCloseTo(50, 9);
  });
});

describe('availability = time with resource and delivery over time with resource (contract, section 5)', () => {
  it('a unit down for 6 of 24 hours of flowing water is 75 % available', () => {
    // Time-based availability as the ratio of available to total time with the resource (common
    // practice in the form of IEC TS 61400-26-1, time-based availability; from memory).
    const start = Date.UTC(2026, 6, 1);
    const list = everyTenMinutes(start, start + 24 * 60 * MIN, (t) => ({
      kw: t >= start + 6 * 60 * MIN && t <= start + 12 * 60 * MIN ? 0 : 8,
      flowM3s: 0.2,
    }));
    const [july] = monthlyEnergy(energySamplesFrom(hydro, list).samples, { ratedKw: 10 });
    // Samples at exactly 06:00 and 12:00 deliver nothing: the off stretch is 6 h plus half an interval
    // on each side, 6 h 10 min of 24 h.
    expect(july?.availabilityPct).toBeCloseTo(((24 * 60 - 370) / (24 * 60)) * 100, 9);
  });

  it('no water, no availability figure', () => {
    // Contract, section 5: availability is null when the resource was never there (common practice, no
    // published source: a ratio over zero time with the resource means nothing).
    const start = Date.UTC(2026, 6, 1);
    const list = everyTenMinutes(start, start + 60 * MIN, () => ({ kw: 0, flowM3s: 0 }));
    const [july] = monthlyEnergy(energySamplesFrom(hydro, list).samples, { ratedKw: 10 });
    expect(july?.availabilityPct).toBeUndefined();
    expect(july?.expectedKwh).toBe(0);
    expect(july?.performanceRatio).toBeUndefined();
  });
});
