/**
 * Energy yield per calendar month (contract, section 4 `energy`): months in
 * UTC or an IANA zone, each from local midnight on the 1st, so a month's
 * hours are its real elapsed hours across a daylight-saving change.
 */
import { monthBuckets } from './calendar-buckets';
import { energyFigures, type EnergyFigures } from './energy-figures';
import type { EnergySamples } from './energy-samples';
import { energyTotalsByBucket, type EnergyTotals } from './energy-totals';
import type { IntegrateOptions } from './integrate';
import { UTC_ZONE } from './zoned-time';

/** One month: its label, totals and figures. */
export interface MonthEnergy extends EnergyFigures {
  /** "2026-03": year and month in the zone asked for. */
  readonly month: string;
  /** First instant of the month, epoch ms. */
  readonly startMs: number;
  readonly totals: EnergyTotals;
}

/** Options of {@link monthlyEnergy}: the rating, the zone and the gap limit. */
export interface MonthlyEnergyOptions extends IntegrateOptions {
  /** Rating of the unit, kW. */
  readonly ratedKw: number;
  /** IANA zone of the months; default UTC. */
  readonly timeZone?: string;
}

/**
 * Figures of every month from the first sample's to the last sample's, in time order; a month between them without samples is listed with coverage 0.
 * @example
 * const hydro = { kind: 'hydro', ratedKw: 50, designHeadM: 12, efficiency: 0.8 } as const;
 * const { samples } = energySamplesFrom(hydro, [{ ts: Date.UTC(2026, 2, 1), kw: 5 }, { ts: Date.UTC(2026, 2, 1, 0, 10), kw: 5 }]);
 * monthlyEnergy(samples, { ratedKw: 50, timeZone: 'Europe/Oslo' })[0]
 * // month '2026-03', kwh 0.8333 (5 kW for 10 minutes), coveragePct 0.0224 (of 743 h)
 */
export function monthlyEnergy(samples: EnergySamples, options: MonthlyEnergyOptions): MonthEnergy[] {
  if (samples.length === 0) return [];
  const first = samples.tsMs[0] as number;
  const last = samples.tsMs[samples.length - 1] as number;
  const { edgesMs, labels } = monthBuckets(first, last, options.timeZone ?? UTC_ZONE);
  const totals = energyTotalsByBucket(samples, edgesMs, options);
  return labels.map((month, k) => {
    const monthTotals = totals[k] as EnergyTotals;
    return { month, startMs: edgesMs[k] as number, totals: monthTotals, ...energyFigures(monthTotals, options.ratedKw) };
  });
}
