/**
 * What the unit screen reads, in one call: the unit, its evidence (voltage
 * against speed), its Ke history and trend, and the time series of the range asked.
 */
import { z } from 'zod';
import { getDatabase, type Db } from '@/db/client';
import { currentViewer, type Viewer } from '@/lib/auth/viewer';
import { SLUG } from '@/lib/contract/nameplate';
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
import type { KeTrend } from '@/lib/diagnosis/trend';

export interface UnitScreen {
  readonly view: UnitView;
  readonly emf: UnitEmfView;
  readonly ke: { days: KeDay[]; trend: KeTrend; fromMs: number };
  readonly series: UnitSeries;
  /** A range parameter that could not be used, naming it. */
  readonly problem: string | undefined;
  readonly nowMs: number;
}

const rangeSchema = z.enum(SERIES_RANGE_KEYS as [SeriesRange, ...SeriesRange[]]);

/** Default range of the time charts. */
export const DEFAULT_RANGE: SeriesRange = '6h';

/** The unit screen for the viewer; undefined when there is no such unit on that site or the viewer may not see it. */
export async function loadUnitScreen(siteId: string, unitId: string, rangeParam: string | string[] | undefined): Promise<UnitScreen | undefined> {
  if (!SLUG.test(siteId) || !SLUG.test(unitId)) return undefined;
  const { db } = await getDatabase();
  return readUnitScreen({ db, viewer: await currentViewer(), siteId, unitId, rangeParam, nowMs: Date.now() });
}

/** The unit screen's data; the bench times exactly this. */
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
}): Promise<UnitScreen | undefined> {
  const view = await getUnitView({ db, viewer, siteId, unitId, nowMs });
  if (view === undefined) return undefined;
  const raw = Array.isArray(rangeParam) ? rangeParam[0] : rangeParam;
  const parsed = raw === undefined || raw === '' ? undefined : rangeSchema.safeParse(raw);
  const range = parsed?.success ? parsed.data : DEFAULT_RANGE;
  const problem =
    parsed !== undefined && !parsed.success ? `range: "${String(raw).slice(0, 40)}" is not one of ${SERIES_RANGE_KEYS.join(', ')}; showing ${DEFAULT_RANGE}` : undefined;
  const [emf, ke, series] = await Promise.all([
    getUnitEmfView({ db, view, nowMs }),
    getUnitKeHistory({ db, view, nowMs }),
    getUnitSeries({ db, viewer, siteId, unitId, range, nowMs }),
  ]);
  return { view, emf, ke, series: series as UnitSeries, problem, nowMs };
}
