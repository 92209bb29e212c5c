/**
 * Who gets what, over HTTP against the running product: every page and
 * route under app/ (found on the file system: a new one without an entry
 * fails) as each role and as nobody, with the expected 200, 302 (to
 * sign-in), 401, 403 or 404. Each role calls with its own API token, which
 * carries the person's role and sites like a session does. Plus: guessed ids
 * of another's site and unit answer 404 with none of its data, a
 * cross-origin POST is refused, and SQL and script text in names and
 * addresses is stored and shown as text.
 *
 * A page that says "not found" answers with the status 404 itself (no
 * loading boundary above the pages, so Next has not sent 200 before the page
 * decides), the same for a missing site and one the caller may not see.
 */
import { readdirSync, statSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { openDatabase } from '@/db/client';
import { units } from '@/db/schema';
import { createApiToken } from '@/lib/auth/api-tokens';
import { createDisplayLink } from '@/lib/auth/display-links';
import { getPersonByEmail } from '@/lib/auth/people';
import { openAlert } from '@/lib/alerts/lifecycle';
import { insertAlert } from '@/lib/alerts/store';
import { insertWebhookEndpoint } from '@/lib/alerts/webhooks/queries';
import { addTestAccount, type TestAccount } from '@/test/support/accounts';
import { testFleet, testTag } from '@/test/support/ingest';
import { startProductProcess, type RunningProduct } from '@/test/support/product';
import { prepareProduct, type PreparedProduct } from './prepare';

type Caller = 'admin' | 'operator' | 'crew' | 'owner' | 'nobody';
const CALLERS: Caller[] = ['admin', 'operator', 'crew', 'owner', 'nobody'];
type Expect = Record<Caller, number>;

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 1, hydroUnits: 1 });
// A site name a careless page would run or a careless query would execute.
const NASTY = `<script>alert("x")</script> '); drop table sites;--`;
fleet.sites[1] = { ...fleet.sites[1]!, name: `${NASTY} ${tag}` };
fleet.units = fleet.units.map((u) => (u.siteId === fleet.sites[1]!.id ? { ...u, name: `${NASTY} unit` } : u));
const siteA = fleet.sites[0]!; // the crew member's site
const siteB = fleet.sites[1]!; // the owner's site
const unitA = fleet.units.find((u) => u.siteId === siteA.id)!;
const unitB = fleet.units.find((u) => u.siteId === siteB.id)!;

let prepared: PreparedProduct;
let product: RunningProduct;
const accounts = new Map<Caller, TestAccount>();
let displayToken = '';
let operatorId = 0;
let alertA = 0;

const ALL_OK: Expect = { admin: 200, operator: 200, crew: 200, owner: 200, nobody: 302 };
const PUBLIC: Expect = { admin: 200, operator: 200, crew: 200, owner: 200, nobody: 200 };
const ADMIN: Expect = { admin: 200, operator: 403, crew: 403, owner: 403, nobody: 302 };
const SETUP_WRITE: Expect = { admin: 200, operator: 200, crew: 403, owner: 403, nobody: 302 };
/** Site A: the crew member's; the owner sees only site B. */
const SITE_A: Expect = { admin: 200, operator: 200, crew: 200, owner: 404, nobody: 302 };
const SITE_B: Expect = { admin: 200, operator: 200, crew: 404, owner: 200, nobody: 302 };
const api = (e: Expect): Expect => ({ ...e, nobody: 401 });

