import { describe, expect, it } from 'vitest';
import { parseSiteTableParams, sortSiteUnits } from './site-table';
import type { UnitLatest } from './queries';
import { unitStateOf } from './unit-state';

const now = Date.parse('2026-12-02T12:00:00Z');
const u = (id: string, verdict: string | undefined, kw: number | null, keRatio: number | null): UnitLatest =>
  ({
    id,
    kw,
    keRatio,
    unbalancePct: null,
    statorC: null,
    lastSampleMs: now,
    state: unitStateOf({ health: verdict === undefined ? undefined : { verdict, findings: [] }, lastSampleMs: now, nowMs: now }),
  }) as unknown as UnitLatest;

const units = [u('a', 'healthy', 10, 1.0), u('b', 'demagnetised', null, 0.91), u('c', undefined, 30, null), u('d', 'healthy', 20, 0.99)];

describe('site table', () => {
  it('sorts by state worst first by default', () => {
    expect(sortSiteUnits(units, parseSiteTableParams({}).params).map((x) => x.id)).toEqual(['b', 'c', 'a', 'd']);
  });

  it('sorts by a number either way with missing values last', () => {
    expect(sortSiteUnits(units, { sort: 'power', dir: 'desc', state: 'all' }).map((x) => x.id)).toEqual(['c', 'd', 'a', 'b']);
    expect(sortSiteUnits(units, { sort: 'power', dir: 'asc', state: 'all' }).map((x) => x.id)).toEqual(['a', 'd', 'c', 'b']);
    expect(sortSiteUnits(units, { sort: 'ke', dir: 'asc', state: 'all' }).map((x) => x.id)).toEqual(['b', 'd', 'a', 'c']);
  });

  it('filters by state', () => {
    expect(sortSiteUnits(units, { sort: 'unit', dir: 'asc', state: 'healthy' }).map((x) => x.id)).toEqual(['a', 'd']);
  });

  it('names a bad parameter and falls back to the default', () => {
    const { params, problems } = parseSiteTableParams({ sort: 'colour', state: 'fault' });
    expect(params).toEqual({ sort: 'state', dir: 'asc', state: 'fault' });
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatch(/^sort: "colour" is not one of state, unit/);
  });
});
