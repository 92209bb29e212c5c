/**
 * The unit screen in one call: the unit, its evidence (voltage against speed),
 * its Ke history and trend, and the time series of the range asked, read by
 * the unit queries and turned into the panels' view model (view-model.ts).
 */
import { z } from 'zod';
import type { Db } from '@/db/client';
import type { Viewer } from '@/lib/auth/viewer';
import { SLUG } from '@/lib/contract/nameplate';
import { requestContext } from '@/lib/request/context';
import { getAlerts } from '@/lib/alerts/queries';
import { alertRowView, alertsHref, type AlertRowView } from '@/lib/alerts/screen';
import type { KeTrend } from '@/lib/diagnosis/trend';
import {
  getUnitEmfView,
  getUnitKeHistory,
  getUnitSeries,
  getUnitView,
  SERIES_RANGE_KEYS,
  type KeDay,
  type SeriesRange,
  type UnitEmfView,
  type UnitSeries,
  type UnitView,
} from './queries';
import {
  emfPanelView,
  findingsView,
  kePanelView,
  nameplateView,
  seriesPanelView,
  unitHeadView,
  type EmfPanelView,
  type FindingsView,
  type KePanelView,
  type NameplateView,
  type SeriesPanelView,
  type UnitHeadView,
} from './view-model';

/** The unit screen's view model: plain data, every number binned and every text chosen. */
export interface UnitScreen {
  readonly nowMs: number;
  /** The site's zone, in which every time on the screen is shown. */
  readonly timeZone: string;
  readonly site: { readonly id: string; readonly name: string };
  /** The unit's id and its name (null when it has none). */
  readonly unit: { readonly id: string; readonly name: string | null };
  readonly head: UnitHeadView;
  readonly findings: FindingsView;
  readonly emf: EmfPanelView;
  readonly ke: KePanelView;
  readonly series: SeriesPanelView;
  readonly nameplate: NameplateView;
}

const rangeSchema = z.enum(SERIES_RANGE_KEYS as [SeriesRange, ...SeriesRange[]]);

/** Default range of the time charts. */
export const DEFAULT_RANGE: SeriesRange = '6h';

/** The range asked for, or the default and a sentence saying why the one asked could not be used. */
export function parseRange(rangeParam: string | string[] | undefined): { range: SeriesRange; problem: string | undefined } {
  const raw = Array.isArray(rangeParam) ? rangeParam[0] : rangeParam;
  const parsed = raw === undefined || raw === '' ? undefined : rangeSchema.safeParse(raw);
  if (parsed === undefined) return { range: DEFAULT_RANGE, problem: undefined };
  if (parsed.success) return { range: parsed.data, problem: undefined };
  return { range: DEFAULT_RANGE, problem: `range: "${String(raw).slice(0, 40)}" is not one of ${SERIES_RANGE_KEYS.join(', ')}; showing ${DEFAULT_RANGE}` };
}

/** The unit screen for this request's viewer; undefined when there is no such unit on that site or the viewer may not see it. */
export async function loadUnitScreen({ siteId, unitId, range }: { siteId: string; unitId: string; range: string | string[] | undefined }): Promise<UnitScreenWithAlerts | undefined> {
  if (!SLUG.test(siteId) || !SLUG.test(unitId)) return undefined;
  const { db, viewer, nowMs } = await requestContext();
  return readUnitScreen({ db, viewer, siteId, unitId, rangeParam: range, nowMs });
}

/** The unit screen's view model; the page and the bench share exactly this. */
export async function readUnitScreen({
  db,
  viewer,
  siteId,
  unitId,
  rangeParam,
  nowMs,
}: {
  db: Db;
  viewer: Viewer;
  siteId: string;
  unitId: string;
  rangeParam: string | string[] | undefined;
  nowMs: number;
}): Promise<UnitScreenWithAlerts | undefined> {
  const view = await getUnitView({ db, viewer, siteId, unitId, nowMs });
  if (view === undefined) return undefined;
  const { range, problem } = parseRange(rangeParam);
  const [emf, ke, series, alerts] = await Promise.all([
    getUnitEmfView({ db, view, nowMs }),
    getUnitKeHistory({ db, view, nowMs }),
    getUnitSeries({ db, viewer, siteId, unitId, range, nowMs }),
    getAlerts({ db, viewer, siteId, unitId, state: 'active', limit: UNIT_ALERTS_SHOWN }),
  ]);
  // The unit was just found for this viewer, so its series are there too.
  return {
    ...unitScreenOf({ view, emf, ke, series: series as UnitSeries, problem, nowMs }),
    alerts: { rows: alerts.alerts.map((a) => alertRowView(a, viewer, nowMs)), allHref: alertsHref({ site: siteId, unit: unitId, state: 'all' }) },
  };
}

/** Open alerts shown on the unit page (the list has the rest). */
export const UNIT_ALERTS_SHOWN = 10;

/** The unit screen with the unit's open alerts (those in the crews' list). */
export interface UnitScreenWithAlerts extends UnitScreen {
  readonly alerts: { readonly rows: AlertRowView[]; readonly allHref: string };
}

/** The view model from what the unit queries read: pure, so the panels' words and numbers are tested without a database. */
export function unitScreenOf({
  view,
  emf,
  ke,
  series,
  problem,
  nowMs,
}: {
  view: UnitView;
  emf: UnitEmfView;
  ke: { days: readonly KeDay[]; trend: KeTrend };
  series: UnitSeries;
  problem: string | undefined;
  nowMs: number;
}): UnitScreen {
  return {
    nowMs,
    timeZone: view.site.timezone,
    site: { id: view.site.id, name: view.site.name },
    unit: { id: view.unit.id, name: view.unit.name },
    head: unitHeadView(view, nowMs),
    findings: findingsView(view, nowMs),
    emf: emfPanelView(view, emf),
    ke: kePanelView(view, ke, nowMs),
    series: seriesPanelView(view, series, problem),
    nameplate: nameplateView(view),
  };
}
