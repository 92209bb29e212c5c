/**
 * Data access for sites and units.
 */
import { asc, eq, inArray, sql, type SQL } from 'drizzle-orm';
import { dbJson, dbNumber, dbNumberOrNull, parseRows, rowsOf, type Db } from '@/db/client';
import { sites, units, type SiteRow, type UnitRow } from '@/db/schema';
import { z } from 'zod';
import { diagnosisLimitsSchema, UNIT_KINDS } from '@/lib/contract/nameplate';
import { canSeeSite, siteFilter, type Viewer } from '@/lib/auth/viewer';
import { compareStates, OFFLINE_AFTER_MS, unitStateOf, UNIT_STATES, type UnitState, type UnitStateView } from './unit-state';


/** Every site, by name. */
export async function getSites({ db }: { db: Db }): Promise<SiteRow[]> {
  return db.select().from(sites).orderBy(asc(sites.name));
}

/** Every unit, by site and id. */
export async function getUnits({ db }: { db: Db }): Promise<UnitRow[]> {
  return db.select().from(units).orderBy(asc(units.siteId), asc(units.id));
}

/** One unit by its slug, or undefined. */
export async function getUnitById({ db, unitId }: { db: Db; unitId: string }): Promise<UnitRow | undefined> {
  const [row] = await db.select().from(units).where(eq(units.id, unitId)).limit(1);
  return row;
}

// ---------------------------------------------------------------------------
// Screens and the read API. Every function below takes the viewer and limits
// its rows to the viewer's sites in the statement itself; a site or unit the
// viewer may not see is undefined, exactly like one that does not exist.

/** `and <column> = any(<ids>)` when the viewer sees only some sites; nothing when all. */
function siteClause(viewer: Viewer, column: SQL) {
  const ids = siteFilter(viewer);
  return ids === undefined ? sql`` : sql`and ${column} = any(${sql.param([...ids])}::text[])`;
}

/** Sites the viewer may see, by name, with their units' ids: `GET /api/v1/sites`. */
export async function getSitesWithUnitIds({ db, viewer }: { db: Db; viewer: Viewer }): Promise<Array<{ id: string; name: string; timezone: string; units: string[] }>> {
  const rows = rowsOf<{ id: string; name: string; timezone: string; units: string[] | string | null }>(
    await db.execute(sql`
      select s.id, s.name, s.timezone,
             coalesce((select array_agg(u.id order by u.id) from units u where u.site_id = s.id), '{}'::text[]) as units
      from sites s
      where true ${siteClause(viewer, sql`s.id`)}
      order by s.name, s.id`),
  );
  return rows.map((r) => ({ id: r.id, name: r.name, timezone: r.timezone, units: pgTextArray(r.units) }));
}

/** A text[] as the drivers return it: an array (postgres-js, PGlite) or, rarely, its literal. */
function pgTextArray(value: string[] | string | null): string[] {
  if (value === null) return [];
  if (Array.isArray(value)) return value;
  const inner = value.replace(/^\{|\}$/g, '');
  return inner === '' ? [] : inner.split(',').map((s) => s.replace(/^"|"$/g, ''));
}

/** The latest state of one unit as the fleet and site screens show it. */
export interface UnitLatest {
  readonly key: number;
  readonly id: string;
  readonly siteId: string;
  readonly name: string | null;
  readonly kind: UnitRow['kind'];
  readonly ratedKw: number;
  readonly lastSampleMs: number | null;
  readonly verdict: string | null;
  readonly diagnosedAtMs: number | null;
  /** Mean of the newest 10-minute rollup, when that rollup is within the offline time. */
  readonly kw: number | null;
  readonly rpm: number | null;
  readonly voltsLl: number | null;
  readonly statorC: number | null;
  /** Energy since the site's local midnight, kWh, from the 10-minute rollups. */
  readonly kwhToday: number;
  readonly keRatio: number | null;
  readonly keRatioLow: number | null;
  readonly keRatioHigh: number | null;
  readonly unbalancePct: number | null;
  readonly diagnosisLimits: UnitRow['diagnosis'];
  readonly state: UnitStateView;
}

/** The columns of getLatestUnits's statement, parsed (db/rows.ts). */
const latestRowSchema = z.object({
  key: dbNumber,
  id: z.string(),
  site_id: z.string(),
  name: z.string().nullable(),
  kind: z.enum(UNIT_KINDS),
  rated_kw: dbNumber,
  last_sample_ms: dbNumberOrNull,
  verdict: z.string().nullable(),
  diagnosed_at_ms: dbNumberOrNull,
  top_severity: z.string().nullable(),
  top_code: z.string().nullable(),
  top_message: z.string().nullable(),
  bucket_ms: dbNumberOrNull,
  kw: dbNumberOrNull,
  rpm: dbNumberOrNull,
  volts_ll: dbNumberOrNull,
  stator_c: dbNumberOrNull,
  kwh_today: dbNumberOrNull,
  ke_ratio: dbNumberOrNull,
  ke_ratio_low: dbNumberOrNull,
  ke_ratio_high: dbNumberOrNull,
  unbalance_pct: dbNumberOrNull,
  diagnosis: dbJson(diagnosisLimitsSchema.nullable()),
});