/** Every page and route pattern, with the URLs to try and what each caller gets. */
const TABLE: Record<string, Array<{ url: () => string; expect: Expect }>> = {
  '/': [{ url: () => '/', expect: ALL_OK }],
  '/sign-in': [{ url: () => '/sign-in', expect: PUBLIC }],
  '/account/password': [{ url: () => '/account/password', expect: ALL_OK }],
  '/admin/people': [{ url: () => '/admin/people', expect: ADMIN }],
  '/admin/people/[personId]': [
    { url: () => `/admin/people/${operatorId}`, expect: ADMIN },
    { url: () => '/admin/people/999999', expect: { ...ADMIN, admin: 404 } },
  ],
  '/admin/audit': [{ url: () => '/admin/audit', expect: ADMIN }],
  '/display/[token]': [
    { url: () => `/display/${displayToken}`, expect: { ...PUBLIC } },
    { url: () => `/display/mrd_${'A'.repeat(43)}`, expect: { admin: 404, operator: 404, crew: 404, owner: 404, nobody: 404 } },
  ],
  '/sites/[siteId]': [
    { url: () => `/sites/${siteA.id}`, expect: SITE_A },
    { url: () => `/sites/${siteB.id}`, expect: SITE_B },
    { url: () => '/sites/no-such-site', expect: { admin: 404, operator: 404, crew: 404, owner: 404, nobody: 302 } },
  ],
  '/sites/[siteId]/units/[unitId]': [
    { url: () => `/sites/${siteA.id}/units/${unitA.id}`, expect: SITE_A },
    { url: () => `/sites/${siteB.id}/units/${unitB.id}`, expect: SITE_B },
  ],
  '/setup': [{ url: () => '/setup', expect: ALL_OK }],
  '/setup/sites/new': [{ url: () => '/setup/sites/new', expect: SETUP_WRITE }],
  '/setup/sites/[siteId]': [
    { url: () => `/setup/sites/${siteA.id}`, expect: SITE_A },
    { url: () => `/setup/sites/${siteB.id}`, expect: SITE_B },
  ],
  '/setup/units/new': [{ url: () => `/setup/units/new?site=${siteA.id}`, expect: SETUP_WRITE }],
  '/setup/units/[siteId]/[unitId]': [
    { url: () => `/setup/units/${siteA.id}/${unitA.id}`, expect: SITE_A },
    { url: () => `/setup/units/${siteB.id}/${unitB.id}`, expect: SITE_B },
  ],
  '/setup/import': [{ url: () => '/setup/import', expect: SETUP_WRITE }],
  '/setup/export': [{ url: () => '/setup/export', expect: ALL_OK }],
  // Linked from Setup for everyone; only admins and operators see the endpoints (checked below).
  '/setup/webhooks': [{ url: () => '/setup/webhooks', expect: ALL_OK }],
  '/data-quality': [{ url: () => '/data-quality', expect: ALL_OK }],
  '/alerts': [{ url: () => '/alerts', expect: ALL_OK }],
  '/alerts/[alertId]': [
    { url: () => `/alerts/${alertA}`, expect: SITE_A },
    { url: () => '/alerts/999999', expect: { admin: 404, operator: 404, crew: 404, owner: 404, nobody: 302 } },
  ],
  '/api/health': [{ url: () => '/api/health', expect: PUBLIC }],
  '/api/live': [
    { url: () => `/api/live?site=${siteA.id}`, expect: api(SITE_A) },
    { url: () => `/api/live?site=${siteB.id}&unit=${unitB.id}`, expect: api(SITE_B) },
  ],
  '/api/v1/sites': [{ url: () => '/api/v1/sites', expect: api(ALL_OK) }],
  '/api/v1/alerts': [
    { url: () => '/api/v1/alerts?state=all', expect: api(ALL_OK) },
    { url: () => `/api/v1/alerts?site=${siteA.id}`, expect: api(SITE_A) },
    { url: () => '/api/v1/alerts?state=open', expect: { admin: 400, operator: 400, crew: 400, owner: 400, nobody: 401 } },
  ],
  // No unit has been diagnosed: 404 for everyone who may ask, 401 for nobody.
  '/api/v1/units/[siteId]/[unitId]/health': [
    { url: () => `/api/v1/units/${siteA.id}/${unitA.id}/health`, expect: { admin: 404, operator: 404, crew: 404, owner: 404, nobody: 401 } },
  ],
};

/** Page and route patterns under app/, as URLs with [params]. */
function appRoutes(): string[] {
  const out: string[] = [];
  const walk = (dir: string) => {
    for (const f of readdirSync(dir)) {
      const full = join(dir, f);
      if (statSync(full).isDirectory()) walk(full);
      else if (/^(page|route)\.tsx?$/.test(f)) {
        const path = `/${relative('app', dir).split(sep).filter((s) => s && !/^\(.*\)$/.test(s)).join('/')}`;
        out.push(path === '/' ? '/' : path.replace(/\/$/, ''));
      }
    }
  };
  walk('app');
  return out.sort();
}

async function request(url: string, caller: Caller, init: RequestInit = {}): Promise<{ status: number; body: string; location: string | null }> {
  const headers = new Headers(init.headers);
  const account = accounts.get(caller);
  if (account) headers.set('authorization', `Bearer ${account.token}`);
  const controller = new AbortController();
  const response = await fetch(`${product.url}${url}`, { ...init, headers, redirect: 'manual', signal: controller.signal });
  // An event stream never ends: its status and headers are the answer.
  const body = response.headers.get('content-type')?.startsWith('text/event-stream') ? '' : await response.text();
  controller.abort();
  return { status: response.status, body, location: response.headers.get('location') };
}

