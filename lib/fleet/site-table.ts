/**
 * Sorting and filtering of a site's units table, from the page's search
 * parameters (so they work without JavaScript, as plain links and a form).
 * Pure; the parameters are parsed with zod and a bad one is named, not ignored.
 */
import { z } from 'zod';
import { compareStates, UNIT_STATES, type UnitState } from './unit-state';
import type { UnitLatest } from './queries';

export const SITE_SORTS = ['state', 'unit', 'power', 'ke', 'unbalance', 'stator', 'last'] as const;
export type SiteSort = (typeof SITE_SORTS)[number];

/** What each sort is called on the screen. */
export const SITE_SORT_LABEL: Record<SiteSort, string> = {
  state: 'State (worst first)',
  unit: 'Unit',
  power: 'Power',
  ke: 'Ke ratio',
  unbalance: 'Unbalance',
  stator: 'Stator temperature',
  last: 'Last sample',
};

export interface SiteTableParams {
  readonly sort: SiteSort;
  readonly dir: 'asc' | 'desc';
  readonly state: UnitState | 'all';
}

const DEFAULTS: SiteTableParams = { sort: 'state', dir: 'asc', state: 'all' };

const fields = {
  sort: z.enum(SITE_SORTS),
  dir: z.enum(['asc', 'desc']),
  state: z.enum(['all', ...UNIT_STATES]),
};

/**
 * The table's parameters from a page's search parameters; a bad value falls
 * back to the default and is reported in `problems`, naming the parameter.
 * @example parseSiteTableParams({ sort: 'power', dir: 'desc' }).params.sort // 'power'
 */
export function parseSiteTableParams(search: Record<string, string | string[] | undefined>): { params: SiteTableParams; problems: string[] } {
  const problems: string[] = [];
  const out: Record<string, string> = { ...DEFAULTS };
  for (const [name, schema] of Object.entries(fields)) {
    const raw = search[name];
    if (raw === undefined || raw === '') continue;
    const value = Array.isArray(raw) ? raw[0] : raw;
    const parsed = schema.safeParse(value);
    if (parsed.success) out[name] = parsed.data;
    else problems.push(`${name}: "${String(value).slice(0, 40)}" is not one of ${schema.options.join(', ')}; showing ${out[name]}`);
  }
  return { params: out as unknown as SiteTableParams, problems };
}

const byNumber = (pick: (u: UnitLatest) => number | null) => (a: UnitLatest, b: UnitLatest) => {
  const x = pick(a);
  const y = pick(b);
  if (x === null && y === null) return 0;
  // Missing values go last whichever the direction; see `sortSiteUnits`.
  if (x === null) return Number.POSITIVE_INFINITY;
  if (y === null) return Number.NEGATIVE_INFINITY;
  return x - y;
};

const COMPARE: Record<SiteSort, (a: UnitLatest, b: UnitLatest) => number> = {
  state: (a, b) => compareStates(a.state, b.state),
  unit: (a, b) => a.id.localeCompare(b.id),
  power: byNumber((u) => u.kw),
  ke: byNumber((u) => u.keRatio),
  unbalance: byNumber((u) => u.unbalancePct),
  stator: byNumber((u) => u.statorC),
  last: byNumber((u) => u.lastSampleMs),
};

/**
 * The units to show: those in the chosen state, sorted; ties by unit id, missing values last.
 * @example sortSiteUnits(units, { sort: 'ke', dir: 'asc', state: 'all' })[0] // the unit with the lowest Ke ratio
 */
export function sortSiteUnits(units: readonly UnitLatest[], params: SiteTableParams): UnitLatest[] {
  const compare = COMPARE[params.sort];
  const sign = params.dir === 'desc' ? -1 : 1;
  return units
    .filter((u) => params.state === 'all' || u.state.state === params.state)
    .slice()
    .sort((a, b) => {
      const c = compare(a, b);
      if (c === Number.POSITIVE_INFINITY || c === Number.NEGATIVE_INFINITY) return c > 0 ? 1 : -1;
      return sign * c || a.id.localeCompare(b.id);
    });
}