/**
 * Latest state of units (of one site, or of every site the viewer sees): the
 * status and health rows, the newest 10-minute rollup and today's energy from
 * the rollups. Reads no raw telemetry. Today is the site's calendar day.
 */
async function getLatestUnits({ db, viewer, siteId, nowMs }: { db: Db; viewer: Viewer; siteId?: string; nowMs: number }): Promise<UnitLatest[]> {
  const now = sql`to_timestamp(${nowMs}::float8 / 1000.0)`;
  const rows = parseRows(
    'latest units',
    latestRowSchema,
    await db.execute(sql`
      select u.key, u.id, u.site_id, u.name, u.kind::text as kind, u.rated_kw, u.diagnosis,
             (extract(epoch from st.last_sample_ts) * 1000)::float8 as last_sample_ms,
             h.verdict::text as verdict, (extract(epoch from h.diagnosed_at) * 1000)::float8 as diagnosed_at_ms,
             h.ke_ratio, h.ke_ratio_low, h.ke_ratio_high, h.unbalance_pct,
             top.severity as top_severity, top.code as top_code, top.message as top_message,
             (extract(epoch from r.bucket_start) * 1000)::float8 as bucket_ms,
             r.kw_sum / nullif(r.kw_count, 0) as kw,
             r.rpm_sum / nullif(r.samples, 0) as rpm,
             r.vll_sum / nullif(r.samples, 0) as volts_ll,
             r.stator_c_sum / nullif(r.stator_c_count, 0) as stator_c,
             e.kwh as kwh_today
      from units u
      join sites s on s.id = u.site_id
      left join unit_status st on st.unit_key = u.key
      left join unit_health h on h.unit_key = u.key
      left join lateral (
        select f->>'severity' as severity, f->>'code' as code, f->>'message' as message
        from jsonb_array_elements(h.findings) f
        where f->>'severity' in ('alarm', 'warning') and f->>'code' <> 'insufficient-data'
        order by case f->>'severity' when 'alarm' then 0 else 1 end
        limit 1
      ) top on true
      left join lateral (
        select * from telemetry_rollups_10m r
        where r.unit_key = u.key and r.bucket_start <= ${now}
        order by r.bucket_start desc limit 1
      ) r on true
      left join lateral (
        select sum(d.kwh) as kwh from telemetry_rollups_10m d
        where d.unit_key = u.key
          and d.bucket_start >= (date_trunc('day', ${now} at time zone s.timezone) at time zone s.timezone)
          and d.bucket_start <= ${now}
      ) e on true
      where true ${siteId === undefined ? sql`` : sql`and u.site_id = ${siteId}`} ${siteClause(viewer, sql`u.site_id`)}
      order by u.site_id, u.id`),
  );
  return rows.map((r) => {
    const lastSampleMs = r.last_sample_ms;
    const bucketMs = r.bucket_ms;
    // A rollup older than the offline time is not "now".
    const current = bucketMs !== null && nowMs - bucketMs <= OFFLINE_AFTER_MS + 10 * 60_000;
    const pick = (v: number | null) => (current ? v : null);
    const health =
      r.verdict === null
        ? undefined
        : {
            verdict: r.verdict,
            findings: r.top_severity === null ? [] : [{ code: r.top_code ?? '', severity: r.top_severity, message: r.top_message ?? '' }],
          };
    return {
      key: r.key,
      id: r.id,
      siteId: r.site_id,
      name: r.name,
      kind: r.kind,
      ratedKw: r.rated_kw,
      lastSampleMs,
      verdict: r.verdict,
      diagnosedAtMs: r.diagnosed_at_ms,
      kw: pick(r.kw),
      rpm: pick(r.rpm),
      voltsLl: pick(r.volts_ll),
      statorC: pick(r.stator_c),
      kwhToday: r.kwh_today ?? 0,
      keRatio: r.ke_ratio,
      keRatioLow: r.ke_ratio_low,
      keRatioHigh: r.ke_ratio_high,
      unbalancePct: r.unbalance_pct,
      diagnosisLimits: r.diagnosis,
      state: unitStateOf({ health, lastSampleMs, nowMs }),
    };
  });
}

/** One site on the fleet screen. */
export interface FleetSite {
  readonly id: string;
  readonly name: string;
  readonly timezone: string;
  /** Units in each state. */
  readonly counts: Record<UnitState, number>;
  readonly unitCount: number;
  /** Sum of the units' newest 10-minute mean power, kW (units with no recent data count 0). */
  readonly powerKw: number;
  /** Energy since the site's local midnight, kWh. */
  readonly energyTodayKwh: number;
  /** Oldest "last sample" among the units, epoch ms; null when a unit never sent one. */
  readonly oldestLastSampleMs: number | null;
  /** Whether some unit has never sent a sample. */
  readonly neverSent: boolean;
  /** Units that need attention, worst first, each with why in words. */
  readonly attention: ReadonlyArray<{ id: string; name: string | null; state: UnitState; label: string; reason: string }>;
  /** The worst state of the site (healthy when all are). */
  readonly worst: UnitState;
}