beforeAll(async () => {
  prepared = await prepareProduct(fleet, []);
  const people: Array<[Caller, 'operator' | 'crew' | 'owner', string[]]> = [
    ['operator', 'operator', []],
    ['crew', 'crew', [siteA.id]],
    ['owner', 'owner', [siteB.id]],
  ];
  for (const [caller, role, sites] of people) {
    // The crew member's address carries script and SQL text too.
    const email = caller === 'crew' ? `crew'--<b>x</b>-${tag}@test.invalid` : `${caller}-${tag}@test.invalid`;
    accounts.set(caller, await addTestAccount(prepared.env, { email, password: 'penstock gate wheel', role, sites }));
  }
  const handle = await openDatabase({ url: prepared.env.DATABASE_URL, dataDir: prepared.env.DATA_DIR });
  try {
    operatorId = (await getPersonByEmail({ db: handle.db, email: accounts.get('operator')!.email }))!.id;
    const operator = (await getPersonByEmail({ db: handle.db, email: accounts.get('operator')!.email }))!;
    await createApiToken({ db: handle.db, actor: { label: 'test' }, person: operator, name: `${NASTY} token` });
    const link = await createDisplayLink({ db: handle.db, actor: { label: 'test' }, createdBy: operatorId, siteId: siteA.id, name: `${NASTY} wall` });
    if (!link.ok) throw new Error(link.problem);
    displayToken = link.token;
    const [unitRow] = await handle.db.select({ key: units.key }).from(units).where(eq(units.id, unitA.id));
    const opening = { unitKey: unitRow!.key, condition: 'overspeed', severity: 'alarm', message: 'Speed reached 430 rpm.', value: 430, limit: 420 } as const;
    alertA = (await insertAlert({ db: handle.db, opening, step: openAlert(Date.now()), nowMs: Date.now() }))!.id;
    const hook = await insertWebhookEndpoint({ db: handle.db, url: `https://hooks.test.invalid/${tag}?key=kept-out`, siteId: null, minSeverity: 'alarm', createdBy: 'test' });
    if (!hook.ok) throw new Error(JSON.stringify(hook.fieldErrors));
  } finally {
    await handle.close();
  }
  product = await startProductProcess({ DEMO: 'off', ...prepared.env });
  accounts.set('admin', product.admin!);
}, 300_000);

afterAll(async () => {
  await product?.stop();
  await prepared?.cleanUp();
}, 60_000);

describe('access to every page and route', () => {
  it('has an entry for every page and route under app/, and none for one that is gone', () => {
    expect(appRoutes()).toEqual(Object.keys(TABLE).sort());
  });

  it('answers each caller as the table says', async () => {
    const wrong: string[] = [];
    for (const [pattern, cases] of Object.entries(TABLE)) {
      for (const c of cases) {
        for (const caller of CALLERS) {
          const got = await request(c.url(), caller);
          if (got.status !== c.expect[caller]) wrong.push(`${pattern} ${c.url()} as ${caller}: ${got.status}, expected ${c.expect[caller]}`);
          if (got.status === 302 && !got.location?.includes('/sign-in?next=')) wrong.push(`${c.url()} as ${caller}: redirected to ${got.location}, not to sign-in`);
        }
      }
    }
    expect(wrong).toEqual([]);
  }, 240_000);
});

