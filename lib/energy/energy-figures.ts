/**
 * The energy figures of a period (contract, section 4 `energy`, and
 * section 5) from its additive totals.
 */
import type { EnergyTotals } from './energy-totals';

/** Figures of one period; undefined where a figure cannot be computed. */
export interface EnergyFigures {
  /** Measured energy, kWh; undefined when no time of the period was covered. */
  readonly kwh: number | undefined;
  /** Covered time over the period's time, %. */
  readonly coveragePct: number;
  /** kWh over (rated kW × the period's hours), %; undefined with kwh. */
  readonly capacityFactorPct: number | undefined;
  /** Time with resource and delivery over time with resource, %; undefined when the resource was never there. */
  readonly availabilityPct: number | undefined;
  /** Expected energy, kWh; undefined when no time was covered by samples with an expected power. */
  readonly expectedKwh: number | undefined;
  /**
   * Measured over expected energy, both taken over the samples that carry
   * both (so a stretch without wind speed does not count as output beyond
   * expectation); undefined when that expected energy is 0 or unknown.
   * It equals kwh / expectedKwh when every sample carries both.
   */
  readonly performanceRatio: number | undefined;
}

/**
 * Figures of a period from its totals and the unit's rating (kW).
 * @example
 * energyFigures({ periodHours: 720, kwh: 3600, coveredHours: 720, expectedKwh: 4000, expectedCoveredHours: 720,
 *   pairedKwh: 3600, pairedExpectedKwh: 4000, pairedCoveredHours: 720, resourceHours: 600, deliveringHours: 570 }, 20)
 * // { kwh: 3600, coveragePct: 100, capacityFactorPct: 25, availabilityPct: 95, expectedKwh: 4000, performanceRatio: 0.9 }
 */
export function energyFigures(totals: Readonly<EnergyTotals>, ratedKw: number): EnergyFigures {
  if (!(ratedKw > 0) || !Number.isFinite(ratedKw)) throw new RangeError(`ratedKw must be above 0 kW, got ${ratedKw}`);
  if (!(totals.periodHours > 0) || !Number.isFinite(totals.periodHours)) {
    throw new RangeError(`periodHours must be above 0 h, got ${totals.periodHours}`);
  }
  const kwh = totals.coveredHours > 0 ? totals.kwh : undefined;
  return {
    kwh,
    coveragePct: (totals.coveredHours / totals.periodHours) * 100,
    capacityFactorPct: kwh === undefined ? undefined : (kwh / (ratedKw * totals.periodHours)) * 100,
    availabilityPct: totals.resourceHours > 0 ? (totals.deliveringHours / totals.resourceHours) * 100 : undefined,
    expectedKwh: totals.expectedCoveredHours > 0 ? totals.expectedKwh : undefined,
    performanceRatio:
      totals.pairedCoveredHours > 0 && totals.pairedExpectedKwh > 0 ? totals.pairedKwh / totals.pairedExpectedKwh : undefined,
  };
}
