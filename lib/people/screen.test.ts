/**
 * The people screens' view models on a real database (PGlite, or PostgreSQL
 * when DATABASE_URL is set): who may see them, the words and times they show,
 * the audit log's filter and cursor, and parameters that cannot be used.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApiToken, revokeApiToken } from '@/lib/auth/api-tokens';
import { AUDIT_PAGE_SIZE, writeAudit } from '@/lib/auth/audit';
import { createDisplayLink } from '@/lib/auth/display-links';
import { addPerson, setPersonDisabled, viewerOfPerson } from '@/lib/auth/people';
import { LOCAL_VIEWER, type Viewer } from '@/lib/auth/viewer';
import type { Role } from '@/lib/contract/roles';
import { upsertFleet } from '@/lib/setup/queries';
import { createTestDatabase, type TestDatabase } from '@/test/support/backend';
import { testFleet, testTag } from '@/test/support/ingest';
import { readAuditScreen, readPasswordScreen, readPeopleScreen, readPersonScreen, readSignInScreen, whenOf, type AuditScreen } from './screen';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 1, hydroUnits: 1 });
const siteA = fleet.sites[0]!.id;
const siteB = fleet.sites[1]!.id;
const actor = { label: 'test', personId: null };
const nowMs = Date.parse('2026-05-01T12:00:00Z');
let t: TestDatabase;
const ids = new Map<Role, number>();
const viewers = new Map<Role, Viewer>();

beforeAll(async () => {
  t = await createTestDatabase();
  await upsertFleet({ db: t.handle.db, fleet });
});
afterAll(async () => {
  await t?.drop();
});

async function addEveryRole() {
  for (const role of ['admin', 'operator', 'crew', 'owner'] as const) {
    const added = await addPerson({
      db: t.handle.db,
      actor,
      person: { email: `${role}-${tag}@test.invalid`, role, password: 'headrace culvert grille', siteIds: role === 'crew' ? [siteA] : role === 'owner' ? [siteB] : [], mustChangePassword: role === 'owner' },
    });
    if (!added.ok) throw new Error(JSON.stringify(added.fieldErrors));
    ids.set(role, added.person.id);
    viewers.set(role, await viewerOfPerson({ db: t.handle.db, person: added.person, via: 'session' }));
  }
}

describe('people list', () => {
  it('says nobody has an account on a fresh start, and offers every site', async () => {
    const screen = await readPeopleScreen({ db: t.handle.db, viewer: LOCAL_VIEWER, nowMs });
    if (screen === 'forbidden') throw new Error('forbidden');
    expect(screen.caption).toBe('Nobody has an account yet: add the first person below.');
    expect(screen.people).toEqual([]);
    expect(screen.sites.map((s) => s.id).sort()).toEqual([siteA, siteB].sort());
    expect(screen.roles.map((r) => `${r.value}:${r.name}`)).toEqual(['admin:Administrator', 'operator:Operator', 'crew:Crew', 'owner:Owner']);
  });

  it('is for administrators only', async () => {
    await addEveryRole();
    for (const role of ['operator', 'crew', 'owner'] as const) expect(await readPeopleScreen({ db: t.handle.db, viewer: viewers.get(role)!, nowMs })).toBe('forbidden');
    const display: Viewer = { id: 'display:1', role: 'admin', siteIds: 'all', via: 'display' };
    expect(await readPeopleScreen({ db: t.handle.db, viewer: display, nowMs })).toBe('forbidden');
  });

  it('names each role, the sites of crew and owners ("all" for the others), and who must choose a password', async () => {
    await setPersonDisabled({ db: t.handle.db, actor, personId: ids.get('crew')!, disabled: true });
    const screen = await readPeopleScreen({ db: t.handle.db, viewer: viewers.get('admin')!, nowMs });
    if (screen === 'forbidden') throw new Error('forbidden');
    expect(screen.caption).toBe('4 people');
    const row = (role: Role) => screen.people.find((p) => p.id === ids.get(role))!;
    expect(row('admin')).toMatchObject({ roleName: 'Administrator', sites: 'all', disabled: false, mustChoosePassword: false, href: `/admin/people/${ids.get('admin')}` });
    expect(row('operator')).toMatchObject({ roleName: 'Operator', sites: 'all' });
    expect(row('crew')).toMatchObject({ roleName: 'Crew', sites: siteA, disabled: true });
    expect(row('owner')).toMatchObject({ roleName: 'Owner', sites: siteB, mustChoosePassword: true });
    await setPersonDisabled({ db: t.handle.db, actor, personId: ids.get('crew')!, disabled: false });
  });
});

describe('person page', () => {
  it('is for administrators only, and not found for an id of the wrong shape or nobody', async () => {
    const read = (viewer: Viewer, personId: string) => readPersonScreen({ db: t.handle.db, viewer, nowMs, personId, searchParams: {} });
    expect(await read(viewers.get('operator')!, String(ids.get('admin')))).toBe('forbidden');
    for (const bad of ['0', '01', '-1', '1.5', 'abc', '1e3', '12345678901234567', '999999999']) expect(await read(viewers.get('admin')!, bad)).toBe('not-found');
  });

  it('shows tokens with their times (UTC to the minute) and whether revoked, display links, and the note after adding', async () => {
    const admin = viewers.get('admin')!;
    const adminId = ids.get('admin')!;
    const person = { id: adminId, email: admin.email! };
    const kept = await createApiToken({ db: t.handle.db, actor, person, name: 'report' });
    const gone = await createApiToken({ db: t.handle.db, actor, person, name: 'old script' });
    await revokeApiToken({ db: t.handle.db, actor, personId: adminId, tokenId: gone.row.id });
    await createDisplayLink({ db: t.handle.db, actor, createdBy: adminId, siteId: siteA, name: 'wall' });
    await createDisplayLink({ db: t.handle.db, actor, createdBy: adminId, name: 'control room' });
    const screen = await readPersonScreen({ db: t.handle.db, viewer: admin, nowMs, personId: String(adminId), searchParams: { saved: 'added' } });
    if (typeof screen === 'string') throw new Error(screen);
    expect(screen.notice).toMatch(/^Added\. Give them their first password/);
    expect(screen.person).toMatchObject({ id: adminId, role: 'admin', disabled: false });
    const report = screen.tokens.find((tk) => tk.name === 'report')!;
    expect(report).toMatchObject({ id: kept.row.id, revoked: false, lastUsed: undefined, made: whenOf(kept.row.createdAt) });
    expect(report.made.text).toMatch(/^\d{4}-\d\d-\d\d \d\d:\d\d UTC$/);
    expect(screen.tokens.find((tk) => tk.name === 'old script')?.revoked).toBe(true);
    expect(screen.links.map((l) => [l.name, l.siteId ?? 'fleet']).sort()).toEqual([['control room', 'fleet'], ['wall', siteA]]);
    expect(screen.linkScopes?.[0]).toEqual({ value: 'fleet', label: 'The whole fleet' });
    expect(screen.linkScopes).toHaveLength(1 + fleet.sites.length);
    expect(screen.linkScopes).toContainEqual({ value: siteA, label: `Site ${fleet.sites[0]!.name}` });
  });

  it('offers display links only on an administrator\'s page, and says "Added" only just after', async () => {
    const screen = await readPersonScreen({ db: t.handle.db, viewer: viewers.get('admin')!, nowMs, personId: String(ids.get('crew')), searchParams: { saved: 'other' } });
    if (typeof screen === 'string') throw new Error(screen);
    expect(screen.linkScopes).toBeUndefined();
    expect(screen.notice).toBeUndefined();
    expect(screen.person.siteIds).toEqual([siteA]);
    expect(screen.tokens).toEqual([]);
  });
});

describe('audit log', () => {
  const read = async (searchParams: Record<string, string | string[] | undefined>): Promise<AuditScreen> => {
    const screen = await readAuditScreen({ db: t.handle.db, viewer: viewers.get('admin')!, nowMs, searchParams });
    if (screen === 'forbidden') throw new Error('forbidden');
    return screen;
  };

  beforeAll(async () => {
    const who = { personId: ids.get('operator')!, label: `operator-${tag}@test.invalid`, ip: '192.0.2.7' };
    for (let i = 0; i < AUDIT_PAGE_SIZE + 5; i++) {
      await writeAudit({ db: t.handle.db, actor: who, action: 'site-changed', target: `site ${i}`, detail: { i }, at: new Date(nowMs - (100 - i) * 60_000) });
    }
    await writeAudit({ db: t.handle.db, actor: { label: 'command line' }, action: 'fleet-imported', at: new Date(nowMs) });
  });

  it('is for administrators only', async () => {
    expect(await readAuditScreen({ db: t.handle.db, viewer: viewers.get('crew')!, nowMs, searchParams: {} })).toBe('forbidden');
  });

  it('writes each entry out: time to the second in UTC, actor, address or "unknown address", detail as JSON only when there is some', async () => {
    const screen = await read({ action: 'fleet-imported' });
    expect(screen.filtered).toBe(true);
    expect(screen.action).toBe('fleet-imported');
    expect(screen.entries).toEqual([
      { id: expect.any(Number), action: 'fleet-imported', target: undefined, at: { dateTime: '2026-05-01T12:00:00.000Z', text: '2026-05-01 12:00:00 UTC' }, actor: 'command line', ip: 'unknown address', detail: undefined },
    ]);
    const changed = (await read({ action: 'site-changed' })).entries[0]!;
    expect(changed).toMatchObject({ target: `site ${AUDIT_PAGE_SIZE + 4}`, ip: '192.0.2.7', detail: JSON.stringify({ i: AUDIT_PAGE_SIZE + 4 }, null, 1) });
    expect(screen.actions).toContain('sign-in-failed');
    expect(screen.people.map((p) => p.email)).toContain(`admin-${tag}@test.invalid`);
  });

  it('pages by a cursor that keeps the filter, and links back to the newest', async () => {
    const first = await read({ person: String(ids.get('operator')) });
    expect(first.person).toBe(String(ids.get('operator')));
    expect(first.entries).toHaveLength(AUDIT_PAGE_SIZE);
    expect(first.newestHref).toBeUndefined();
    const older = new URL(first.olderHref!, 'http://x');
    expect(older.pathname).toBe('/admin/audit');
    expect(older.searchParams.get('person')).toBe(String(ids.get('operator')));
    const last = first.entries.at(-1)!;
    expect(older.searchParams.get('before')).toBe(`${last.at.dateTime}_${last.id}`);
    const second = await read(Object.fromEntries(older.searchParams));
    // Person-added entries of the operator were written by 'test' (no person): only the 55 changes are theirs.
    expect(second.entries.map((e) => e.target)).toEqual(['site 4', 'site 3', 'site 2', 'site 1', 'site 0']);
    expect(second.olderHref).toBeUndefined();
    expect(second.newestHref).toBe(`/admin/audit?person=${ids.get('operator')}`);
    const none = await read({ before: `2000-01-01T00:00:00.000Z_1` });
    expect(none.entries).toEqual([]);
    expect(none.empty).toBe('No older entries.');
    expect(none.newestHref).toBe('/admin/audit');
  });

  it('leaves out a parameter it cannot use, as if not given', async () => {
    const plain = await read({});
    expect(plain.filtered).toBe(false);
    expect(plain.empty).toBe('Nothing in the log matches.');
    for (const bad of [
      { person: 'abc' },
      { person: '-3' },
      { person: '1e400' },
      { person: ['1', '2'] },
      { action: 'drop table' },
      { before: 'yesterday' },
      { before: '2026-99-99T99:99Z_1' },
      { before: `2026-01-01T00:00:00.000Z_${'9'.repeat(19)}` },
      { before: ['2026-01-01T00:00:00.000Z_1', '2026-01-01T00:00:00.000Z_2'] },
    ]) {
      const screen = await read(bad);
      expect({ bad, person: screen.person, action: screen.action, newest: screen.newestHref, n: screen.entries.length }).toEqual({
        bad,
        person: '',
        action: '',
        newest: undefined,
        n: plain.entries.length,
      });
    }
  });
});

describe('password and sign-in pages', () => {
  it('let only a person signed in with a session change their password, saying whether they must', () => {
    const owner = viewers.get('owner')!;
    expect(readPasswordScreen({ viewer: owner, searchParams: { next: '/sites' } })).toEqual({ signedIn: true, mustChange: true, email: owner.email, next: '/sites' });
    expect(readPasswordScreen({ viewer: { ...owner, via: 'token' }, searchParams: {} })).toMatchObject({ signedIn: false, next: '/' });
  });

  it('go on only to a path of this site', () => {
    for (const next of ['//evil.example/x', 'https://evil.example', '/sign-in', ['/a', '/b']]) {
      expect(readPasswordScreen({ viewer: LOCAL_VIEWER, searchParams: { next } }).next).toBe('/');
      expect(readSignInScreen({ searchParams: { next }, demo: false }).next).toBe('/');
    }
  });

  it('say "signed out" after signing out, and name the demo admin on a demo start only', () => {
    expect(readSignInScreen({ searchParams: { 'signed-out': '1', next: '/setup' }, demo: true })).toEqual({ next: '/setup', signedOut: true, demoAdminEmail: 'admin@demo.invalid' });
    expect(readSignInScreen({ searchParams: {}, demo: false })).toEqual({ next: '/', signedOut: false, demoAdminEmail: undefined });
  });
});
