/**
 * People, sessions, API tokens, display links and sign-in throttling on a
 * real database (PGlite, or PostgreSQL when DATABASE_URL is set), with a fake
 * clock passed as `now`. Each case tries to get in, not only the happy path.
 */
import { createHash } from 'node:crypto';
import { eq, sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rowsOf } from '@/db/client';
import { apiTokens, auditLog, people } from '@/db/schema';
import { createApiToken, resolveApiToken, revokeApiToken } from '@/lib/auth/api-tokens';
import { createDisplayLink, resolveDisplayLink, revokeDisplayLink } from '@/lib/auth/display-links';
import { hashPassword } from '@/lib/auth/passwords';
import { addPerson, getPersonByEmail, setPassword, setPersonDisabled, updatePersonAccess } from '@/lib/auth/people';
import { createSession, endSession, resolveSession } from '@/lib/auth/sessions';
import { signIn } from '@/lib/auth/sign-in';
import { FREE_FAILURES, MAX_WAIT_S } from '@/lib/auth/throttle';
import { canEditSetup } from '@/lib/auth/viewer';
import { upsertFleet } from '@/lib/setup/queries';
import { createTestDatabase, type TestDatabase } from '@/test/support/backend';
import { testFleet, testTag } from '@/test/support/ingest';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 1, hydroUnits: 1 });
const siteA = fleet.sites[0]!.id;
const actor = { label: 'test', personId: null };
const times = { idleHours: 12, maxDays: 7 };
const HOUR = 3_600_000;
let t: TestDatabase;

/** Adds a person, then swaps in a cheap hash (N = 2^10) so that the many sign-ins here take milliseconds. */
async function person(email: string, password: string, role: 'admin' | 'operator' | 'crew' | 'owner' = 'operator', siteIds: string[] = []) {
  const added = await addPerson({ db: t.handle.db, actor, person: { email, role, password, siteIds } });
  if (!added.ok) throw new Error(JSON.stringify(added.fieldErrors));
  await t.handle.db.update(people).set({ passwordHash: await hashPassword(password, { logN: 10, r: 8, p: 1 }) }).where(eq(people.id, added.person.id));
  return added.person;
}

beforeAll(async () => {
  t = await createTestDatabase();
  await upsertFleet({ db: t.handle.db, fleet });
});
afterAll(async () => {
  await t?.drop();
});

describe('people', () => {
  it('refuses a weak password with the reason, a crew member without sites, and an address taken in another case', async () => {
    const weak = await addPerson({ db: t.handle.db, actor, person: { email: 'weak@test.invalid', role: 'operator', password: 'qwerty123456' } });
    expect(weak).toMatchObject({ ok: false, fieldErrors: { password: expect.stringMatching(/common/) } });
    const short = await addPerson({ db: t.handle.db, actor, person: { email: 'short@test.invalid', role: 'operator', password: 'short' } });
    expect(short).toMatchObject({ ok: false, fieldErrors: { password: expect.stringMatching(/12 characters/) } });
    const crew = await addPerson({ db: t.handle.db, actor, person: { email: 'crew0@test.invalid', role: 'crew', password: 'spillway apron ladder' } });
    expect(crew).toMatchObject({ ok: false, fieldErrors: { siteIds: expect.stringMatching(/at least one/) } });
    const ghost = await addPerson({ db: t.handle.db, actor, person: { email: 'crew1@test.invalid', role: 'crew', password: 'spillway apron ladder', siteIds: ['no-such-site'] } });
    expect(ghost).toMatchObject({ ok: false, fieldErrors: { siteIds: expect.stringMatching(/no site "no-such-site"/) } });
    await person('Case@Test.invalid', 'penstock trash rack');
    const again = await addPerson({ db: t.handle.db, actor, person: { email: 'case@test.INVALID', role: 'operator', password: 'penstock trash rack' } });
    expect(again).toMatchObject({ ok: false, fieldErrors: { email: expect.stringMatching(/already/) } });
  });

  it('stores SQL and script strings as text, unchanged', async () => {
    const email = `x');drop/**/table/**/people;--<script>alert(1)</script>@test.invalid`;
    const p = await person(email, 'headrace forebay tailwater');
    expect((await getPersonByEmail({ db: t.handle.db, email }))?.email).toBe(email);
    expect(p.email).toBe(email);
    const n = rowsOf<{ n: number }>(await t.handle.db.execute(sql`select count(*)::int as n from people`))[0]!.n;
    expect(Number(n)).toBeGreaterThan(1);
  });

  it('keeps the last administrator who can sign in', async () => {
    const a = await person('only-admin@test.invalid', 'weir crest gauge board', 'admin');
    expect(await setPersonDisabled({ db: t.handle.db, actor, personId: a.id, disabled: true })).toMatchObject({ ok: false });
    expect(await updatePersonAccess({ db: t.handle.db, actor, personId: a.id, role: 'operator', siteIds: [] })).toMatchObject({ ok: false });
  });
});

