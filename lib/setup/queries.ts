/**
 * Data access of the setup screens: sites and units to edit, their writes,
 * and the fleet as FLEET.json. Every function takes the viewer: reads are
 * scoped to the viewer's sites from the start, writes need
 * `canEditSetup(viewer)`, and a site or unit the viewer may not see is
 * `undefined`, never told apart from one that does not exist.
 */
import { and, asc, eq, inArray, sql } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { sites, units, type SiteRow, type UnitRow } from '@/db/schema';
import { canEditSetup, canSeeSite, siteFilter, type Viewer } from '@/lib/auth/viewer';
import type { Fleet, Nameplate, Site } from '@/lib/contract/nameplate';
import type { FieldErrors } from './forms';
import { actorOfViewer, writeAudit } from '@/lib/auth/audit';

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

/** The fields that differ between two records, as { field: { before, after } } for the audit log. */
export function changedFields(before: Record<string, unknown>, after: Record<string, unknown>): Record<string, { before: unknown; after: unknown }> {
  const out: Record<string, { before: unknown; after: unknown }> = {};
  for (const key of new Set([...Object.keys(before), ...Object.keys(after)])) {
    if (JSON.stringify(before[key]) !== JSON.stringify(after[key])) out[key] = { before: before[key] ?? null, after: after[key] ?? null };
  }
  return out;
}

export interface SetupUnit {
  id: string;
  name: string | null;
  kind: 'wind' | 'hydro';
  ratedKw: number;
  poles: number;
}

export interface SetupSite {
  id: string;
  name: string;
  timezone: string;
  units: SetupUnit[];
}

/** A write's outcome: done, or problems by form field (`_form` for the form as a whole). */
export type SaveResult = { ok: true } | { ok: false; fieldErrors: FieldErrors };

const NOT_ALLOWED: SaveResult = { ok: false, fieldErrors: { _form: 'You may not change the setup: ask an administrator or operator.' } };

/** The sites the viewer may see, by name, each with its units by id. */
export async function getSetupSites({ db, viewer }: { db: Db; viewer: Viewer }): Promise<SetupSite[]> {
  const only = siteFilter(viewer);
  if (only !== undefined && only.length === 0) return [];
  const siteRows = await db
    .select({ id: sites.id, name: sites.name, timezone: sites.timezone })
    .from(sites)
    .where(only === undefined ? undefined : inArray(sites.id, [...only]))
    .orderBy(asc(sites.name), asc(sites.id));
  const unitRows = await db
    .select({ id: units.id, siteId: units.siteId, name: units.name, kind: units.kind, ratedKw: units.ratedKw, poles: units.poles })
    .from(units)
    .where(only === undefined ? undefined : inArray(units.siteId, [...only]))
    .orderBy(asc(units.id));
  return siteRows.map((s) => ({ ...s, units: unitRows.filter((u) => u.siteId === s.id).map(({ siteId: _s, ...u }) => u) }));
}

/** One site, or undefined when there is none the viewer may see. */
export async function getSetupSiteById({ db, viewer, siteId }: { db: Db; viewer: Viewer; siteId: string }): Promise<SiteRow | undefined> {
  if (!canSeeSite(viewer, siteId)) return undefined;
  const [row] = await db.select().from(sites).where(eq(sites.id, siteId)).limit(1);
  return row;
}

/** One unit's nameplate, or undefined when there is none on that site the viewer may see. */
export async function getSetupUnitById({ db, viewer, siteId, unitId }: { db: Db; viewer: Viewer; siteId: string; unitId: string }): Promise<Nameplate | undefined> {
  if (!canSeeSite(viewer, siteId)) return undefined;
  const [row] = await db
    .select()
    .from(units)
    .where(and(eq(units.id, unitId), eq(units.siteId, siteId)))
    .limit(1);
  return row ? nameplateOfUnit(row) : undefined;
}

/** Registers a new site; an id already taken is a problem of the id field. */
export async function insertSite({ db, viewer, site }: { db: Db; viewer: Viewer; site: Site }): Promise<SaveResult> {
  if (!canEditSetup(viewer) || !canSeeSite(viewer, site.id)) return NOT_ALLOWED;
  const inserted = await db.insert(sites).values(site).onConflictDoNothing({ target: sites.id }).returning({ id: sites.id });
  if (inserted.length === 0) return { ok: false, fieldErrors: { id: `a site with id "${site.id}" exists already: choose another id, or edit that site` } };
  await writeAudit({ db, actor: actorOfViewer(viewer), action: 'site-added', target: `site ${site.id}`, detail: { after: site } });
  return { ok: true };
}

