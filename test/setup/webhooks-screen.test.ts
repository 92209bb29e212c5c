/**
 * The setup screen's webhook endpoints on a real database (PGlite or
 * PostgreSQL): the list in words with what each queue holds, the site
 * choices, the secret only in the answer to adding one and never in the
 * list, problems by form field, and nothing at all for a role that may not
 * manage endpoints (contract section 7: "or on the setup screen").
 */
import { eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { webhookDeliveries } from '@/db/schema';
import { enqueueWebhookMessages, insertWebhookEndpoint } from '@/lib/alerts/webhooks/queries';
import { LOCAL_VIEWER, type Viewer } from '@/lib/auth/viewer';
import { addWebhookEndpoint, disableWebhookEndpointFor, readWebhooksScreen, type WebhookEndpointRow } from '@/lib/setup/webhooks-screen';
import { testAlert, webhookTestDatabase } from '@/test/alerts/webhook-endpoint';
import { testFleet, testTag } from '@/test/support/ingest';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 1, hydroUnits: 1 });
const [windSite, hydroSite] = fleet.sites as [(typeof fleet.sites)[0], (typeof fleet.sites)[0]];
const wind = fleet.units[0]!;
const db = webhookTestDatabase(fleet);
const NOW = Date.parse('2026-03-01T10:00:00Z');

const operator: Viewer = { id: 'person:2', personId: 2, role: 'operator', siteIds: 'all', via: 'session', email: `operator-${tag}@test.invalid` };
const crew: Viewer = { id: 'person:3', personId: 3, role: 'crew', siteIds: [windSite.id], via: 'session', email: `crew-${tag}@test.invalid` };
const owner: Viewer = { id: 'person:4', personId: 4, role: 'owner', siteIds: [hydroSite.id], via: 'session', email: `owner-${tag}@test.invalid` };

async function rows(viewer: Viewer = LOCAL_VIEWER): Promise<WebhookEndpointRow[]> {
  const screen = await readWebhooksScreen({ db: db(), viewer });
  if (!screen.editable) throw new Error('expected an editable screen');
  return screen.endpoints;
}