describe('sessions', () => {
  it('end when idle for the idle time, and the idle time moves on with use', async () => {
    const p = await person('idle@test.invalid', 'draft tube cone liner');
    const t0 = new Date('2026-03-01T08:00:00Z');
    const { token } = await createSession({ db: t.handle.db, personId: p.id, times, now: t0 });
    expect(await resolveSession({ db: t.handle.db, token, times, now: new Date(t0.getTime() + 11 * HOUR) })).toBeDefined();
    // Used at 11 h, so alive at 22 h; unused from 11 h, gone after 23 h.
    expect(await resolveSession({ db: t.handle.db, token, times, now: new Date(t0.getTime() + 22 * HOUR) })).toBeDefined();
    expect(await resolveSession({ db: t.handle.db, token, times, now: new Date(t0.getTime() + 34 * HOUR + 1000) })).toBeUndefined();
  });

  it('end at the absolute limit however much they are used', async () => {
    const p = await person('absolute@test.invalid', 'runner blade cavitation');
    const t0 = new Date('2026-03-01T08:00:00Z');
    const { token } = await createSession({ db: t.handle.db, personId: p.id, times, now: t0 });
    let alive = 0;
    for (let h = 10; h <= 8 * 24; h += 10) {
      if (await resolveSession({ db: t.handle.db, token, times, now: new Date(t0.getTime() + h * HOUR) })) alive = h;
    }
    expect(alive).toBe(160); // the last check before 7 days (168 h)
  });

  it('are stored hashed; sign-out ends one; disabling a person and an admin reset end all of theirs', async () => {
    const p = await person('ends@test.invalid', 'governor wicket gate');
    const a = await createSession({ db: t.handle.db, personId: p.id, times });
    const b = await createSession({ db: t.handle.db, personId: p.id, times });
    const c = await createSession({ db: t.handle.db, personId: p.id, times });
    expect(a.token).toMatch(/^[A-Za-z0-9_-]{43}$/); // 256 bits
    expect(a.session.tokenHash).toBe(createHash('sha256').update(a.token).digest('hex'));
    await endSession({ db: t.handle.db, token: a.token });
    expect(await resolveSession({ db: t.handle.db, token: a.token, times })).toBeUndefined();
    expect(await resolveSession({ db: t.handle.db, token: b.token, times })).toBeDefined();
    await setPersonDisabled({ db: t.handle.db, actor, personId: p.id, disabled: true });
    expect(await resolveSession({ db: t.handle.db, token: b.token, times })).toBeUndefined();
    expect(await resolveSession({ db: t.handle.db, token: c.token, times })).toBeUndefined();
    await setPersonDisabled({ db: t.handle.db, actor, personId: p.id, disabled: false });
    const d = await createSession({ db: t.handle.db, personId: p.id, times });
    expect(await setPassword({ db: t.handle.db, actor, personId: p.id, password: 'turbine shaft seal ring', reset: true })).toEqual({ ok: true });
    expect(await resolveSession({ db: t.handle.db, token: d.token, times })).toBeUndefined();
  });

  it('a token of the wrong shape is never looked up', async () => {
    expect(await resolveSession({ db: t.handle.db, token: "' or 1=1 --", times })).toBeUndefined();
  });
});

