/**
 * Every server action under app/ (the files marked 'use server'), called as
 * each role and as nobody, against a real database: the action itself must
 * refuse a caller its role does not allow (the proxy's path check is only the
 * first gate; a posted action can reach any handler). The table must name
 * every exported action: a new one without an entry fails the first test.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { addPerson, viewerOfPerson } from '@/lib/auth/people';
import type { Role } from '@/lib/contract/roles';
import type { Viewer } from '@/lib/auth/viewer';
import { upsertFleet } from '@/lib/setup/queries';
import { formOfNameplate } from '@/lib/setup/forms';
import { createTestDatabase, type TestDatabase } from '@/test/support/backend';
import { openAlert } from '@/lib/alerts/lifecycle';
import { insertAlert } from '@/lib/alerts/store';
import { insertWebhookEndpoint } from '@/lib/alerts/webhooks/queries';
import { queryRows, testFleet, testTag } from '@/test/support/ingest';

const state = vi.hoisted(() => ({ viewer: undefined as Viewer | undefined }));

vi.mock('next/headers', () => ({
  headers: async () => new Headers({ host: 'localhost:3000', 'x-millrace-client-ip': '127.0.0.1', 'x-forwarded-proto': 'http' }),
  cookies: async () => ({ get: () => undefined, set: () => undefined, delete: () => undefined }),
}));
vi.mock('next/navigation', () => ({
  redirect: (to: string) => {
    throw new Error(`REDIRECT ${to}`);
  },
  notFound: () => {
    throw new Error('NOT_FOUND');
  },
  forbidden: () => {
    throw new Error('FORBIDDEN');
  },
}));
vi.mock('next/cache', () => ({ revalidatePath: () => undefined }));
vi.mock('@/lib/auth/viewer', async (original) => ({
  ...(await original<typeof import('@/lib/auth/viewer')>()),
  // Nobody signed in: what lib/auth/request.ts does on a page or action.
  currentViewer: async () => {
    if (!state.viewer) throw new Error('REDIRECT /sign-in?next=%2F');
    return state.viewer;
  },
}));

type Caller = Role | 'nobody';
const CALLERS: Caller[] = ['admin', 'operator', 'crew', 'owner', 'nobody'];
/** done: the action did its work (or answered a problem of the input); refused: not allowed; sign-in: sent to sign in. */
type Outcome = 'done' | 'refused' | 'sign-in';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 1, hydroUnits: 1 });
const siteA = fleet.sites[0]!.id; // crew's site
const siteB = fleet.sites[1]!.id; // owner's site
const unitA = fleet.units.find((u) => u.siteId === siteA)!;
let t: TestDatabase;
const viewers = new Map<Role, Viewer>();
let seq = 0;
const next = () => ++seq;

function form(values: Record<string, string | string[]>): FormData {
  const data = new FormData();
  for (const [k, v] of Object.entries(values)) for (const one of [v].flat()) data.append(k, one);
  return data;
}