/**
 * Every site the viewer sees, worst first: per site the count of units in each
 * state, power now, energy today, the oldest last sample and one line per unit
 * that needs attention. Reads latest state and rollups only.
 */
export async function getFleetSites({ db, viewer, nowMs = Date.now() }: { db: Db; viewer: Viewer; nowMs?: number }): Promise<FleetSite[]> {
  const ids = siteFilter(viewer);
  if (ids !== undefined && ids.length === 0) return [];
  const siteRows = await db
    .select({ id: sites.id, name: sites.name, timezone: sites.timezone })
    .from(sites)
    .where(ids === undefined ? undefined : inArray(sites.id, [...ids]));
  const latest = await getLatestUnits({ db, viewer, nowMs });
  const bySite = new Map<string, UnitLatest[]>();
  for (const u of latest) bySite.set(u.siteId, [...(bySite.get(u.siteId) ?? []), u]);
  const result = siteRows.map((site): FleetSite => {
    const list = (bySite.get(site.id) ?? []).slice().sort((a, b) => compareStates(a.state, b.state) || a.id.localeCompare(b.id));
    const counts = Object.fromEntries(UNIT_STATES.map((s) => [s, 0])) as Record<UnitState, number>;
    for (const u of list) counts[u.state.state]++;
    const times = list.map((u) => u.lastSampleMs);
    const known = times.filter((t): t is number => t !== null);
    return {
      id: site.id,
      name: site.name,
      timezone: site.timezone,
      counts,
      unitCount: list.length,
      powerKw: list.reduce((s, u) => s + (u.kw ?? 0), 0),
      energyTodayKwh: list.reduce((s, u) => s + u.kwhToday, 0),
      oldestLastSampleMs: known.length === 0 ? null : Math.min(...known),
      neverSent: known.length < times.length,
      attention: list
        .filter((u) => u.state.reason !== undefined)
        .map((u) => ({ id: u.id, name: u.name, state: u.state.state, label: u.state.label, reason: u.state.reason as string })),
      worst: list.length === 0 ? 'healthy' : (list[0] as UnitLatest).state.state,
    };
  });
  const score = (s: FleetSite) => UNIT_STATES.map((state) => s.counts[state]);
  return result.sort((a, b) => {
    const d = UNIT_STATES.indexOf(a.worst) - UNIT_STATES.indexOf(b.worst);
    if (d !== 0) return d;
    // Same worst state: more units in the worse states first, then by name.
    const sa = score(a);
    const sb = score(b);
    for (let i = 0; i < sa.length - 1; i++) if (sa[i] !== sb[i]) return (sb[i] as number) - (sa[i] as number);
    return a.name.localeCompare(b.name);
  });
}

/** A site as its screen shows it; undefined when there is none or the viewer may not see it. */
export interface SiteView {
  readonly id: string;
  readonly name: string;
  readonly timezone: string;
  readonly units: UnitLatest[];
  /** Mean power of each unit per 10-minute bucket over the last `sparkHours`, oldest first. */
  readonly sparklines: Record<string, Array<{ t: number; kw: number | null }>>;
  readonly sparkHours: number;
}

/** Hours of the small power chart beside each unit on the site screen. */
export const SPARK_HOURS = 6;

const sparkRowSchema = z.object({ unit_key: dbNumber, t: dbNumber, kw: dbNumberOrNull });

/** One site's units with their latest state and the last hours of power; rollups only. */
export async function getSiteView({ db, viewer, siteId, nowMs = Date.now() }: { db: Db; viewer: Viewer; siteId: string; nowMs?: number }): Promise<SiteView | undefined> {
  if (!canSeeSite(viewer, siteId)) return undefined;
  const [site] = await db.select({ id: sites.id, name: sites.name, timezone: sites.timezone }).from(sites).where(eq(sites.id, siteId)).limit(1);
  if (site === undefined) return undefined;
  const unitList = await getLatestUnits({ db, viewer, siteId, nowMs });
  const sparklines: SiteView['sparklines'] = {};
  if (unitList.length > 0) {
    const fromMs = nowMs - SPARK_HOURS * 3_600_000;
    const rows = parseRows(
      'sparklines',
      sparkRowSchema,
      await db.execute(sql`
        select r.unit_key, (extract(epoch from r.bucket_start) * 1000)::float8 as t, r.kw_sum / nullif(r.kw_count, 0) as kw
        from telemetry_rollups_10m r
        where r.unit_key = any(${sql.param(unitList.map((u) => u.key))}::int4[])
          and r.bucket_start >= to_timestamp(${fromMs}::float8 / 1000.0) and r.bucket_start <= to_timestamp(${nowMs}::float8 / 1000.0)
        order by r.unit_key, r.bucket_start`),
    );
    const idByKey = new Map(unitList.map((u) => [u.key, u.id]));
    for (const u of unitList) sparklines[u.id] = [];
    for (const r of rows) sparklines[idByKey.get(r.unit_key) as string]?.push({ t: r.t, kw: r.kw });
  }
  return { ...site, units: unitList, sparklines, sparkHours: SPARK_HOURS };
}
