/**
 * Reading alerts for people: the list (newest first, a page at a time), one
 * alert with its history, a unit's alerts, and the open alerts per site. Every
 * read takes the viewer and puts their sites in the statement; an alert of a
 * site the viewer may not see is `undefined`, like one that does not exist.
 * The list walks the (state, opened_at) or (unit_key, opened_at) index from a
 * cursor, so a page costs the same with a long history.
 */
import { and, asc, count, desc, eq, inArray, isNull, lt, or, sql, type SQL } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { sites, unitAlertEvents, unitAlerts, units, type UnitAlertEventRow, type UnitAlertRow } from '@/db/schema';
import { siteFilter, type Viewer } from '@/lib/auth/viewer';
import type { AlertCondition, AlertState } from '@/lib/contract/alerts';
import type { AlertSeverity } from './conditions';

/** Rows a list page shows unless asked otherwise. */
export const ALERT_PAGE_SIZE = 50;
/** Most rows one read returns. */
export const MAX_ALERT_PAGE = 500;

/** One alert with the unit and site it belongs to. */
export interface AlertWithPlace {
  readonly row: UnitAlertRow;
  readonly siteId: string;
  readonly siteName: string;
  readonly timezone: string;
  readonly unitId: string;
  readonly unitName: string | null;
}

/** Where a page starts: just older than this alert. */
export interface AlertCursor {
  readonly openedAt: Date;
  readonly id: number;
}

/** A cursor as a search parameter, and back (undefined for text that is not one). */
export function formatAlertCursor(c: AlertCursor): string {
  return `${c.openedAt.getTime()}-${c.id}`;
}
export function parseAlertCursor(text: string): AlertCursor | undefined {
  const m = /^(\d{1,15})-(\d{1,18})$/.exec(text);
  return m ? { openedAt: new Date(Number(m[1])), id: Number(m[2]) } : undefined;
}

/** The viewer's sites as a condition on `units.site_id` (false for a viewer of none). */
function viewerSites(viewer: Viewer): SQL | undefined {
  const only = siteFilter(viewer);
  if (only === undefined) return undefined;
  return only.length === 0 ? sql`false` : inArray(units.siteId, [...only]);
}

/**
 * The crews' list (contract section 7): not cleared, or cleared with nobody having taken it.
 * Written as states so that the (state, opened_at) index serves it.
 */
export function inCrewListClause(): SQL {
  return or(inArray(unitAlerts.state, ['active', 'acknowledged', 'shelved']), and(eq(unitAlerts.state, 'cleared'), isNull(unitAlerts.acknowledgedAt)))!;
}

const placeColumns = {
  row: unitAlerts,
  siteId: units.siteId,
  siteName: sites.name,
  timezone: sites.timezone,
  unitId: units.id,
  unitName: units.name,
} as const;

function withPlace(db: Db) {
  return db.select(placeColumns).from(unitAlerts).innerJoin(units, eq(units.key, unitAlerts.unitKey)).innerJoin(sites, eq(sites.id, units.siteId));
}

/** What the list may be narrowed to. */
export interface AlertFilter {
  /** `active`: the crews' list; `all`: every alert, history included (default `all`). */
  readonly state?: 'active' | 'all';
  /** Only alerts in exactly this state. */
  readonly inState?: AlertState;
  readonly siteId?: string;
  readonly unitId?: string;
  readonly severity?: AlertSeverity;
  readonly condition?: AlertCondition;
}

function filterClauses(viewer: Viewer, filter: AlertFilter, before: AlertCursor | undefined): SQL | undefined {
  return and(
    viewerSites(viewer),
    filter.state === 'active' ? inCrewListClause() : undefined,
    filter.inState ? eq(unitAlerts.state, filter.inState) : undefined,
    filter.siteId ? eq(units.siteId, filter.siteId) : undefined,
    filter.unitId ? eq(units.id, filter.unitId) : undefined,
    filter.severity ? eq(unitAlerts.severity, filter.severity) : undefined,
    filter.condition ? eq(unitAlerts.condition, filter.condition) : undefined,
    before
      ? or(lt(unitAlerts.openedAt, before.openedAt), and(eq(unitAlerts.openedAt, before.openedAt), lt(unitAlerts.id, before.id)))
      : undefined,
  );
}

/**
 * Alerts of the viewer's sites, newest opened first, older than `before` when given; `next` is
 * the cursor of the page after, if there is one.
 */
