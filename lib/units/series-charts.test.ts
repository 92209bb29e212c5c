import { describe, expect, it } from 'vitest';
import type { SeriesBucket } from '@/lib/charts/downsample';
import { CONTRACT_GAP_MS, gapLimitMs, mergeSeriesRows, seriesGroups, seriesStats } from './series-charts';

const MIN = 60_000;
const bucket = (t: number, mean: number, min = mean, max = mean, count = 1): SeriesBucket => ({ t, min, max, mean, count });

describe('the gap rule of the time charts', () => {
  it('is the contract’s 10 minutes for samples 10 s apart', () => {
    // Contract, section 5 (energy): "An interval longer than 10 minutes is a gap".
    expect(CONTRACT_GAP_MS).toBe(10 * MIN);
    expect(gapLimitMs([0, 10_000, 20_000, 30_000])).toBe(10 * MIN);
  });

  it('bridges a step just under 10 minutes and breaks the line just over it', () => {
    const step = 10_000;
    const before = [0, step, 2 * step].map((t) => bucket(t, 1));
    // Contract, section 5 (energy): an interval of 10 minutes or less is covered, longer is a gap.
    const under = mergeSeriesRows({ rpm: [...before, bucket(2 * step + 10 * MIN - 1, 2)] }, ['rpm'], false);
    expect(under.some((r) => r.rpm === null)).toBe(false);
    const exactly = mergeSeriesRows({ rpm: [...before, bucket(2 * step + 10 * MIN, 2)] }, ['rpm'], false);
    expect(exactly.some((r) => r.rpm === null)).toBe(false);
    // Contract, section 5 (energy): just over 10 minutes is a gap; a row of nulls 1 ms after the last point breaks the line.
    const over = mergeSeriesRows({ rpm: [...before, bucket(2 * step + 10 * MIN + 1, 2)] }, ['rpm'], false);
    expect(over.map((r) => r.t)).toEqual([0, step, 2 * step, 2 * step + 1, 2 * step + 10 * MIN + 1]);
    expect(over[3]).toEqual({ t: 2 * step + 1, rpm: null, band: null });
  });

  it('widens to five typical steps where the points lie further apart (daily rollups), so a coarse series is not all gaps', () => {
    const day = 86_400_000;
    expect(gapLimitMs([0, day, 2 * day, 3 * day])).toBe(5 * day);
    const rows = mergeSeriesRows({ kw: [0, 1, 2, 3, 9].map((d) => bucket(d * day, d)) }, ['kw'], false);
    expect(rows.filter((r) => r.kw === null)).toHaveLength(1);
    expect(rows.find((r) => r.kw === null)?.t).toBe(3 * day + 1);
  });
});

describe('mergeSeriesRows', () => {
  it('puts the fields side by side by whole-ms time, with the first field’s min–max as the band', () => {
    const rows = mergeSeriesRows(
      { vab: [bucket(1000.4, 400, 390, 410), bucket(2000, 401)], vbc: [bucket(1000.2, 399), bucket(3000, 398)] },
      ['vab', 'vbc', 'vca'],
      true,
    );
    expect(rows).toEqual([
      { t: 1000, vab: 400, vbc: 399, band: [390, 410] },
      { t: 2000, vab: 401, band: [401, 401] },
      { t: 3000, vbc: 398 },
    ]);
  });
});

describe('seriesStats', () => {
  it('weights each bucket’s mean by the samples it stands for', () => {
    expect(seriesStats([bucket(0, 2, 1, 3, 1), bucket(1, 5, 4, 6, 3)])).toEqual({ min: 1, max: 6, mean: 4.25, n: 4 });
    expect(seriesStats([])).toBeUndefined();
  });
});

describe('seriesGroups', () => {
  it('draws each line and phase from raw samples and only their means from rollups', () => {
    expect(seriesGroups('wind', true).map((g) => g.fields.join('+'))).toEqual(['rpm', 'hz', 'vab+vbc+vca', 'ia+ib+ic', 'kw', 'statorC+ambientC', 'resource']);
    expect(seriesGroups('hydro', false).map((g) => g.fields.join('+'))).toEqual(['rpm', 'vll', 'amps', 'kw', 'statorC', 'resource']);
    expect(seriesGroups('hydro', false).at(-1)).toMatchObject({ title: 'Water flow', unit: 'm³/s' });
  });
});
