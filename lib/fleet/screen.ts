/**
 * What the fleet, site and wall-display screens read, one function a screen:
 * `load…Screen` resolves this request's database and viewer (or a display
 * link's), `read…Screen` builds the view model from lib/fleet/queries.ts —
 * the page, the read API and bench:queries share it.
 */
import type { Db } from '@/db/client';
import { resolveDisplayLink } from '@/lib/auth/display-links';
import { canEditSetup, siteFilter, type Viewer } from '@/lib/auth/viewer';
import { getConfig } from '@/lib/config/env';
import { resolveLimits, unbalanceIsAlarm } from '@/lib/diagnosis/limits';
import { currentDemoStatus, type DemoStatus } from '@/lib/fleet/demo-status';
import { sinceText, UNIT_STATE_NAME, UNIT_STATES, type UnitState } from '@/lib/fleet/unit-state';
import { databaseOnly, requestContext } from '@/lib/request/context';
import { countOpenAlertsBySite, type SiteAlertCount } from '@/lib/alerts/queries';
import { alertsHref } from '@/lib/alerts/screen';
import { getFleetSites, getSiteView, type FleetSite, type SiteView } from './queries';
import { getQuarantineSummary, QUARANTINE_COUNT_CAP, type QuarantineSummary } from '@/lib/quality/queries';
import { parseSiteTableParams, SITE_SORTS, sortSiteUnits, type SiteSort, type SiteTableParams } from './site-table';
import type { UnitLatest } from './queries';

export interface FleetScreen {
  readonly sites: FleetSite[];
  readonly nowMs: number;
  /** Telemetry set aside as invalid, for a viewer who sees every site (it is not tied to one), in words. */
  readonly quarantine: SetAsideView | undefined;
  /** How long raw samples and set-aside telemetry are kept (RETENTION_DAYS). */
  readonly retentionDays: number;
  readonly canEditSetup: boolean;
  /** What the demo fleet is doing, or undefined when it is not part of this process. */
  readonly demo?: DemoStatus;
  /** Units in each state over the whole fleet, and how many need attention. */
  readonly totals: Record<UnitState, number>;
  readonly unitCount: number;
  readonly attention: number;
  /** Open alerts of each site (in the crews' list, not shelved), in words, with the list's address. */
  readonly alerts: Record<string, SiteAlertsView>;
}

/** A site's open alerts as its card and page show them. */
export interface SiteAlertsView {
  readonly open: number;
  readonly alarms: number;
  /** "none", "3 (1 alarm)". */
  readonly text: string;
  readonly href: string;
}

/** The words and link of a site's open alerts. */
export function siteAlertsView(siteId: string, count: Pick<SiteAlertCount, 'open' | 'alarms'> | undefined): SiteAlertsView {
  const open = count?.open ?? 0;
  const alarms = count?.alarms ?? 0;
  const text = open === 0 ? 'none' : `${open}${alarms > 0 ? ` (${alarms} alarm${alarms === 1 ? '' : 's'})` : ''}`;
  return { open, alarms, text, href: alertsHref({ site: siteId }) };
}

/** The fleet page's note of telemetry set aside: counts as words, the newest entries with their age. */
export interface SetAsideView {
  readonly total: number;
  /** "12", or "more than 10,000" past the count's cap. */
  readonly lastDayText: string;
  readonly totalText: string;
  readonly recent: ReadonlyArray<{ ago: string; topic: string; reason: string }>;
}

/** A count of set-aside rows; the query stops counting past the cap. */
export function setAsideCount(n: number): string {
  return n > QUARANTINE_COUNT_CAP ? `more than ${QUARANTINE_COUNT_CAP.toLocaleString('en-GB')}` : n.toLocaleString('en-GB');
}

function setAsideView(summary: QuarantineSummary, nowMs: number): SetAsideView {
  return {
    total: summary.total,
    lastDayText: setAsideCount(summary.lastDay),
    totalText: setAsideCount(summary.total),
    recent: summary.recent.map((q) => ({ ago: `${sinceText(nowMs - q.receivedAt.getTime())} ago`, topic: q.topic, reason: q.reason })),
  };
}

/** Every site the viewer sees, worst first, with what needs attention (this process's database, this request's viewer). */
export async function loadFleetScreen(): Promise<FleetScreen> {
  const { db, viewer, nowMs } = await requestContext();
  return readFleetScreen({ db, viewer, nowMs });
}

