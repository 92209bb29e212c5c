/**
 * The unit screen's time charts as rows a chart draws: which fields each chart
 * shows, their buckets merged side by side by time with gaps marked, and the
 * min, mean and max each caption states. Pure: the screen's view model calls it.
 */
import type { SeriesBucket } from '@/lib/charts/downsample';
import type { SeriesField } from './queries';

/** The contract's gap: an interval between samples longer than 10 minutes (contract, section 5, energy). */
export const CONTRACT_GAP_MS = 10 * 60_000;

/** One time chart: its title, the unit of its axis and the fields it draws. */
export interface SeriesGroup {
  readonly title: string;
  readonly unit: string;
  readonly fields: readonly SeriesField[];
}

/** One row of a chart: its time, each field's bucket mean and, for the first field, its min–max band; null breaks the line. */
export type SeriesRow = Record<string, number | [number, number] | null>;

/**
 * Which fields each time chart draws: raw samples keep each line and phase and
 * the frequency; the rollups keep only the means of the three lines and phases.
 * @example seriesGroups('hydro', false).at(-1) // { title: 'Water flow', unit: 'm³/s', fields: ['resource'] }
 */
export function seriesGroups(kind: 'wind' | 'hydro', raw: boolean): SeriesGroup[] {
  const resource = kind === 'wind' ? { title: 'Wind speed', unit: 'm/s' } : { title: 'Water flow', unit: 'm³/s' };
  return raw
    ? [
        { title: 'Speed', unit: 'rpm', fields: ['rpm'] },
        { title: 'Frequency', unit: 'Hz', fields: ['hz'] },
        { title: 'Line voltages', unit: 'V', fields: ['vab', 'vbc', 'vca'] },
        { title: 'Phase currents', unit: 'A', fields: ['ia', 'ib', 'ic'] },
        { title: 'Power', unit: 'kW', fields: ['kw'] },
        { title: 'Temperatures', unit: '°C', fields: ['statorC', 'ambientC'] },
        { ...resource, fields: ['resource'] },
      ]
    : [
        { title: 'Speed', unit: 'rpm', fields: ['rpm'] },
        { title: 'Line voltage (mean of the lines)', unit: 'V', fields: ['vll'] },
        { title: 'Current (mean of the phases)', unit: 'A', fields: ['amps'] },
        { title: 'Power', unit: 'kW', fields: ['kw'] },
        { title: 'Stator temperature', unit: '°C', fields: ['statorC'] },
        { ...resource, fields: ['resource'] },
      ];
}

/**
 * The longest step a line may bridge, ms: the contract's 10 minutes, or five
 * typical steps (the median) when the points lie further apart than that
 * (daily rollups), so that a coarse series is not all gaps.
 * @example gapLimitMs([0, 10_000, 20_000]) // 600000
 */
export function gapLimitMs(times: readonly number[]): number {
  const steps = times
    .slice(1)
    .map((t, i) => t - (times[i] as number))
    .sort((a, b) => a - b);
  const typical = steps[Math.floor(steps.length / 2)] ?? 0;
  return Math.max(CONTRACT_GAP_MS, 5 * typical);
}

/**
 * Rows of one chart: the fields' bucket means side by side by (whole-ms) time,
 * with the first field's min–max as `band` when asked; where two rows lie
 * further apart than {@link gapLimitMs}, a row of nulls 1 ms after the first
 * breaks the line, so a gap in the data stays a gap on the chart.
 */
export function mergeSeriesRows(series: Partial<Record<SeriesField, readonly SeriesBucket[]>>, fields: readonly SeriesField[], withBand: boolean): SeriesRow[] {
  const byT = new Map<number, SeriesRow>();
  fields.forEach((f, i) => {
    for (const b of series[f] ?? []) {
      const t = Math.round(b.t);
      const row = byT.get(t) ?? { t };
      row[f] = b.mean;
      if (withBand && i === 0) row.band = [b.min, b.max];
      byT.set(t, row);
    }
  });
  const rows = [...byT.values()].sort((a, b) => (a.t as number) - (b.t as number));
  const gapMs = gapLimitMs(rows.map((r) => r.t as number));
  const out: SeriesRow[] = [];
  for (const r of rows) {
    const prev = out.at(-1);
    if (prev && (r.t as number) - (prev.t as number) > gapMs) {
      out.push({ t: (prev.t as number) + 1, ...Object.fromEntries([...fields, 'band'].map((f) => [f, null])) });
    }
    out.push(r);
  }
  return out;
}

/** Lowest, highest and mean of a series over its buckets, the mean weighted by the samples each bucket stands for. */
export interface SeriesStats {
  readonly min: number;
  readonly max: number;
  readonly mean: number;
  /** Samples the buckets stand for. */
  readonly n: number;
}

/**
 * The caption's figures of one series; undefined when there are no buckets.
 * @example seriesStats([{ t: 0, min: 1, max: 3, mean: 2, count: 1 }, { t: 1, min: 4, max: 6, mean: 5, count: 3 }]) // { min: 1, max: 6, mean: 4.25, n: 4 }
 */
export function seriesStats(buckets: readonly SeriesBucket[]): SeriesStats | undefined {
  let min = Infinity;
  let max = -Infinity;
  let sum = 0;
  let n = 0;
  for (const b of buckets) {
    min = Math.min(min, b.min);
    max = Math.max(max, b.max);
    sum += b.mean * b.count;
    n += b.count;
  }
  return n > 0 ? { min, max, mean: sum / n, n } : undefined;
}
