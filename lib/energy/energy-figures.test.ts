import { describe, expect, it } from 'vitest';
import { energyFigures } from './energy-figures';
import { emptyEnergyTotals } from './energy-totals';

const full = {
  periodHours: 720,
  kwh: 3600,
  coveredHours: 720,
  expectedKwh: 4000,
  expectedCoveredHours: 720,
  pairedKwh: 3600,
  pairedExpectedKwh: 4000,
  pairedCoveredHours: 720,
  resourceHours: 600,
  deliveringHours: 570,
};

describe('energyFigures', () => {
  it('derives every figure from full totals', () => {
    const f = energyFigures(full, 20);
    expect(f.kwh).toBe(3600);
    expect(f.coveragePct).toBe(100);
    expect(f.capacityFactorPct).toBeCloseTo(25, 12);
    expect(f.availabilityPct).toBeCloseTo(95, 12);
    expect(f.expectedKwh).toBe(4000);
    expect(f.performanceRatio).toBeCloseTo(0.9, 12);
  });

  it('takes the performance ratio over the samples that carry both powers', () => {
    const f = energyFigures({ ...full, pairedKwh: 1800, pairedExpectedKwh: 1500, pairedCoveredHours: 300 }, 20);
    expect(f.performanceRatio).toBeCloseTo(1.2, 12);
  });

  it('is undefined, never NaN, where a figure cannot be computed', () => {
    const f = energyFigures(emptyEnergyTotals(744), 20);
    expect(f).toEqual({
      kwh: undefined,
      coveragePct: 0,
      capacityFactorPct: undefined,
      availabilityPct: undefined,
      expectedKwh: undefined,
      performanceRatio: undefined,
    });
    // Wind always below cut-in: expected 0 kWh is known, the ratio is not.
    const calm = energyFigures({ ...full, expectedKwh: 0, pairedExpectedKwh: 0, resourceHours: 0, deliveringHours: 0 }, 20);
    expect(calm.expectedKwh).toBe(0);
    expect(calm.performanceRatio).toBeUndefined();
    expect(calm.availabilityPct).toBeUndefined();
  });

  it('throws RangeError for a bad rating or period', () => {
    expect(() => energyFigures(full, 0)).toThrow(/ratedKw/);
    expect(() => energyFigures({ ...full, periodHours: 0 }, 20)).toThrow(/periodHours/);
  });
});