export async function getAlerts({
  db,
  viewer,
  before,
  limit = ALERT_PAGE_SIZE,
  ...filter
}: AlertFilter & { db: Db; viewer: Viewer; before?: AlertCursor; limit?: number }): Promise<{ alerts: AlertWithPlace[]; next?: AlertCursor }> {
  if (!Number.isInteger(limit) || limit < 1 || limit > MAX_ALERT_PAGE) throw new RangeError(`limit must be 1 to ${MAX_ALERT_PAGE}, got ${limit}`);
  const rows = await withPlace(db)
    .where(filterClauses(viewer, filter, before))
    .orderBy(desc(unitAlerts.openedAt), desc(unitAlerts.id))
    .limit(limit + 1);
  const alerts = rows.slice(0, limit);
  const last = alerts[alerts.length - 1];
  return { alerts, next: rows.length > limit && last ? { openedAt: last.row.openedAt, id: last.row.id } : undefined };
}

/** One alert with its place and its history (oldest first); undefined when it does not exist or is not the viewer's. */
export async function getAlertById({
  db,
  viewer,
  alertId,
}: {
  db: Db;
  viewer: Viewer;
  alertId: number;
}): Promise<(AlertWithPlace & { events: UnitAlertEventRow[] }) | undefined> {
  if (!Number.isSafeInteger(alertId) || alertId < 1) return undefined;
  const [found] = await withPlace(db).where(and(eq(unitAlerts.id, alertId), viewerSites(viewer)));
  if (!found) return undefined;
  const events = await db.select().from(unitAlertEvents).where(eq(unitAlertEvents.alertId, alertId)).orderBy(asc(unitAlertEvents.at), asc(unitAlertEvents.id));
  return { ...found, events };
}

/** Of these ids, the alerts the viewer may see (the others do not exist for them). */
export async function getVisibleAlertIds({ db, viewer, alertIds }: { db: Db; viewer: Viewer; alertIds: readonly number[] }): Promise<Set<number>> {
  if (alertIds.length === 0) return new Set();
  const rows = await db
    .select({ id: unitAlerts.id })
    .from(unitAlerts)
    .innerJoin(units, eq(units.key, unitAlerts.unitKey))
    .where(and(inArray(unitAlerts.id, [...alertIds]), viewerSites(viewer)));
  return new Set(rows.map((r) => r.id));
}

/** A unit's alerts, newest first (empty for a unit the viewer may not see). */
export async function getUnitAlerts({
  db,
  viewer,
  siteId,
  unitId,
  limit = ALERT_PAGE_SIZE,
}: {
  db: Db;
  viewer: Viewer;
  siteId: string;
  unitId: string;
  limit?: number;
}): Promise<AlertWithPlace[]> {
  return (await getAlerts({ db, viewer, siteId, unitId, limit })).alerts;
}

/** Open alerts of one site: in the crews' list and not shelved, the alarms among them, and those shelved. */
export interface SiteAlertCount {
  readonly siteId: string;
  readonly open: number;
  readonly alarms: number;
  readonly shelved: number;
}

/** Open alerts per site of the viewer's (sites with none are left out), for the fleet and site pages. */
export async function countOpenAlertsBySite({ db, viewer, siteId }: { db: Db; viewer: Viewer; siteId?: string }): Promise<SiteAlertCount[]> {
  const rows = await db
    .select({ siteId: units.siteId, state: unitAlerts.state, severity: unitAlerts.severity, n: count() })
    .from(unitAlerts)
    .innerJoin(units, eq(units.key, unitAlerts.unitKey))
    .where(and(inCrewListClause(), viewerSites(viewer), siteId === undefined ? undefined : eq(units.siteId, siteId)))
    .groupBy(units.siteId, unitAlerts.state, unitAlerts.severity);
  const bySite = new Map<string, { open: number; alarms: number; shelved: number }>();
  for (const r of rows) {
    const c = bySite.get(r.siteId) ?? { open: 0, alarms: 0, shelved: 0 };
    const n = Number(r.n);
    if (r.state === 'shelved') c.shelved += n;
    else {
      c.open += n;
      if (r.severity === 'alarm') c.alarms += n;
    }
    bySite.set(r.siteId, c);
  }
  return [...bySite.entries()].sort(([a], [b]) => a.localeCompare(b)).map(([siteId, c]) => ({ siteId, ...c }));
}