describe('API tokens', () => {
  it('are shown once, stored only as a hash, carry the person, and stop at revocation and when the person is disabled', async () => {
    const p = await person('tokens@test.invalid', 'bulb unit nacelle', 'crew', [siteA]);
    const { token, row } = await createApiToken({ db: t.handle.db, actor, person: p, name: 'report' });
    expect(token).toMatch(/^mrt_[A-Za-z0-9_-]{43}$/);
    const stored = await t.handle.db.select().from(apiTokens).where(eq(apiTokens.id, row.id));
    expect(stored[0]!.tokenHash).toBe(createHash('sha256').update(token).digest('hex'));
    expect(JSON.stringify(stored)).not.toContain(token.slice(4));
    expect((await resolveApiToken({ db: t.handle.db, token }))?.id).toBe(p.id);
    expect(await resolveApiToken({ db: t.handle.db, token: token.slice(0, -1) + (token.endsWith('A') ? 'B' : 'A') })).toBeUndefined();
    await setPersonDisabled({ db: t.handle.db, actor, personId: p.id, disabled: true });
    expect(await resolveApiToken({ db: t.handle.db, token })).toBeUndefined();
    await setPersonDisabled({ db: t.handle.db, actor, personId: p.id, disabled: false });
    expect(await revokeApiToken({ db: t.handle.db, actor, personId: p.id + 1000, tokenId: row.id })).toBe(false); // another person's id
    expect(await revokeApiToken({ db: t.handle.db, actor, personId: p.id, tokenId: row.id })).toBe(true);
    expect(await resolveApiToken({ db: t.handle.db, token })).toBeUndefined();
  });
});

describe('display links', () => {
  it('give a read-only viewer of one site or the fleet, and nothing once revoked', async () => {
    const admin = await person('links@test.invalid', 'pelton bucket splitter', 'admin');
    const made = await createDisplayLink({ db: t.handle.db, actor, createdBy: admin.id, siteId: siteA, name: 'wall' });
    if (!made.ok) throw new Error(made.problem);
    const seen = await resolveDisplayLink({ db: t.handle.db, token: made.token });
    expect(seen?.viewer.siteIds).toEqual([siteA]);
    expect(canEditSetup(seen!.viewer)).toBe(false);
    expect(await createDisplayLink({ db: t.handle.db, actor, createdBy: admin.id, siteId: 'no-such-site', name: 'x' })).toMatchObject({ ok: false });
    await revokeDisplayLink({ db: t.handle.db, actor, linkId: made.row.id });
    expect(await resolveDisplayLink({ db: t.handle.db, token: made.token })).toBeUndefined();
  });
});

