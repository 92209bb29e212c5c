/**
 * Additive energy totals of a time bucket (a month, a day, a 10-minute
 * rollup): integrals and covered hours, from which the ratios of
 * {@link energyFigures} follow. Totals of adjacent buckets add up to the totals
 * of their union, so rollups can be summed into months.
 *
 * Each figure is integrated over its own series: the samples that carry
 * what the figure needs. A sample without `kw` takes no part in energy,
 * coverage or availability; one without the resource measurement takes no
 * part in expected energy or availability. The 10-minute gap rule applies
 * within each series.
 */
import { HAS_EXPECTED, HAS_KW, HAS_RESOURCE, RESOURCE_PRESENT, type EnergySamples } from './energy-samples';
import { MS_PER_HOUR, integrateIntoBuckets, type IntegrateOptions, type SampledSeries } from './integrate';

/** Sums of one bucket. Hours are elapsed hours; energies kWh. */
export interface EnergyTotals {
  /** Length of the bucket, h. */
  readonly periodHours: number;
  /** Measured energy, kWh (net: negative kW counts against it). */
  readonly kwh: number;
  /** Time covered by the measured-power series, h. */
  readonly coveredHours: number;
  /** Expected energy, kWh. */
  readonly expectedKwh: number;
  /** Time covered by the expected-power series, h. */
  readonly expectedCoveredHours: number;
  /** Measured energy over the samples that also have an expected power, kWh. */
  readonly pairedKwh: number;
  /** Expected energy over those same samples, kWh. */
  readonly pairedExpectedKwh: number;
  /** Time covered by those samples, h. */
  readonly pairedCoveredHours: number;
  /** Time with the resource there, h (samples with `kw` and the resource measured). */
  readonly resourceHours: number;
  /** Time with the resource there and the unit delivering (kW above 0), h. */
  readonly deliveringHours: number;
}

/**
 * Totals of a bucket of `periodHours` hours with nothing in it.
 * @example emptyEnergyTotals(744).coveredHours // 0
 */
export function emptyEnergyTotals(periodHours: number): EnergyTotals {
  return {
    periodHours,
    kwh: 0,
    coveredHours: 0,
    expectedKwh: 0,
    expectedCoveredHours: 0,
    pairedKwh: 0,
    pairedExpectedKwh: 0,
    pairedCoveredHours: 0,
    resourceHours: 0,
    deliveringHours: 0,
  };
}

/** Samples whose flags hold all of `mask`, with the values `valueOf` picks for each. */
function subseries(
  samples: EnergySamples,
  mask: number,
  columns: ReadonlyArray<(i: number) => number>,
): { tsMs: Float64Array; values: Float64Array[] } {
  const { flags } = samples;
  let count = 0;
  for (let i = 0; i < samples.length; i++) if (((flags[i] as number) & mask) === mask) count++;
  const tsMs = new Float64Array(count);
  const values = columns.map(() => new Float64Array(count));
  let j = 0;
  for (let i = 0; i < samples.length; i++) {
    if (((flags[i] as number) & mask) !== mask) continue;
    tsMs[j] = samples.tsMs[i] as number;
    for (let c = 0; c < columns.length; c++) (values[c] as Float64Array)[j] = (columns[c] as (i: number) => number)(i);
    j++;
  }
  return { tsMs, values };
}

function integrate(tsMs: Float64Array, values: Float64Array | undefined, edgesMs: ArrayLike<number>, options: IntegrateOptions) {
  const series: SampledSeries = { tsMs, values: values ?? new Float64Array(tsMs.length) };
  return integrateIntoBuckets(series, edgesMs, options);
}

/**
 * Energy totals of sorted samples in each bucket [edgesMs[k], edgesMs[k+1]).
 * @example
 * const hydro = { kind: 'hydro', ratedKw: 50, designHeadM: 12, efficiency: 0.8 } as const;
 * const { samples } = energySamplesFrom(hydro, [{ ts: 0, kw: 10 }, { ts: 300_000, kw: 10 }, { ts: 600_000, kw: 10 }]);
 * energyTotalsByBucket(samples, [0, 3_600_000])[0].kwh // 1.6667 (10 kW for 10 minutes)
 */
export function energyTotalsByBucket(
  samples: EnergySamples,
  edgesMs: ArrayLike<number>,
  options: IntegrateOptions = {},
): EnergyTotals[] {
  const { kw, expectedKw, flags } = samples;
  const measured = subseries(samples, HAS_KW, [(i) => kw[i] as number]);
  const energy = integrate(measured.tsMs, measured.values[0], edgesMs, options);

  const expectedSeries = subseries(samples, HAS_EXPECTED, [(i) => expectedKw[i] as number]);
  const expected = integrate(expectedSeries.tsMs, expectedSeries.values[0], edgesMs, options);

  const pairedSeries = subseries(samples, HAS_KW | HAS_EXPECTED, [(i) => kw[i] as number, (i) => expectedKw[i] as number]);
  const pairedMeasured = integrate(pairedSeries.tsMs, pairedSeries.values[0], edgesMs, options);
  const pairedExpected = integrate(pairedSeries.tsMs, pairedSeries.values[1], edgesMs, options);

  // Each sample's 0/1 state counts for half of each covered interval beside it: the trapezoid of the indicator.
  const availabilitySeries = subseries(samples, HAS_KW | HAS_RESOURCE, [
    (i) => (((flags[i] as number) & RESOURCE_PRESENT) !== 0 ? 1 : 0),
    (i) => (((flags[i] as number) & RESOURCE_PRESENT) !== 0 && (kw[i] as number) > 0 ? 1 : 0),
  ]);
  const resource = integrate(availabilitySeries.tsMs, availabilitySeries.values[0], edgesMs, options);
  const delivering = integrate(availabilitySeries.tsMs, availabilitySeries.values[1], edgesMs, options);

  const totals: EnergyTotals[] = [];
  for (let k = 0; k + 1 < edgesMs.length; k++) {
    totals.push({
      periodHours: ((edgesMs[k + 1] as number) - (edgesMs[k] as number)) / MS_PER_HOUR,
      kwh: energy.valueHours[k] as number,
      coveredHours: energy.coveredHours[k] as number,
      expectedKwh: expected.valueHours[k] as number,
      expectedCoveredHours: expected.coveredHours[k] as number,
      pairedKwh: pairedMeasured.valueHours[k] as number,
      pairedExpectedKwh: pairedExpected.valueHours[k] as number,
      pairedCoveredHours: pairedMeasured.coveredHours[k] as number,
      resourceHours: resource.valueHours[k] as number,
      deliveringHours: delivering.valueHours[k] as number,
    });
  }
  return totals;
}

/**
 * Totals of the union of buckets: every field added.
 * @example sumEnergyTotals([emptyEnergyTotals(744), emptyEnergyTotals(720)]).periodHours // 1464
 */
export function sumEnergyTotals(list: readonly EnergyTotals[]): EnergyTotals {
  const sum: { -readonly [K in keyof EnergyTotals]: number } = { ...emptyEnergyTotals(0) };
  for (const t of list) {
    sum.periodHours += t.periodHours;
    sum.kwh += t.kwh;
    sum.coveredHours += t.coveredHours;
    sum.expectedKwh += t.expectedKwh;
    sum.expectedCoveredHours += t.expectedCoveredHours;
    sum.pairedKwh += t.pairedKwh;
    sum.pairedExpectedKwh += t.pairedExpectedKwh;
    sum.pairedCoveredHours += t.pairedCoveredHours;
    sum.resourceHours += t.resourceHours;
    sum.deliveringHours += t.deliveringHours;
  }
  return sum;
}
