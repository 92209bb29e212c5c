/**
 * The data-quality screen: telemetry set aside, newest first, paged on the
 * received-time index, and counts per unit over the last day, filtered by a
 * site or unit from the search parameters (a bad one is named and dropped).
 */
import { z } from 'zod';
import type { Db } from '@/db/client';
import type { Viewer } from '@/lib/auth/viewer';
import { SLUG } from '@/lib/contract/nameplate';
import {
  formatCursor,
  getQuarantineCountsByUnit,
  getQuarantinePage,
  parseCursor,
  QUARANTINE_PAGE_SIZE,
  type QuarantineEntry,
  type QuarantineUnitCount,
} from '@/lib/quality/queries';
import { requestContext } from '@/lib/request/context';
import { getSetupSites, type SetupSite } from '@/lib/setup/queries';

const optionalSlug = (name: string) =>
  z
    .string()
    .optional()
    .transform((v) => (v === undefined || v === '' ? undefined : v))
    .refine((v) => v === undefined || SLUG.test(v), { error: `${name}: not a ${name} id (1 to 64 of a-z, 0-9 and -)` });

/** Search parameters of /data-quality: a site and unit to filter by, and the page cursor. */
export const dataQualityQuerySchema = z.object({
  site: optionalSlug('site'),
  unit: optionalSlug('unit'),
  before: z
    .string()
    .optional()
    .refine((v) => v === undefined || /^\d{1,15}-\d{1,18}$/.test(v), { error: 'before: not a page position of this screen' }),
});

export type DataQualityQuery = z.output<typeof dataQualityQuerySchema>;
type Search = Record<string, string | string[] | undefined>;

/** The screen's address for a filter and page. */
export function dataQualityHref(params: { site?: string; unit?: string; before?: string }): string {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v) q.set(k, v);
  const s = q.toString();
  return s ? `/data-quality?${s}` : '/data-quality';
}

/** A unit's row of the last day's counts, with its link and time zone chosen. */
export interface QualityCountRow extends QuarantineUnitCount {
  /** The unit's entries, or undefined for telemetry on no unit's topic. */
  readonly href: string | undefined;
  /** What to call a row that is not a unit. */
  readonly label: string;
  readonly timeZone: string;
}

export interface DataQualityScreen {
  readonly sites: SetupSite[];
  readonly query: DataQualityQuery;
  /** A search parameter that could not be used, naming it. */
  readonly problem: string | undefined;
  readonly filtered: boolean;
  /** 'unit qv-03', 'site x' or 'all sites'. */
  readonly what: string;
  readonly counts: { rows: QualityCountRow[]; total: number; capped: boolean; summary: string };
  readonly entries: QuarantineEntry[];
  readonly emptyText: string;
  readonly newestHref: string | undefined;
  readonly olderHref: string | undefined;
  readonly pageSize: number;
}

const one = (v: string | string[] | undefined): string | undefined => (Array.isArray(v) ? v[0] : v);

export async function loadDataQualityScreen(search: Search): Promise<DataQualityScreen> {
  const { db, viewer } = await requestContext();
  return readDataQualityScreen({ db, viewer, search });
}

/** The screen's view model for the viewer (only their sites' entries and counts). */
export async function readDataQualityScreen({ db, viewer, search }: { db: Db; viewer: Viewer; search: Search }): Promise<DataQualityScreen> {
  const parsed = dataQualityQuerySchema.safeParse({ site: one(search.site), unit: one(search.unit), before: one(search.before) });
  const problem = parsed.success ? undefined : parsed.error.issues[0]!.message;
  const query: DataQualityQuery = parsed.success ? parsed.data : { site: undefined, unit: undefined, before: undefined };
  const before = query.before ? parseCursor(query.before) : undefined;
  const filter = { siteId: query.site, unitId: query.unit };
  const [sites, page, counts] = await Promise.all([
    getSetupSites({ db, viewer }),
    getQuarantinePage({ db, viewer, ...filter, before }),
    getQuarantineCountsByUnit({ db, viewer, ...filter }),
  ]);
  const zoneOf = new Map(sites.map((s) => [s.id, s.timezone]));
  const what = query.unit ? `unit ${query.unit}` : query.site ? `site ${query.site}` : 'all sites';
  const rows = counts.units.map((u) => ({
    ...u,
    href: u.siteId && u.unitId ? dataQualityHref({ site: u.siteId, unit: u.unitId }) : undefined,
    label: u.siteId && u.unitId ? `${u.siteId}/${u.unitId}` : u.siteId ? `${u.siteId} (no unit)` : 'Not a unit topic',
    timeZone: (u.siteId && zoneOf.get(u.siteId)) || 'UTC',
  }));
  const summary = `${counts.capped ? 'More than ' : ''}${counts.total.toLocaleString('en-GB')} ${counts.total === 1 ? 'entry' : 'entries'} for ${what}${counts.capped ? ' (counted over the newest only)' : ''}.`;
  return {
    sites,
    query,
    problem,
    filtered: query.site !== undefined || query.unit !== undefined,
    what,
    counts: { rows, total: counts.total, capped: counts.capped, summary },
    entries: page.entries,
    emptyText: before ? 'No older entries.' : `Nothing set aside for ${what}: every message received was stored.`,
    newestHref: before ? dataQualityHref({ site: query.site, unit: query.unit }) : undefined,
    olderHref: page.next ? dataQualityHref({ site: query.site, unit: query.unit, before: formatCursor(page.next) }) : undefined,
    pageSize: QUARANTINE_PAGE_SIZE,
  };
}