/** The fleet screen's data; the bench times exactly this. */
export async function readFleetScreen({ db, viewer, nowMs }: { db: Db; viewer: Viewer; nowMs: number }): Promise<FleetScreen> {
  const seesAll = siteFilter(viewer) === undefined;
  const [sites, quarantine, alertCounts] = await Promise.all([
    getFleetSites({ db, viewer, nowMs }),
    seesAll ? getQuarantineSummary({ db }) : undefined,
    countOpenAlertsBySite({ db, viewer }),
  ]);
  const countOf = new Map(alertCounts.map((c) => [c.siteId, c]));
  const totals = Object.fromEntries(UNIT_STATES.map((s) => [s, sites.reduce((n, site) => n + site.counts[s], 0)])) as Record<UnitState, number>;
  const unitCount = sites.reduce((n, s) => n + s.unitCount, 0);
  return {
    sites,
    nowMs,
    quarantine: quarantine && setAsideView(quarantine, nowMs),
    retentionDays: getConfig().RETENTION_DAYS,
    canEditSetup: canEditSetup(viewer),
    demo: currentDemoStatus(),
    totals,
    unitCount,
    attention: unitCount - totals.healthy,
    alerts: Object.fromEntries(sites.map((site) => [site.id, siteAlertsView(site.id, countOf.get(site.id))])),
  };
}

/** A unit's row of the site table: its readings and the lines they are judged against. */
export interface SiteRowView extends UnitLatest {
  /** The unit's own Ke lines (nameplate limits over the defaults). */
  readonly keWarnRatio: number;
  readonly keAlarmRatio: number;
  /** Unbalance past the unit's alarm line (the diagnosis's own rule). */
  readonly unbalanceAlarm: boolean;
}

export interface SiteScreen {
  readonly site: SiteView;
  /** The units to show, filtered and sorted as asked. */
  readonly rows: SiteRowView[];
  /** "all 4 units", or "1 of 4 units: Fault". */
  readonly shown: string;
  /** The address of each sortable column's header: the other way round when it is already the sort. */
  readonly sortHrefs: Record<SiteSort, string>;
  /** Whether the filter differs from the default (state all, by state, ascending). */
  readonly filtered: boolean;
  /** Start of the sparklines' window, ms. */
  readonly sparkFromMs: number;
  readonly alerts: SiteAlertsView;
  readonly params: SiteTableParams;
  /** Search parameters that could not be used, each naming the parameter. */
  readonly problems: string[];
  readonly nowMs: number;
}

/** One site's table for the viewer; undefined when there is no such site or the viewer may not see it. */
export async function loadSiteScreen(siteId: string, search: Record<string, string | string[] | undefined>): Promise<SiteScreen | undefined> {
  const { db, viewer, nowMs } = await requestContext();
  return readSiteScreen({ db, viewer, siteId, search, nowMs });
}

/** The link that sorts by `sort`: the other way round when it is already the sort. */
export function sortHref(params: SiteTableParams, sort: SiteSort): string {
  const dir = params.sort === sort && params.dir === 'asc' ? 'desc' : 'asc';
  const q = new URLSearchParams({ sort, dir });
  if (params.state !== 'all') q.set('state', params.state);
  return `?${q.toString()}`;
}

function rowView(u: UnitLatest): SiteRowView {
  const limits = resolveLimits(u.diagnosisLimits ?? undefined);
  return { ...u, keWarnRatio: limits.keWarnRatio, keAlarmRatio: limits.keAlarmRatio, unbalanceAlarm: unbalanceIsAlarm(u.unbalancePct, limits) };
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
  const [site, [alertCount]] = await Promise.all([getSiteView({ db, viewer, siteId, nowMs }), countOpenAlertsBySite({ db, viewer, siteId })]);
  if (site === undefined) return undefined;
  const { params, problems } = parseSiteTableParams(search);
  const rows = sortSiteUnits(site.units, params).map(rowView);
  const total = site.units.length;
  return {
    site,
    rows,
    shown: params.state === 'all' ? `all ${total} units` : `${rows.length} of ${total} units: ${UNIT_STATE_NAME[params.state]}`,
    sortHrefs: Object.fromEntries(SITE_SORTS.map((s) => [s, sortHref(params, s)])) as Record<SiteSort, string>,
    filtered: params.state !== 'all' || params.sort !== 'state' || params.dir !== 'asc',
    sparkFromMs: nowMs - site.sparkHours * 3_600_000,
    alerts: siteAlertsView(siteId, alertCount),
    params,
    problems,
    nowMs,
  };
}

export type DisplayScreen = { name: string; nowMs: number } & ({ kind: 'site'; site: SiteScreen } | { kind: 'fleet'; fleet: FleetScreen });

/**
 * What a wall screen's display link shows: one site's table or the fleet, read as the link's
 * read-only viewer (lib/auth/display-links.ts); undefined when the link is unknown or revoked
 * (or its site is gone).
 */
export async function loadDisplayScreen(token: string): Promise<DisplayScreen | undefined> {
  const { db } = await databaseOnly();
  const link = await resolveDisplayLink({ db, token });
  if (!link) return undefined;
  const nowMs = Date.now();
  if (link.siteId) {
    const site = await readSiteScreen({ db, viewer: link.viewer, siteId: link.siteId, search: {}, nowMs });
    return site ? { kind: 'site', site, name: link.name, nowMs } : undefined;
  }
  return { kind: 'fleet', fleet: await readFleetScreen({ db, viewer: link.viewer, nowMs }), name: link.name, nowMs };
}