/** Loads every 'use server' module under app/ and names its exported functions `file#name`. */
async function serverActions(): Promise<Map<string, (...args: unknown[]) => Promise<unknown>>> {
  const found = new Map<string, (...args: unknown[]) => Promise<unknown>>();
  const walk = (dir: string): string[] =>
    readdirSync(dir).flatMap((f) => (statSync(join(dir, f)).isDirectory() ? walk(join(dir, f)) : /\.tsx?$/.test(f) ? [join(dir, f)] : []));
  for (const file of walk('app')) {
    if (!/^\s*(\/\/.*\n|\s)*['"]use server['"]/.test(readFileSync(file, 'utf8'))) continue;
    const mod = (await import(/* @vite-ignore */ join(process.cwd(), file))) as Record<string, unknown>;
    for (const [name, value] of Object.entries(mod)) if (typeof value === 'function') found.set(`${relative('app', file)}#${name}`, value as never);
  }
  return found;
}

function outcomeOf(result: unknown): Outcome {
  const text = JSON.stringify(result ?? null);
  if (/Only an administrator|may not change|not yours to see|Sign in first|does not exist/.test(text)) return 'refused';
  return 'done';
}

async function run(call: () => Promise<unknown>): Promise<Outcome> {
  try {
    return outcomeOf(await call());
  } catch (error) {
    const message = (error as Error).message;
    if (message.startsWith('REDIRECT /sign-in?next')) return 'sign-in';
    if (message.startsWith('REDIRECT')) return 'done';
    if (message === 'FORBIDDEN' || message === 'NOT_FOUND') return 'refused';
    throw error;
  }
}

const ADMIN_ONLY: Record<Caller, Outcome> = { admin: 'done', operator: 'refused', crew: 'refused', owner: 'refused', nobody: 'sign-in' };
const SETUP: Record<Caller, Outcome> = { admin: 'done', operator: 'done', crew: 'refused', owner: 'refused', nobody: 'sign-in' };
/** Acknowledging and shelving alerts: everyone but owners (an alert of the crew member's own site). */
const ALERTS: Record<Caller, Outcome> = { admin: 'done', operator: 'done', crew: 'done', owner: 'refused', nobody: 'sign-in' };

let targetId = 0;
let tokenId = 0;
let linkId = 0;
let alertId = 0;
let webhookId = 0;

/** Each action: how to call it, and what each caller gets. */
const TABLE: Record<string, { expect: Record<Caller, Outcome>; call: (fn: (...args: unknown[]) => Promise<unknown>) => Promise<unknown> }> = {
  'admin/actions.ts#addPersonAction': {
    expect: ADMIN_ONLY,
    call: (fn) => fn({ submitted: 0 }, form({ email: `new${next()}@test.invalid`, role: 'operator', password: 'mill leat overflow' })),
  },
  'admin/actions.ts#updateAccessAction': { expect: ADMIN_ONLY, call: (fn) => fn(targetId, { submitted: 0 }, form({ role: 'crew', siteIds: [siteA] })) },
  'admin/actions.ts#setDisabledAction': { expect: ADMIN_ONLY, call: (fn) => fn(targetId, false, { submitted: 0 }) },
  'admin/actions.ts#resetPasswordAction': { expect: ADMIN_ONLY, call: (fn) => fn(targetId, { submitted: 0 }, form({ password: `sluice ${next()} reset word` })) },
  'admin/actions.ts#createTokenAction': { expect: ADMIN_ONLY, call: (fn) => fn(targetId, { submitted: 0 }, form({ name: 'script' })) },
  'admin/actions.ts#revokeTokenAction': { expect: ADMIN_ONLY, call: (fn) => fn(targetId, tokenId, { submitted: 0 }) },
  'admin/actions.ts#createDisplayLinkAction': { expect: ADMIN_ONLY, call: (fn) => fn(targetId, { submitted: 0 }, form({ scope: siteA, name: 'wall' })) },
  'admin/actions.ts#revokeDisplayLinkAction': { expect: ADMIN_ONLY, call: (fn) => fn(linkId, { submitted: 0 }) },
  'setup/actions.ts#saveSiteAction': {
    expect: SETUP,
    call: (fn) => fn(undefined, { submitted: 0, values: {} }, form({ id: `site-${tag}-${next()}`, name: 'Test site', timezone: 'Europe/Oslo' })),
  },
  'setup/actions.ts#saveUnitAction': {
    expect: SETUP,
    call: (fn) =>
      fn({ siteId: siteA, unitId: unitA.id }, { submitted: 0, values: {} }, form({ ...formOfNameplate(unitA), poles: String(unitA.poles + 2) })),
  },
  'setup/actions.ts#importFleetAction': {
    expect: SETUP,
    call: async (fn) => {
      const result = (await fn({ submitted: 0 }, form({ intent: 'import', fleetText: JSON.stringify({ sites: [fleet.sites[0]], units: [] }), fileName: 'FLEET.json' }))) as { report?: { ok: boolean; problems: string[] } };
      return result.report?.ok ? result : { refused: 'may not change', problems: result.report?.problems };
    },
  },
  'setup/device-actions.ts#issueDeviceCredentialsAction': { expect: SETUP, call: (fn) => fn({ siteId: siteA, unitId: unitA.id }, { submitted: 0 }) },
  'setup/device-actions.ts#deviceCredentialsAction': { expect: SETUP, call: (fn) => fn({ siteId: siteA, unitId: unitA.id }, { submitted: 0 }, form({ intent: 'revoke' })) },
  'setup/webhook-actions.ts#addWebhookEndpointAction': {
    expect: SETUP,
    call: (fn) => fn({ submitted: 0 }, form({ url: `https://hooks.test.invalid/in-${next()}`, siteId: '', minSeverity: 'warning' })),
  },
  // The operator disables it first, the admin again after: both done.
  'setup/webhook-actions.ts#disableWebhookEndpointAction': { expect: SETUP, call: (fn) => fn(webhookId, { submitted: 0 }) },
  'alerts/actions.ts#acknowledgeAlertsAction': { expect: ALERTS, call: (fn) => fn({ submitted: 0 }, form({ alertId: String(alertId), note: 'Going up to look.' })) },
  'alerts/actions.ts#shelveAlertAction': { expect: ALERTS, call: (fn) => fn(alertId, { submitted: 0 }, form({ reason: 'Planned work on the unit', for: '8h' })) },
  // Open to anyone by design: signing in, signing out (ends only the caller's own session).
  'sign-in/actions.ts#signInAction': {
    expect: { admin: 'done', operator: 'done', crew: 'done', owner: 'done', nobody: 'done' },
    call: (fn) => fn({ submitted: 0 }, form({ email: 'nobody@test.invalid', password: 'not the password at all', next: '/' })),
  },
  'sign-in/actions.ts#signOutAction': { expect: { admin: 'done', operator: 'done', crew: 'done', owner: 'done', nobody: 'done' }, call: (fn) => fn() },
  // Only a person signed in with a session changes their own password (not a token, not nobody).
  'account/actions.ts#changePasswordAction': {
    expect: { admin: 'refused', operator: 'refused', crew: 'refused', owner: 'refused', nobody: 'sign-in' },
    call: (fn) => fn({ submitted: 0 }, form({ current: 'x', password: 'new long password here', again: 'new long password here' })),
  },
};

beforeAll(async () => {
  t = await createTestDatabase();
  (globalThis as { __millraceDatabase?: Promise<unknown> }).__millraceDatabase = Promise.resolve(t.handle);
  await upsertFleet({ db: t.handle.db, fleet });
  const actor = { label: 'test', personId: null };
  for (const role of ['admin', 'operator', 'crew', 'owner'] as const) {
    const added = await addPerson({
      db: t.handle.db,
      actor,
      person: { email: `${role}-${tag}@test.invalid`, role, password: 'headrace culvert grille', siteIds: role === 'crew' ? [siteA] : role === 'owner' ? [siteB] : [] },
    });
    if (!added.ok) throw new Error(JSON.stringify(added.fieldErrors));
    // As through an API token: changing one's password needs a session, which this is not.
    viewers.set(role, await viewerOfPerson({ db: t.handle.db, person: added.person, via: 'token' }));
  }
  const target = await addPerson({ db: t.handle.db, actor, person: { email: `target-${tag}@test.invalid`, role: 'admin', password: 'headrace culvert grille' } });
  if (!target.ok) throw new Error('target');
  targetId = target.person.id;
  const { createApiToken } = await import('@/lib/auth/api-tokens');
  const { createDisplayLink } = await import('@/lib/auth/display-links');
  tokenId = (await createApiToken({ db: t.handle.db, actor, person: target.person, name: 'x' })).row.id;
  const link = await createDisplayLink({ db: t.handle.db, actor, createdBy: targetId, siteId: siteA, name: 'x' });
  if (link.ok) linkId = link.row.id;
  const [unitRow] = await queryRows<{ key: number }>(t.handle, 'select key from units where id = $1', [unitA.id]);
  const opening = { unitKey: Number(unitRow!.key), condition: 'overspeed', severity: 'alarm', message: 'Speed reached 430 rpm.', value: 430, limit: 420 } as const;
  alertId = (await insertAlert({ db: t.handle.db, opening, step: openAlert(Date.now()), nowMs: Date.now() }))!.id;
  const endpoint = await insertWebhookEndpoint({ db: t.handle.db, url: 'https://hooks.test.invalid/disable-me', siteId: null, minSeverity: 'alarm', createdBy: 'test' });
  if (!endpoint.ok) throw new Error(JSON.stringify(endpoint.fieldErrors));
  webhookId = endpoint.endpoint.id;
}, 60_000);

afterAll(async () => {
  delete (globalThis as { __millraceDatabase?: unknown }).__millraceDatabase;
  await t?.drop();
});

describe('server actions', () => {
  it('has an entry for every exported server action, and no entry for one that is gone', async () => {
    const actions = await serverActions();
    expect([...actions.keys()].sort()).toEqual(Object.keys(TABLE).sort());
  });

  it('each refuses the callers its role does not allow, and sends nobody to sign in', async () => {
    const actions = await serverActions();
    const got: Record<string, Record<Caller, Outcome>> = {};
    const want: Record<string, Record<Caller, Outcome>> = {};
    // Least allowed first, so that an allowed caller's change (a revoked token) does not hide a refusal.
    for (const caller of ['nobody', 'owner', 'crew', 'operator', 'admin'] as Caller[]) {
      for (const [key, entry] of Object.entries(TABLE)) {
        state.viewer = caller === 'nobody' ? undefined : viewers.get(caller);
        (got[key] ??= {} as Record<Caller, Outcome>)[caller] = await run(() => entry.call(actions.get(key)!));
        want[key] = entry.expect;
      }
    }
    for (const key of Object.keys(TABLE)) for (const c of CALLERS) expect(`${key} as ${c}: ${got[key]![c]}`).toBe(`${key} as ${c}: ${want[key]![c]}`);
  }, 120_000);
});