/** Changes a site's name and time zone. */
export async function updateSite({ db, viewer, site }: { db: Db; viewer: Viewer; site: Site }): Promise<SaveResult> {
  if (!canEditSetup(viewer) || !canSeeSite(viewer, site.id)) return NOT_ALLOWED;
  const [before] = await db.select({ id: sites.id, name: sites.name, timezone: sites.timezone }).from(sites).where(eq(sites.id, site.id)).limit(1);
  const updated = await db
    .update(sites)
    .set({ name: site.name, timezone: site.timezone, updatedAt: new Date() })
    .where(eq(sites.id, site.id))
    .returning({ id: sites.id });
  if (updated.length === 0) return { ok: false, fieldErrors: { _form: `there is no site "${site.id}" any more: it may have been removed meanwhile` } };
  await writeAudit({ db, actor: actorOfViewer(viewer), action: 'site-changed', target: `site ${site.id}`, detail: changedFields(before ?? {}, { ...site }) });
  return { ok: true };
}

/**
 * Registers a new unit on an existing site. Unit ids are unique across the
 * fleet (devices publish under them), so one taken anywhere is a problem of the id field.
 */
export async function insertUnit({ db, viewer, nameplate }: { db: Db; viewer: Viewer; nameplate: Nameplate }): Promise<SaveResult> {
  if (!canEditSetup(viewer)) return NOT_ALLOWED;
  if (!(await getSetupSiteById({ db, viewer, siteId: nameplate.siteId }))) {
    return { ok: false, fieldErrors: { siteId: `no site "${nameplate.siteId}": add the site first` } };
  }
  const [taken] = await db.select({ siteId: units.siteId }).from(units).where(eq(units.id, nameplate.id)).limit(1);
  if (taken) {
    const where = canSeeSite(viewer, taken.siteId) ? ` on site "${taken.siteId}"` : '';
    return { ok: false, fieldErrors: { id: `a unit with id "${nameplate.id}" exists already${where}: unit ids are unique across the fleet` } };
  }
  await upsertFleet({ db, fleet: { sites: [], units: [nameplate] } });
  await writeAudit({ db, actor: actorOfViewer(viewer), action: 'unit-added', target: `unit ${nameplate.siteId}/${nameplate.id}`, detail: { after: nameplate } });
  return { ok: true };
}

/** Replaces a unit's nameplate (its id and site stay). */
export async function updateUnit({ db, viewer, nameplate }: { db: Db; viewer: Viewer; nameplate: Nameplate }): Promise<SaveResult> {
  if (!canEditSetup(viewer)) return NOT_ALLOWED;
  const before = await getSetupUnitById({ db, viewer, siteId: nameplate.siteId, unitId: nameplate.id });
  if (!before) {
    return { ok: false, fieldErrors: { _form: `there is no unit "${nameplate.id}" on site "${nameplate.siteId}" any more` } };
  }
  await upsertFleet({ db, fleet: { sites: [], units: [nameplate] } });
  await writeAudit({ db, actor: actorOfViewer(viewer), action: 'unit-changed', target: `unit ${nameplate.siteId}/${nameplate.id}`, detail: changedFields({ ...before }, { ...nameplate }) });
  return { ok: true };
}

/** The viewer's sites and units as FLEET.json (contract, section 4): what `units import` reads back. */
export async function getFleetExport({ db, viewer }: { db: Db; viewer: Viewer }): Promise<Fleet> {
  const only = siteFilter(viewer);
  if (only !== undefined && only.length === 0) return { sites: [], units: [] };
  const siteRows = await db
    .select({ id: sites.id, name: sites.name, timezone: sites.timezone })
    .from(sites)
    .where(only === undefined ? undefined : inArray(sites.id, [...only]))
    .orderBy(asc(sites.id));
  const unitRows = await db
    .select()
    .from(units)
    .where(only === undefined ? undefined : inArray(units.siteId, [...only]))
    .orderBy(asc(units.siteId), asc(units.id));
  return { sites: siteRows, units: unitRows.map(nameplateOfUnit) };
}

// ---------------------------------------------------------------------------
// Registering a whole fleet (FLEET.json, `units import`, the demo): upserts by id.

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