describe('sign-in throttling', () => {
  const base = new Date('2026-04-01T09:00:00Z');
  const at = (s: number) => new Date(base.getTime() + s * 1000);

  it('holds under a burst from one address, and the person still gets in from their own address', async () => {
    const p = await person('burst@test.invalid', 'surge tank riser');
    // The person signed in from their desk before.
    expect((await signIn({ db: t.handle.db, email: p.email, password: 'surge tank riser', ip: '10.0.0.5', times, now: at(0) })).kind).toBe('signed-in');
    const outcomes: string[] = [];
    for (let i = 0; i < 40; i++) outcomes.push((await signIn({ db: t.handle.db, email: p.email, password: `guess ${i} xxxxxxx`, ip: '203.0.113.9', times, now: at(10) })).kind);
    // The free failures are checked, then every try in the same second waits.
    expect(outcomes.filter((o) => o === 'refused')).toHaveLength(FREE_FAILURES.pair + 1);
    expect(outcomes.slice(FREE_FAILURES.pair + 1).every((o) => o === 'throttled')).toBe(true);
    const waited = await signIn({ db: t.handle.db, email: p.email, password: 'surge tank riser', ip: '203.0.113.9', times, now: at(11) });
    expect(waited).toMatchObject({ kind: 'throttled' });
    // The real person at their desk is not locked out by it.
    expect((await signIn({ db: t.handle.db, email: p.email, password: 'surge tank riser', ip: '10.0.0.5', times, now: at(12) })).kind).toBe('signed-in');
  });

  it('holds across many addresses for one account, without locking the person out of an address they used, and never waits more than 15 minutes', async () => {
    const p = await person('spread@test.invalid', 'trash boom anchor');
    expect((await signIn({ db: t.handle.db, email: p.email, password: 'trash boom anchor', ip: '10.0.0.7', times, now: at(0) })).kind).toBe('signed-in');
    const outcomes: string[] = [];
    for (let i = 0; i < 60; i++) outcomes.push((await signIn({ db: t.handle.db, email: p.email, password: `guess ${i} yyyyyyy`, ip: `198.51.100.${i + 1}`, times, now: at(20 + i) })).kind);
    // A few guesses get checked as the waits grow; most are refused unchecked.
    const checked = outcomes.filter((o) => o === 'refused').length;
    expect(checked).toBeGreaterThanOrEqual(FREE_FAILURES.account);
    expect(checked).toBeLessThan(FREE_FAILURES.account + 8);
    // The attacker goes on once a second until a guess is checked again (a new, longer wait starts then).
    let s = 80;
    while ((await signIn({ db: t.handle.db, email: p.email, password: `guess ${s} wwwwwww`, ip: `198.51.101.${s}`, times, now: at(s) })).kind !== 'refused') s += 1;
    expect(s).toBeLessThan(80 + MAX_WAIT_S);
    // From a new address the account waits, even with the right password...
    const fresh = await signIn({ db: t.handle.db, email: p.email, password: 'trash boom anchor', ip: '192.0.2.44', times, now: at(s + 1) });
    expect(fresh.kind).toBe('throttled');
    if (fresh.kind !== 'throttled') return;
    expect(fresh.retryAfterS).toBeGreaterThan(1);
    expect(fresh.retryAfterS).toBeLessThanOrEqual(MAX_WAIT_S);
    // ...but the person's own address is not blocked...
    expect((await signIn({ db: t.handle.db, email: p.email, password: 'trash boom anchor', ip: '10.0.0.7', times, now: at(s + 2) })).kind).toBe('signed-in');
    // ...and after the wait the new address gets in too.
    expect((await signIn({ db: t.handle.db, email: p.email, password: 'trash boom anchor', ip: '192.0.2.44', times, now: at(s + 1 + fresh.retryAfterS + 1) })).kind).toBe('signed-in');
  });

  it('counts a parallel burst one by one (no race lets it all through)', async () => {
    const p = await person('parallel@test.invalid', 'gate hoist chain');
    const burst = await Promise.all(
      Array.from({ length: 25 }, (_, i) => signIn({ db: t.handle.db, email: p.email, password: `guess ${i} zzzzzzz`, ip: '203.0.113.77', times, now: at(500) })),
    );
    expect(burst.filter((r) => r.kind === 'refused').length).toBeLessThanOrEqual(FREE_FAILURES.pair + 1);
  });

  it('answers the same for an address nobody has, and logs failures and sign-ins with the address', async () => {
    const nobody = await signIn({ db: t.handle.db, email: 'nobody@test.invalid', password: 'whatever long enough', ip: '192.0.2.1', times, now: at(900) });
    expect(nobody).toEqual({ kind: 'refused' });
    const p = await person('logged@test.invalid', 'valve actuator stem');
    await signIn({ db: t.handle.db, email: p.email, password: 'wrong wrong wrong', ip: '192.0.2.2', times, now: at(901) });
    await signIn({ db: t.handle.db, email: p.email, password: 'valve actuator stem', ip: '192.0.2.2', times, now: at(902) });
    const log = await t.handle.db.select().from(auditLog).where(eq(auditLog.personId, p.id));
    expect(log.map((r) => [r.action, r.ip])).toEqual(expect.arrayContaining([['sign-in-failed', '192.0.2.2'], ['sign-in', '192.0.2.2']]));
    expect(JSON.stringify(log)).not.toContain('valve actuator stem');
  });
});