describe('what a caller may not see', () => {
  it("answers another's site and unit exactly like a missing one, with none of their data", async () => {
    const guessed = await request(`/api/v1/units/${siteA.id}/${unitA.id}/health`, 'owner');
    const missing = await request(`/api/v1/units/${siteA.id}/no-such-unit/health`, 'owner');
    expect(guessed.status).toBe(404);
    expect(missing.status).toBe(404);
    expect(guessed.body.replaceAll(unitA.id, 'U')).toBe(missing.body.replaceAll('no-such-unit', 'U'));
    for (const url of [`/sites/${siteA.id}`, `/sites/${siteA.id}/units/${unitA.id}`, `/setup/sites/${siteA.id}`, `/setup/units/${siteA.id}/${unitA.id}`]) {
      const page = await request(url, 'owner');
      expect(page.status, url).toBe(404);
      expect(page.body, url).not.toContain(siteA.name);
    }
  });

  it('shows the webhook endpoints to admins and operators only', async () => {
    for (const caller of ['admin', 'operator'] as Caller[]) expect((await request('/setup/webhooks', caller)).body, caller).toContain(`hooks.test.invalid/${tag}`);
    for (const caller of ['crew', 'owner'] as Caller[]) {
      const body = (await request('/setup/webhooks', caller)).body;
      expect(body, caller).not.toContain('hooks.test.invalid');
      expect(body, caller).toContain('Only an administrator or operator may see and manage the webhook endpoints.');
    }
  });

  it('lists only the caller’s own sites in the API, the export and the fleet page', async () => {
    const sitesOf = async (caller: Caller) => ((JSON.parse((await request('/api/v1/sites', caller)).body) as { sites: Array<{ id: string }> }).sites.map((s) => s.id).sort());
    expect(await sitesOf('crew')).toEqual([siteA.id]);
    expect(await sitesOf('owner')).toEqual([siteB.id]);
    expect(await sitesOf('operator')).toEqual([siteA.id, siteB.id].sort());
    const exported = JSON.parse((await request('/setup/export', 'crew')).body) as { sites: Array<{ id: string }>; units: Array<{ id: string }> };
    expect(exported.sites.map((s) => s.id)).toEqual([siteA.id]);
    expect(exported.units.map((u) => u.id)).toEqual([unitA.id]);
    const fleetPage = (await request('/', 'crew')).body;
    expect(fleetPage).toContain(siteA.name);
    expect(fleetPage).not.toContain(siteB.id);
  });
});

describe('requests that must be refused', () => {
  it('refuses a POST from another origin, even with valid credentials', async () => {
    for (const headers of [{ origin: 'https://elsewhere.example' }, { 'sec-fetch-site': 'cross-site' }] as Array<Record<string, string>>) {
      const got = await request('/setup/sites/new', 'admin', { method: 'POST', headers, body: 'x=1' });
      expect(got.status).toBe(403);
      expect(got.body).toContain('another site');
    }
    const api = await request('/api/v1/sites', 'admin', { method: 'POST', headers: { origin: 'https://elsewhere.example' } });
    expect(api.status).toBe(403);
    expect(JSON.parse(api.body)).toMatchObject({ error: { code: 'forbidden:csrf' } });
  });

  it('answers a revoked or made-up token 401, and no cookie a redirect to sign-in', async () => {
    const bad = await fetch(`${product.url}/api/v1/sites`, { headers: { authorization: `Bearer mrt_${'B'.repeat(43)}` } });
    expect(bad.status).toBe(401);
    expect(await bad.json()).toMatchObject({ error: { code: 'unauthenticated' } });
    const page = await fetch(`${product.url}/setup`, { redirect: 'manual', headers: { cookie: `millrace-session=${'C'.repeat(43)}` } });
    expect(page.status).toBe(302);
    expect(page.headers.get('location')).toContain('/sign-in?next=%2Fsetup');
  });

  it('shows SQL and script text in names and addresses as text', async () => {
    const people = (await request('/admin/people', 'admin')).body;
    expect(people).toContain('&lt;b&gt;x&lt;/b&gt;');
    expect(people).not.toContain('<b>x</b>');
    for (const url of ['/', '/setup', `/sites/${siteB.id}`, `/sites/${siteB.id}/units/${unitB.id}`, `/admin/people/${operatorId}`, '/admin/audit', `/display/${displayToken}`]) {
      const html = (await request(url, 'admin')).body;
      expect(html, url).toContain('&lt;script&gt;alert(');
      expect(html, url).not.toContain('<script>alert(');
    }
    const sites = JSON.parse((await request('/api/v1/sites', 'admin')).body) as { sites: Array<{ name: string }> };
    expect(sites.sites.map((s) => s.name)).toContain(siteB.name);
  });

  it('sends the security headers on pages and API answers', async () => {
    for (const url of ['/sign-in', '/api/v1/sites']) {
      const response = await fetch(`${product.url}${url}`, { headers: { authorization: `Bearer ${accounts.get('admin')!.token}` } });
      const csp = response.headers.get('content-security-policy') ?? '';
      expect(csp, url).toMatch(/script-src 'self' 'nonce-[A-Za-z0-9+/=]{16,}' 'strict-dynamic'/);
      expect(csp, url).toContain("frame-ancestors 'none'");
      expect(response.headers.get('x-content-type-options'), url).toBe('nosniff');
      expect(response.headers.get('referrer-policy'), url).toBe('same-origin');
    }
  });
});
