/**
 * Data access for sites and units.
 */
import { asc, desc, eq, sql } from 'drizzle-orm';
import { rowsOf, type Db } from '../../db/client';
import { quarantine, sites, units, unitStatus, unitHealth, type SiteRow, type UnitRow } from '../../db/schema';
import type { Fleet, Nameplate } from '../contract/nameplate';

/** Nameplate fields as unit columns. */
function unitValues(unit: Nameplate) {
  return {
    id: unit.id,
    siteId: unit.siteId,
    name: unit.name ?? null,
    kind: unit.kind,
    ratedKw: unit.ratedKw,
    ratedRpm: unit.ratedRpm,
    maxRpm: unit.maxRpm,
    poles: unit.poles,
    keVPerKrpm: unit.keVPerKrpm,
    keRefC: unit.keRefC,
    magnet: unit.magnet,
    magnetTempCoeffPctPerC: unit.magnetTempCoeffPctPerC ?? null,
    phaseOhm: unit.phaseOhm,
    phaseMh: unit.phaseMh,
    powerCurve: unit.powerCurve ?? null,
    cutInMs: unit.cutInMs ?? null,
    cutOutMs: unit.cutOutMs ?? null,
    rotorDiameterM: unit.rotorDiameterM ?? null,
    designHeadM: unit.designHeadM ?? null,
    designFlowM3s: unit.designFlowM3s ?? null,
    efficiency: unit.efficiency ?? null,
    diagnosis: unit.diagnosis ?? null,
  };
}

/** A unit row back as a contract nameplate. */
export function nameplateOfUnit(row: UnitRow): Nameplate {
  const optional = <T>(v: T | null) => (v === null ? undefined : v);
  return {
    id: row.id,
    siteId: row.siteId,
    name: optional(row.name),
    kind: row.kind,
    ratedKw: row.ratedKw,
    ratedRpm: row.ratedRpm,
    maxRpm: row.maxRpm,
    poles: row.poles,
    keVPerKrpm: row.keVPerKrpm,
    keRefC: row.keRefC,
    magnet: row.magnet,
    magnetTempCoeffPctPerC: optional(row.magnetTempCoeffPctPerC),
    phaseOhm: row.phaseOhm,
    phaseMh: row.phaseMh,
    powerCurve: optional(row.powerCurve),
    cutInMs: optional(row.cutInMs),
    cutOutMs: optional(row.cutOutMs),
    rotorDiameterM: optional(row.rotorDiameterM),
    designHeadM: optional(row.designHeadM),
    designFlowM3s: optional(row.designFlowM3s),
    efficiency: optional(row.efficiency),
    diagnosis: optional(row.diagnosis),
  };
}

export interface FleetUpsertResult {
  sitesCreated: number;
  sitesUpdated: number;
  unitsCreated: number;
  unitsUpdated: number;
}

/**
 * Registers or updates the sites and units of a validated fleet, matched by
 * id, in one transaction. A unit whose site is neither in the file nor in the
 * database is a problem reported by `findFleetProblems` before this runs.
 */
export async function upsertFleet({ db, fleet }: { db: Db; fleet: Fleet }): Promise<FleetUpsertResult> {
  return db.transaction(async (tx) => {
    const result: FleetUpsertResult = { sitesCreated: 0, sitesUpdated: 0, unitsCreated: 0, unitsUpdated: 0 };
    const existingSites = new Set((await tx.select({ id: sites.id }).from(sites)).map((s) => s.id));
    for (const site of fleet.sites) {
      await tx
        .insert(sites)
        .values({ id: site.id, name: site.name, timezone: site.timezone })
        .onConflictDoUpdate({
          target: sites.id,
          set: { name: site.name, timezone: site.timezone, updatedAt: sql`now()` },
        });
      if (existingSites.has(site.id)) result.sitesUpdated++;
      else result.sitesCreated++;
    }
    const existingUnits = new Set((await tx.select({ id: units.id }).from(units)).map((u) => u.id));
    for (const unit of fleet.units) {
      const values = unitValues(unit);
      const { id: _id, ...set } = values;
      await tx
        .insert(units)
        .values(values)
        .onConflictDoUpdate({ target: units.id, set: { ...set, updatedAt: sql`now()` } });
      if (existingUnits.has(unit.id)) result.unitsUpdated++;
      else result.unitsCreated++;
    }
    return result;
  });
}

