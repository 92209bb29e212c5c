/**
 * What the fleet and site screens read, one function a screen: this process's
 * database, the viewer of the request, and the queries of lib/fleet/queries.ts.
 */
import { getDatabase, type Db } from '@/db/client';
import { canEditSetup, currentViewer, siteFilter, type Viewer } from '@/lib/auth/viewer';
import { getConfig } from '@/lib/config/env';
import { getComponentState } from '@/lib/server/registry';
import { getFleetSites, getSiteView, type FleetSite, type SiteView } from './queries';
import { getQuarantineSummary, type QuarantineSummary } from '@/lib/quality/queries';
import { parseSiteTableParams, sortSiteUnits, type SiteTableParams } from './site-table';
import type { UnitLatest } from './queries';

export interface FleetScreen {
  readonly sites: FleetSite[];
  readonly nowMs: number;
  /** Telemetry set aside as invalid, for a viewer who sees every site (it is not tied to one). */
  readonly quarantine: QuarantineSummary | undefined;
  /** How long raw samples and set-aside telemetry are kept (RETENTION_DAYS). */
  readonly retentionDays: number;
  readonly canEditSetup: boolean;
  /** What the demo fleet is doing, or undefined when it is not part of this process. */
  readonly demo?: { status: string; phase?: string };
}

/** Every site the viewer sees, worst first, with what needs attention (this process's database, this request's viewer). */
export async function loadFleetScreen(): Promise<FleetScreen> {
  const { db } = await getDatabase();
  return readFleetScreen({ db, viewer: await currentViewer(), nowMs: Date.now() });
}

/** The fleet screen's data; the bench times exactly this. */
export async function readFleetScreen({ db, viewer, nowMs }: { db: Db; viewer: Viewer; nowMs: number }): Promise<FleetScreen> {
  const seesAll = siteFilter(viewer) === undefined;
  const [sites, quarantine] = await Promise.all([getFleetSites({ db, viewer, nowMs }), seesAll ? getQuarantineSummary({ db }) : undefined]);
  const demo = (await getComponentState('demo')) as { status: string; phase?: string } | undefined;
  return {
    sites,
    nowMs,
    quarantine,
    retentionDays: getConfig().RETENTION_DAYS,
    canEditSetup: canEditSetup(viewer),
    demo: demo ? { status: demo.status, phase: demo.phase } : undefined,
  };
}

export interface SiteScreen {
  readonly site: SiteView;
  /** The units to show, filtered and sorted as asked. */
  readonly rows: UnitLatest[];
  readonly params: SiteTableParams;
  /** Search parameters that could not be used, each naming the parameter. */
  readonly problems: string[];
  readonly nowMs: number;
}

/** One site's table for the viewer; undefined when there is no such site or the viewer may not see it. */
export async function loadSiteScreen(siteId: string, search: Record<string, string | string[] | undefined>): Promise<SiteScreen | undefined> {
  const { db } = await getDatabase();
  return readSiteScreen({ db, viewer: await currentViewer(), siteId, search, nowMs: Date.now() });
}

/** The site screen's data; the bench times exactly this. */
export async function readSiteScreen({
  db,
  viewer,
  siteId,
  search,
  nowMs,
}: {
  db: Db;
  viewer: Viewer;
  siteId: string;
  search: Record<string, string | string[] | undefined>;
  nowMs: number;
}): Promise<SiteScreen | undefined> {
  const site = await getSiteView({ db, viewer, siteId, nowMs });
  if (site === undefined) return undefined;
  const { params, problems } = parseSiteTableParams(search);
  return { site, rows: sortSiteUnits(site.units, params), params, problems, nowMs };
}
