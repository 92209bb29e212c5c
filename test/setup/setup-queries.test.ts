/**
 * The setup screens' data access on a real database (PGlite or PostgreSQL):
 * FLEET.json import all or nothing with a report per entry and the paths of
 * the command line (contract, section 4), export that imports back
 * unchanged, writes refused to a viewer who may not change setup, and sites
 * a viewer may not see answered as absent.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { rowsOf } from '@/db/client';
import { LOCAL_VIEWER, type Viewer } from '@/lib/auth/viewer';
import { fleetSchema } from '@/lib/contract/nameplate';
import { importFleetFile, parseFleetText } from '@/lib/setup/fleet-import';
import { getFleetExport, getSetupSiteById, getSetupSites, getSetupUnitById, insertSite, insertUnit, updateUnit } from '@/lib/setup/queries';
import { createTestDatabase, type TestDatabase } from '@/test/support/backend';
import { testFleet, testTag } from '@/test/support/ingest';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 2, hydroUnits: 1 });
/** The fleet as a file would hold it (plain JSON). */
const file = () => JSON.parse(JSON.stringify(fleet)) as { sites: Array<Record<string, unknown>>; units: Array<Record<string, unknown>> };
let t: TestDatabase;

async function countUnits(): Promise<number> {
  return Number(rowsOf<{ n: number }>(await t.handle.db.execute(sql`select count(*)::int as n from units`))[0]!.n);
}

beforeAll(async () => {
  t = await createTestDatabase();
});
afterAll(async () => {
  await t?.drop();
});

describe('FLEET.json import from the setup screen', () => {
  it('changes nothing when one entry is invalid, and names the entry and its problem as the command line does', async () => {
    const bad = file();
    bad.units[1]!.poles = 7;
    const report = await importFleetFile({ db: t.handle.db, viewer: LOCAL_VIEWER, raw: bad, apply: true });
    expect(report.ok).toBe(false);
    expect(report.applied).toBeUndefined();
    expect(report.problems).toEqual(['units[1].poles: must be an even number, got 7']);
    const byPath = Object.fromEntries(report.entries.map((e) => [e.path, e]));
    expect(byPath['units[1]']).toMatchObject({ kind: 'unit', id: fleet.units[1]!.id, action: 'invalid', problems: ['units[1].poles: must be an even number, got 7'] });
    expect(byPath['units[0]']!.action).toBe('add');
    expect(byPath['sites[0]']!.action).toBe('add');
    expect(await countUnits()).toBe(0);
  });

  it('reports a unit whose site is neither in the file nor in the database', async () => {
    const orphan = file();
    orphan.sites = [];
    const report = await importFleetFile({ db: t.handle.db, viewer: LOCAL_VIEWER, raw: orphan, apply: true });
    expect(report.problems[0]).toBe(`units[0].siteId: no site "${fleet.units[0]!.siteId}" in the file or the database`);
    expect(await countUnits()).toBe(0);
  });

  it('checks without changing, then imports, then reports known entries as updates', async () => {
    const check = await importFleetFile({ db: t.handle.db, viewer: LOCAL_VIEWER, raw: file(), apply: false });
    expect(check).toMatchObject({ ok: true, problems: [] });
    expect(await countUnits()).toBe(0);
    const done = await importFleetFile({ db: t.handle.db, viewer: LOCAL_VIEWER, raw: file(), apply: true });
    expect(done.applied).toEqual({ sitesCreated: 2, sitesUpdated: 0, unitsCreated: 3, unitsUpdated: 0 });
    expect(await countUnits()).toBe(3);
    const again = await importFleetFile({ db: t.handle.db, viewer: LOCAL_VIEWER, raw: file(), apply: false });
    expect(new Set(again.entries.map((e) => e.action))).toEqual(new Set(['update']));
  });

  it('names the line of a file that is not JSON', () => {
    expect(parseFleetText('{\n  "sites": [\n    oops\n  ]\n}')).toMatchObject({ ok: false, problem: expect.stringMatching(/^line 3: not valid JSON/) });
    expect(parseFleetText('{\n  "sites": [],\n  "units": [\n')).toMatchObject({ ok: false, problem: expect.stringMatching(/^line 4: not valid JSON/) });
    expect(parseFleetText('{ "sites": [] }\n\nx')).toMatchObject({ ok: false, problem: expect.stringMatching(/^line 3: not valid JSON/) });
  });

  it('refuses a viewer who may not change setup, and sites outside a viewer’s own', async () => {
    const crew: Viewer = { id: 'c', role: 'crew', siteIds: [fleet.sites[0]!.id] };
    const asCrew = await importFleetFile({ db: t.handle.db, viewer: crew, raw: file(), apply: true });
    expect(asCrew.ok).toBe(false);
    expect(asCrew.fileProblems[0]).toMatch(/may not change the setup/);
    const operator: Viewer = { id: 'o', role: 'operator', siteIds: [fleet.sites[0]!.id] };
    const asOperator = await importFleetFile({ db: t.handle.db, viewer: operator, raw: file(), apply: true });
    expect(asOperator.problems).toContain(`sites[1].id: "${fleet.sites[1]!.id}" is not one of the sites you may change`);
  });
});

