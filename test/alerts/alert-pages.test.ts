/**
 * The alert pages as the server renders them, on a real database, with the
 * request's viewer set by hand: the list's checkboxes belong to the one
 * acknowledge form, an owner gets no form, a bad filter is named, an alert's
 * page carries the safety caution, its history and its forms, another site's
 * alert is not found; and an acknowledgement made through the server action
 * shows on the list afterwards.
 */
import type { ReactElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import type { Viewer } from '@/lib/auth/viewer';
import { openAlert } from '@/lib/alerts/lifecycle';
import { insertAlert } from '@/lib/alerts/store';
import { SAFETY_CAUTION } from '@/lib/diagnosis/findings';
import { createTestDatabase, type TestDatabase } from '@/test/support/backend';
import { queryRows, registerFleet, testFleet, testTag } from '@/test/support/ingest';

const state = vi.hoisted(() => ({ viewer: undefined as Viewer | undefined, db: undefined as unknown }));

vi.mock('@/lib/request/context', () => ({
  requestContext: async () => {
    if (!state.viewer) throw new Error('REDIRECT /sign-in');
    return { db: state.db, handle: undefined, viewer: state.viewer, nowMs: Date.now() };
  },
}));
vi.mock('next/navigation', () => ({
  notFound: () => {
    throw new Error('NOT_FOUND');
  },
  usePathname: () => '/alerts',
}));
vi.mock('next/cache', () => ({ revalidatePath: () => undefined }));

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 1, hydroUnits: 1 });
const [w1, h1] = fleet.units as [(typeof fleet.units)[0], (typeof fleet.units)[0]];
let t: TestDatabase;
let alertA = 0;
let alertB = 0;

const crewA: Viewer = { id: 'person:a', role: 'crew', siteIds: [w1.siteId], email: `crew-a-${tag}@test.invalid`, via: 'session' };
const ownerA: Viewer = { id: 'person:o', role: 'owner', siteIds: [w1.siteId], email: `owner-${tag}@test.invalid`, via: 'session' };

async function open(unitId: string, condition: 'overspeed' | 'offline', message: string): Promise<number> {
  const [row] = await queryRows<{ key: number }>(t.handle, 'select key from units where id = $1', [unitId]);
  const opening = { unitKey: Number(row!.key), condition, severity: condition === 'overspeed' ? 'alarm' : 'warning', message, value: 431, limit: 420 } as const;
  return (await insertAlert({ db: t.handle.db, opening, step: openAlert(Date.now() - 60_000), nowMs: Date.now() - 60_000 }))!.id;
}

async function listHtml(viewer: Viewer, search: Record<string, string> = {}): Promise<string> {
  state.viewer = viewer;
  const { default: AlertsPage } = await import('@/app/alerts/page');
  return renderToStaticMarkup((await AlertsPage({ searchParams: Promise.resolve(search) })) as ReactElement);
}

async function alertHtml(viewer: Viewer, alertId: number): Promise<string> {
  state.viewer = viewer;
  const { default: AlertPage } = await import('@/app/alerts/[alertId]/page');
  return renderToStaticMarkup((await AlertPage({ params: Promise.resolve({ alertId: String(alertId) }) })) as ReactElement);
}

beforeAll(async () => {
  t = await createTestDatabase();
  state.db = t.handle.db;
  await registerFleet(t.handle, fleet);
  alertA = await open(w1.id, 'overspeed', 'Speed reached 431 rpm in the last 10 minutes; the overspeed limit is 420 rpm.');
  alertB = await open(h1.id, 'offline', `Hydro unit silent ${tag}.`);
});

afterAll(async () => {
  await t?.drop();
});

describe('the alert list page', () => {
  it("gives a crew member a checkbox per alert, each belonging to the one acknowledge form, and none of another site's alerts", async () => {
    const html = await listHtml(crewA);
    expect(html).toContain('<form id="acknowledge-selected"');
    expect(html).toContain(`<input type="checkbox" form="acknowledge-selected" name="alertId" value="${alertA}"/>`);
    expect(html).toContain('Overspeed');
    expect(html).toContain('431\u202frpm');
    expect(html).toContain('data-state="fault"');
    expect(html).toContain('>Alarm<');
    expect(html).not.toContain(`Hydro unit silent ${tag}`);
    expect(html).toContain('Shelve…');
  });

  it('gives an owner the list without forms, and names a filter it cannot read', async () => {
    const html = await listHtml(ownerA, { condition: 'smoke' });
    expect(html).toContain('Overspeed');
    expect(html).not.toContain('type="checkbox"');
    expect(html).not.toContain('<form id="acknowledge-selected"');
    expect(html).toContain('condition: no such condition &quot;smoke&quot;');
  });

  it('shows an acknowledgement made through the action', async () => {
    state.viewer = crewA;
    const { acknowledgeAlertsAction } = await import('@/app/alerts/actions');
    const data = new FormData();
    data.append('alertId', String(alertA));
    data.append('note', 'On my way with the brake key.');
    expect(await acknowledgeAlertsAction({ submitted: 0 }, data)).toEqual({ submitted: 1, done: 'Acknowledged one alert.' });
    const html = await listHtml(crewA);
    expect(html).toContain('Acknowledged');
    expect(html).toContain(crewA.email);
    expect(html).toContain('On my way with the brake key.');
    expect(html).not.toContain(`form="acknowledge-selected" name="alertId" value="${alertA}"`);
    const refused = await acknowledgeAlertsAction({ submitted: 0 }, (() => {
      const d = new FormData();
      d.append('alertId', String(alertB));
      return d;
    })());
    expect(refused).toMatchObject({ error: `Alert ${alertB} does not exist. Nothing was acknowledged.` });
  });
});

describe("an alert's page", () => {
  it('carries the safety caution, the history, the link to the unit and the shelve form', async () => {
    const html = await alertHtml(crewA, alertA);
    expect(html).toContain(SAFETY_CAUTION.replaceAll("'", '&#x27;'));
    expect(html).toContain('data-testid="safety-caution"');
    expect(html).toContain(`href="/sites/${w1.siteId}/units/${w1.id}"`);
    expect(html).toContain('History, oldest first');
    expect(html).toMatch(/Opened<\/span>.*Acknowledged<\/span>/s);
    expect(html).toContain('name="reason"');
    expect(html).toContain('value="until"');
  });

  it("is not found for another site's crew, and has no forms for an owner", async () => {
    await expect(alertHtml({ ...crewA, siteIds: [h1.siteId] }, alertA)).rejects.toThrow('NOT_FOUND');
    const owner = await alertHtml(ownerA, alertA);
    expect(owner).not.toContain('name="reason"');
    expect(owner).toContain('data-testid="safety-caution"');
  });
});