describe('the webhooks screen', () => {
  it('lists each endpoint in words, with its queue counted, and offers every site or one', async () => {
    const added = await addWebhookEndpoint({ db: db(), viewer: operator, form: { url: 'https://hooks.example.org/in?key=abc', siteId: windSite.id, minSeverity: 'alarm' } });
    expect(added.ok).toBe(true);
    const every = await insertWebhookEndpoint({ db: db(), url: 'http://127.0.0.1:9/every', siteId: null, minSeverity: 'info', createdBy: 'cli' });
    if (!added.ok || !every.ok) throw new Error('not added');
    // Three alarms of the wind site reach both endpoints; one of the second's is delivered, one given up.
    for (const id of ['1', '2', '3']) await enqueueWebhookMessages({ db: db(), type: 'alert.opened', alert: testAlert({ siteId: windSite.id, unitId: wind.id, severity: 'alarm', id }), nowMs: NOW });
    const second = await db().select({ id: webhookDeliveries.id }).from(webhookDeliveries).where(eq(webhookDeliveries.endpointId, every.endpoint.id));
    await db().update(webhookDeliveries).set({ deliveredAt: new Date(NOW + 1000), nextAttemptAt: null }).where(eq(webhookDeliveries.id, second[0]!.id));
    await db().update(webhookDeliveries).set({ givenUpAt: new Date(NOW + 2000), nextAttemptAt: null }).where(eq(webhookDeliveries.id, second[1]!.id));

    const screen = await readWebhooksScreen({ db: db(), viewer: operator });
    expect(screen).toMatchObject({ editable: true, defaultSeverity: 'warning' });
    if (!screen.editable) return;
    expect(screen.siteChoices).toEqual([
      { value: '', label: 'Every site' },
      // By name, as the setup index orders them.
      { value: hydroSite.id, label: `${hydroSite.name} (${hydroSite.id})` },
      { value: windSite.id, label: `${windSite.name} (${windSite.id})` },
    ]);
    expect(screen.severityChoices.map((c) => c.value)).toEqual(['alarm', 'warning', 'info']);
    const [one, two] = screen.endpoints;
    expect(one).toMatchObject({
      id: added.added.id,
      url: 'https://hooks.example.org/in?key=abc',
      siteId: windSite.id,
      siteLabel: windSite.name,
      minSeverity: 'alarm',
      severityLabel: 'Alarms only',
      enabled: true,
      stateLabel: 'Enabled',
      queued: 3,
      delivered: 0,
      givenUp: 0,
      countLabels: { queued: '3 queued', delivered: '0 delivered', givenUp: '0 given up' },
      createdBy: operator.email,
    });
    expect(one!.createdAtLabel).toMatch(/^\d{4}-\d\d-\d\d \d\d:\d\d:\d\d UTC$/);
    expect(new Date(one!.createdAt).toISOString()).toBe(one!.createdAt);
    expect(two).toMatchObject({ siteId: null, siteLabel: 'Every site', severityLabel: 'Everything: information, warnings and alarms', createdBy: 'cli' });
    expect(two).toMatchObject({ queued: 1, delivered: 1, givenUp: 1, countLabels: { queued: '1 queued', delivered: '1 delivered', givenUp: '1 given up' } });
    expect(added.added.reach).toBe(`Alarms only of ${windSite.name}`);
  });

  it('returns the secret once, in the answer to adding, and never in the view model', async () => {
    const added = await addWebhookEndpoint({ db: db(), viewer: LOCAL_VIEWER, form: { url: 'https://hooks.example.org/x', siteId: '', minSeverity: 'warning' } });
    if (!added.ok) throw new Error(JSON.stringify(added.fieldErrors));
    // Contract section 7: whsec_ then base64 of the key.
    expect(added.added.secret).toMatch(/^whsec_[A-Za-z0-9+/]+=*$/);
    expect(added.added.reach).toBe('Warnings and alarms of every site');
    const text = JSON.stringify(await readWebhooksScreen({ db: db(), viewer: LOCAL_VIEWER }));
    expect(text).toContain('https://hooks.example.org/x');
    expect(text).not.toContain(added.added.secret.slice(6));
    expect(text).not.toContain('whsec_');
    expect(await rows()).toHaveLength(1);
  });

  it('answers problems by the form’s field names', async () => {
    const bad = await addWebhookEndpoint({ db: db(), viewer: LOCAL_VIEWER, form: { url: 'ftp://files.example.org/x', siteId: 'no-such-site', minSeverity: 'loud' } });
    expect(bad.ok).toBe(false);
    if (bad.ok) return;
    expect(bad.fieldErrors.url).toMatch(/must be an http:\/\/ or https:\/\/ address, got "ftp:\/\/files.example.org\/x"/);
    expect(bad.fieldErrors.minSeverity).toMatch(/must be info, warning or alarm, got "loud"/);
    const unknown = await addWebhookEndpoint({ db: db(), viewer: LOCAL_VIEWER, form: { url: 'https://hooks.example.org/x', siteId: 'no-such-site', minSeverity: 'alarm' } });
    expect(unknown.ok === false && unknown.fieldErrors).toEqual({ siteId: 'no site "no-such-site": add the site first, or leave the site out for every site' });
    expect(await rows()).toEqual([]);
  });

  it('disables an endpoint, giving up what it had not received, and says so', async () => {
    const added = await addWebhookEndpoint({ db: db(), viewer: operator, form: { url: 'https://hooks.example.org/off', siteId: '', minSeverity: 'warning' } });
    if (!added.ok) throw new Error('not added');
    await enqueueWebhookMessages({ db: db(), type: 'alert.opened', alert: testAlert({ siteId: windSite.id, unitId: wind.id, severity: 'warning' }), nowMs: NOW });
    const done = await disableWebhookEndpointFor({ db: db(), viewer: operator, id: added.added.id, nowMs: NOW + 5000 });
    expect(done).toBe(`Endpoint ${added.added.id} disabled: nothing more is sent to https://hooks.example.org/off; 1 queued message given up.`);
    expect(await rows()).toMatchObject([{ enabled: false, stateLabel: 'Disabled', queued: 0, givenUp: 1, countLabels: { givenUp: '1 given up' } }]);
    expect(await disableWebhookEndpointFor({ db: db(), viewer: operator, id: 999_999, nowMs: NOW })).toBeUndefined();
  });

  it('shows a crew member or an owner nothing of the endpoints, and refuses their writes', async () => {
    const added = await insertWebhookEndpoint({ db: db(), url: 'https://hooks.example.org/secret-path', siteId: windSite.id, minSeverity: 'alarm', createdBy: 'cli' });
    if (!added.ok) throw new Error('not added');
    for (const viewer of [crew, owner, { ...operator, via: 'display' as const }]) {
      const screen = await readWebhooksScreen({ db: db(), viewer });
      expect(screen).toEqual({ editable: false });
      await expect(addWebhookEndpoint({ db: db(), viewer, form: { url: 'https://x.example.org/', siteId: '', minSeverity: 'alarm' } })).rejects.toMatchObject({ code: 'forbidden:setup' });
      await expect(disableWebhookEndpointFor({ db: db(), viewer, id: added.endpoint.id, nowMs: NOW })).rejects.toMatchObject({ code: 'forbidden:setup' });
    }
    expect(await rows()).toMatchObject([{ enabled: true }]);
  });
});