/**
 * Problems that need the database to see: a unit naming a site that exists
 * neither in the file nor in the database. Paths as in the fleet file.
 */
export async function findFleetProblems({ db, fleet }: { db: Db; fleet: Fleet }): Promise<string[]> {
  const known = new Set([...(await db.select({ id: sites.id }).from(sites)).map((s) => s.id), ...fleet.sites.map((s) => s.id)]);
  const problems: string[] = [];
  fleet.units.forEach((unit, i) => {
    if (!known.has(unit.siteId)) problems.push(`units[${i}].siteId: no site "${unit.siteId}" in the file or the database`);
  });
  return problems;
}

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

export interface FleetOverviewUnit {
  id: string;
  name: string | null;
  kind: UnitRow['kind'];
  ratedKw: number;
  presence: 'online' | 'offline' | null;
  lastSampleTs: Date | null;
  verdict: string | null;
  keRatio: number | null;
  diagnosedAt: Date | null;
}

export interface FleetOverviewSite {
  id: string;
  name: string;
  timezone: string;
  units: FleetOverviewUnit[];
}

/** Sites with their units, presence and latest verdict: the fleet list of the home page. */
export async function getFleetOverview({ db }: { db: Db }): Promise<FleetOverviewSite[]> {
  const siteRows = await getSites({ db });
  const unitRows = await db
    .select({
      id: units.id,
      siteId: units.siteId,
      name: units.name,
      kind: units.kind,
      ratedKw: units.ratedKw,
      presence: unitStatus.presence,
      lastSampleTs: unitStatus.lastSampleTs,
      verdict: unitHealth.verdict,
      keRatio: unitHealth.keRatio,
      diagnosedAt: unitHealth.diagnosedAt,
    })
    .from(units)
    .leftJoin(unitStatus, eq(unitStatus.unitKey, units.key))
    .leftJoin(unitHealth, eq(unitHealth.unitKey, units.key))
    .orderBy(asc(units.siteId), asc(units.id));
  return siteRows.map((site) => ({
    id: site.id,
    name: site.name,
    timezone: site.timezone,
    units: unitRows
      .filter((u) => u.siteId === site.id)
      .map(({ siteId: _s, ...u }) => u),
  }));
}

/** Counts of set-aside telemetry stop here: a device that floods the table must not make every page render scan it. */
export const QUARANTINE_COUNT_CAP = 10_000;

export interface QuarantineSummary {
  /** Rows kept (retention: RETENTION_DAYS), at most {@link QUARANTINE_COUNT_CAP} + 1 (meaning "more than the cap"). */
  total: number;
  /** Rows that arrived in the last day, capped the same way. */
  lastDay: number;
  recent: Array<{ receivedAt: Date; topic: string; reason: string }>;
}

/** How much telemetry was set aside as invalid, and the newest reasons, for the operator. */
export async function getQuarantineSummary({ db, recentLimit = 5 }: { db: Db; recentLimit?: number }): Promise<QuarantineSummary> {
  const limit = QUARANTINE_COUNT_CAP + 1;
  // Each count reads at most cap + 1 rows (the last day by the received_at index).
  const [counts] = rowsOf<{ total: number; lastDay: number }>(
    await db.execute(sql`select
      (select count(*) from (select 1 from ${quarantine} limit ${limit}) t)::int as "total",
      (select count(*) from (select 1 from ${quarantine} where ${quarantine.receivedAt} > now() - interval '1 day' limit ${limit}) d)::int as "lastDay"`),
  );
  const recent = await db
    .select({ receivedAt: quarantine.receivedAt, topic: quarantine.topic, reason: quarantine.reason })
    .from(quarantine)
    .orderBy(desc(quarantine.id))
    .limit(recentLimit);
  return { total: Number(counts?.total ?? 0), lastDay: Number(counts?.lastDay ?? 0), recent };
}