describe('FLEET.json export', () => {
  it('is a valid fleet file that imports back as updates with nothing to correct', async () => {
    const exported = JSON.parse(JSON.stringify(await getFleetExport({ db: t.handle.db, viewer: LOCAL_VIEWER })));
    const byId = <T extends { id: string }>(list: T[]) => [...list].sort((a, b) => a.id.localeCompare(b.id));
    const [got, want] = [fleetSchema.parse(exported), fleetSchema.parse(file())];
    expect(byId(got.sites)).toEqual(byId(want.sites));
    expect(byId(got.units)).toEqual(byId(want.units));
    const back = await importFleetFile({ db: t.handle.db, viewer: LOCAL_VIEWER, raw: exported, apply: false });
    expect(back.ok).toBe(true);
  });

  it('holds only the sites a viewer may see', async () => {
    const exported = await getFleetExport({ db: t.handle.db, viewer: { id: 'o', role: 'owner', siteIds: [fleet.sites[1]!.id] } });
    expect(exported.sites.map((s) => s.id)).toEqual([fleet.sites[1]!.id]);
    expect(exported.units.every((u) => u.siteId === fleet.sites[1]!.id)).toBe(true);
  });
});

describe('setup writes and reads', () => {
  it('refuses a site id or unit id that is taken, on the id field', async () => {
    expect(await insertSite({ db: t.handle.db, viewer: LOCAL_VIEWER, site: fleet.sites[0]! })).toEqual({
      ok: false,
      fieldErrors: { id: `a site with id "${fleet.sites[0]!.id}" exists already: choose another id, or edit that site` },
    });
    const again = await insertUnit({ db: t.handle.db, viewer: LOCAL_VIEWER, nameplate: { ...fleet.units[0]!, siteId: fleet.sites[1]!.id } });
    expect(again.ok === false && again.fieldErrors.id).toMatch(/exists already on site/);
  });

  it('saves a unit and reads it back; a viewer who may only look cannot', async () => {
    const np = { ...fleet.units[0]!, id: `new-${tag}`, poles: 20 };
    expect(await insertUnit({ db: t.handle.db, viewer: { id: 'c', role: 'crew', siteIds: 'all' }, nameplate: np })).toMatchObject({ ok: false });
    expect(await insertUnit({ db: t.handle.db, viewer: LOCAL_VIEWER, nameplate: np })).toEqual({ ok: true });
    expect(await getSetupUnitById({ db: t.handle.db, viewer: LOCAL_VIEWER, siteId: np.siteId, unitId: np.id })).toEqual(np);
    expect(await updateUnit({ db: t.handle.db, viewer: LOCAL_VIEWER, nameplate: { ...np, poles: 22 } })).toEqual({ ok: true });
    expect((await getSetupUnitById({ db: t.handle.db, viewer: LOCAL_VIEWER, siteId: np.siteId, unitId: np.id }))?.poles).toBe(22);
  });

  it('answers a site or unit the viewer may not see as absent', async () => {
    const other: Viewer = { id: 'x', role: 'operator', siteIds: [fleet.sites[1]!.id] };
    expect(await getSetupSiteById({ db: t.handle.db, viewer: other, siteId: fleet.sites[0]!.id })).toBeUndefined();
    expect(await getSetupUnitById({ db: t.handle.db, viewer: other, siteId: fleet.units[0]!.siteId, unitId: fleet.units[0]!.id })).toBeUndefined();
    expect((await getSetupSites({ db: t.handle.db, viewer: other })).map((s) => s.id)).toEqual([fleet.sites[1]!.id]);
    expect(await getSetupSites({ db: t.handle.db, viewer: { id: 'n', role: 'crew', siteIds: [] } })).toEqual([]);
  });
});
