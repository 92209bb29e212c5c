/**
 * Webhook endpoints and the queue (contract section 7): adding one (http(s)
 * only, an unknown site refused by name, the secret returned once and never
 * listed), which endpoints a change of an alert reaches (its site or every
 * site; severity info < warning < alarm), the message's body, and that the
 * messages commit with the alert's change or not at all.
 */
import { eq } from 'drizzle-orm';
import { Webhook } from 'standardwebhooks';
import { describe, expect, it } from 'vitest';
import { auditLog, webhookDeliveries, webhookEndpoints } from '@/db/schema';
import { disableWebhookEndpoint, enqueueWebhookMessages, insertWebhookEndpoint, listWebhookEndpoints } from '@/lib/alerts/webhooks/queries';
import { webhookHeaders } from '@/lib/alerts/webhooks/sign';
import { WEBHOOK_TYPES } from '@/lib/contract/alerts';
import { testFleet, testTag } from '@/test/support/ingest';
import { testAlert, webhookTestDatabase } from './webhook-endpoint';

const fleet = testFleet(testTag(), { windUnits: 1, hydroUnits: 1 });
const [wind, hydro] = fleet.units as [(typeof fleet.units)[0], (typeof fleet.units)[0]];
const db = webhookTestDatabase(fleet);
const NOW = Date.parse('2026-03-01T10:00:00Z');

async function added(url: string, siteId: string | null, minSeverity: string): Promise<number> {
  const r = await insertWebhookEndpoint({ db: db(), url, siteId, minSeverity, createdBy: 'tester@example.org' });
  if (!r.ok) throw new Error(JSON.stringify(r.fieldErrors));
  return r.endpoint.id;
}

describe('adding an endpoint', () => {
  it('returns a secret of the contract’s form once, and lists the endpoint without it', async () => {
    const r = await insertWebhookEndpoint({ db: db(), url: 'https://hooks.example.org/millrace?k=1', siteId: wind.siteId, minSeverity: 'alarm', createdBy: 'tester@example.org' });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    // Contract section 7: whsec_ then base64 of 24 to 64 bytes; the reference library accepts it.
    expect(r.secret).toMatch(/^whsec_[A-Za-z0-9+/]{43}=$/);
    expect(() => new Webhook(r.secret)).not.toThrow();
    expect(r.endpoint).not.toHaveProperty('secret');
    const listed = await listWebhookEndpoints({ db: db() });
    expect(listed).toEqual([{ ...r.endpoint, pending: 0, delivered: 0, givenUp: 0 }]);
    expect(JSON.stringify(listed)).not.toContain(r.secret.slice(6));
    expect(listed[0]).toMatchObject({ url: 'https://hooks.example.org/millrace?k=1', siteId: wind.siteId, minSeverity: 'alarm', enabled: true, createdBy: 'tester@example.org' });
    // The audit log has the address without its query (it may carry a key), and never the secret.
    const [audit] = await db().select().from(auditLog).where(eq(auditLog.action, 'webhook-endpoint-added'));
    expect(audit?.detail).toEqual({ url: 'https://hooks.example.org/millrace', siteId: wind.siteId, minSeverity: 'alarm' });
    expect(JSON.stringify(audit)).not.toContain(r.secret.slice(6));
  });

  it('defaults to every site and warning and above', async () => {
    const r = await insertWebhookEndpoint({ db: db(), url: 'http://127.0.0.1:8080/in', createdBy: 'tester@example.org' });
    expect(r.ok && r.endpoint).toMatchObject({ siteId: null, minSeverity: 'warning' });
  });

  it.each([
    ['an ftp address', { url: 'ftp://files.example.org/x' }, 'url', /must be an http:\/\/ or https:\/\/ address, got "ftp:\/\/files.example.org\/x"/],
    ['a javascript: address', { url: 'javascript:alert(1)' }, 'url', /http:\/\/ or https:\/\//],
    ['no address at all', { url: '' }, 'url', /http:\/\/ or https:\/\//],
    ['an unknown site', { siteId: 'no-such-site' }, 'siteId', /^no site "no-such-site": add the site first/],
    ['a malformed site id', { siteId: 'Not A Slug' }, 'siteId', /must be a site id/],
    ['an unknown severity', { minSeverity: 'loud' }, 'minSeverity', /must be info, warning or alarm, got "loud"/],
  ])('refuses %s, naming the field', async (_what, change, field, words) => {
    const r = await insertWebhookEndpoint({ db: db(), url: 'https://hooks.example.org/a', createdBy: 'tester@example.org', ...change });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(Object.keys(r.fieldErrors)).toEqual([field]);
    expect(r.fieldErrors[field as keyof typeof r.fieldErrors]).toMatch(words);
    expect(await listWebhookEndpoints({ db: db() })).toEqual([]);
  });
});

describe('which endpoints a change reaches', () => {
  it('matches the alert’s site or every site, and severity info < warning < alarm (contract section 7)', async () => {
    const everyInfo = await added('http://127.0.0.1:1/every-info', null, 'info');
    const everyAlarm = await added('http://127.0.0.1:1/every-alarm', null, 'alarm');
    const windWarning = await added('http://127.0.0.1:1/wind-warning', wind.siteId, 'warning');
    const hydroInfo = await added('http://127.0.0.1:1/hydro-info', hydro.siteId, 'info');
    const windOff = await added('http://127.0.0.1:1/wind-off', wind.siteId, 'info');
    await disableWebhookEndpoint({ db: db(), id: windOff, by: 'tester@example.org' });
    const reach = async (siteId: string, unitId: string, severity: 'info' | 'warning' | 'alarm') =>
      (await enqueueWebhookMessages({ db: db(), type: 'alert.opened', alert: testAlert({ siteId, unitId, severity }), nowMs: NOW })).endpointIds.sort((a, b) => a - b);
    expect(await reach(wind.siteId, wind.id, 'info')).toEqual([everyInfo]);
    expect(await reach(wind.siteId, wind.id, 'warning')).toEqual([everyInfo, windWarning]);
    expect(await reach(wind.siteId, wind.id, 'alarm')).toEqual([everyInfo, everyAlarm, windWarning]);
    expect(await reach(hydro.siteId, hydro.id, 'info')).toEqual([everyInfo, hydroInfo]);
    expect(await reach(hydro.siteId, hydro.id, 'warning')).toEqual([everyInfo, hydroInfo]);
    expect(await reach(hydro.siteId, hydro.id, 'alarm')).toEqual([everyInfo, everyAlarm, hydroInfo]);
  });

  it('queues one message per endpoint under one id, due now, its body the contract’s JSON text', async () => {
    const a = await added('http://127.0.0.1:1/a', null, 'info');
    const b = await added('http://127.0.0.1:1/b', wind.siteId, 'info');
    const alert = testAlert({ siteId: wind.siteId, unitId: wind.id, severity: 'alarm' });
    const { messageId, endpointIds } = await enqueueWebhookMessages({ db: db(), type: 'alert.acknowledged', alert, severity: 'alarm', siteId: wind.siteId, nowMs: NOW });
    expect(endpointIds.sort()).toEqual([a, b].sort());
    // Standard Webhooks: the id names the message, kept across retries.
    expect(messageId).toMatch(/^msg_[A-Za-z0-9_-]{22}$/);
    const rows = await db().select().from(webhookDeliveries).orderBy(webhookDeliveries.endpointId);
    expect(rows.map((r) => [r.endpointId, r.messageId, r.type, r.attempts])).toEqual([
      [a, messageId, 'alert.acknowledged', 0],
      [b, messageId, 'alert.acknowledged', 0],
    ]);
    expect(rows.every((r) => r.nextAttemptAt?.getTime() === NOW && r.createdAt.getTime() === NOW && r.deliveredAt === null && r.givenUpAt === null)).toBe(true);
    // Contract section 7: { "type", "timestamp", "data": alert }, the timestamp in ISO 8601.
    expect(rows[0]!.body).toBe(JSON.stringify({ type: 'alert.acknowledged', timestamp: '2026-03-01T10:00:00.000Z', data: alert }));
    expect(JSON.parse(rows[0]!.body)).toEqual({ type: 'alert.acknowledged', timestamp: '2026-03-01T10:00:00.000Z', data: alert });
    expect((await listWebhookEndpoints({ db: db() })).map((e) => e.pending)).toEqual([1, 1]);
  });

  it('commits the messages with the alert’s change, or not at all', async () => {
    await added('http://127.0.0.1:1/a', null, 'info');
    const alert = testAlert({ siteId: wind.siteId, unitId: wind.id, severity: 'alarm' });
    await expect(
      db().transaction(async (tx) => {
        await enqueueWebhookMessages({ db: tx, type: 'alert.opened', alert, nowMs: NOW });
        throw new Error('the alert change failed');
      }),
    ).rejects.toThrow('the alert change failed');
    expect(await db().select().from(webhookDeliveries)).toEqual([]);
    await db().transaction(async (tx) => {
      await enqueueWebhookMessages({ db: tx, type: 'alert.opened', alert, nowMs: NOW });
    });
    expect(await db().select().from(webhookDeliveries)).toHaveLength(1);
  });

  it('refuses a type the contract does not name, and a severity or site other than the alert’s', async () => {
    const alert = testAlert({ siteId: wind.siteId, unitId: wind.id, severity: 'warning' });
    const call = (change: object) => enqueueWebhookMessages({ db: db(), type: 'alert.opened', alert, nowMs: NOW, ...change } as Parameters<typeof enqueueWebhookMessages>[0]);
    await expect(call({ type: 'alert.escalated' })).rejects.toThrow(new RangeError(`type: expected one of ${WEBHOOK_TYPES.join(', ')}, got "alert.escalated"`));
    await expect(call({ severity: 'alarm' })).rejects.toThrow(/^severity: alarm differs from the alert's own \(warning\)$/);
    await expect(call({ siteId: hydro.siteId })).rejects.toThrow(/^siteId: /);
    await expect(call({ nowMs: Number.NaN })).rejects.toThrow(/^nowMs: /);
  });

  it('queues nothing when no endpoint matches, and says so', async () => {
    const r = await enqueueWebhookMessages({ db: db(), type: 'alert.cleared', alert: testAlert({ siteId: wind.siteId, unitId: wind.id, severity: 'alarm' }), nowMs: NOW });
    expect(r.endpointIds).toEqual([]);
    expect(await db().select().from(webhookDeliveries)).toEqual([]);
  });
});

describe('disabling an endpoint', () => {
  it('gives up what it had not received, with the reason, and stops queueing for it', async () => {
    const id = await added('http://127.0.0.1:1/a', null, 'info');
    const alert = testAlert({ siteId: wind.siteId, unitId: wind.id, severity: 'alarm' });
    await enqueueWebhookMessages({ db: db(), type: 'alert.opened', alert, nowMs: NOW });
    await enqueueWebhookMessages({ db: db(), type: 'alert.acknowledged', alert, nowMs: NOW + 1000 });
    const r = await disableWebhookEndpoint({ db: db(), id, by: 'tester@example.org', nowMs: NOW + 2000 });
    expect(r).toMatchObject({ givenUp: 2, endpoint: { id, enabled: false } });
    const rows = await db().select().from(webhookDeliveries);
    expect(rows.map((d) => [d.givenUpAt?.getTime(), d.nextAttemptAt, d.lastError])).toEqual([
      [NOW + 2000, null, 'endpoint disabled by tester@example.org'],
      [NOW + 2000, null, 'endpoint disabled by tester@example.org'],
    ]);
    expect(await listWebhookEndpoints({ db: db() })).toMatchObject([{ id, enabled: false, pending: 0, givenUp: 2 }]);
    expect((await enqueueWebhookMessages({ db: db(), type: 'alert.cleared', alert, nowMs: NOW + 3000 })).endpointIds).toEqual([]);
    expect(await disableWebhookEndpoint({ db: db(), id: id + 1000, by: 'tester@example.org' })).toBeUndefined();
  });

  it('keeps the secret it signs with in the row (headers made from it verify)', async () => {
    const r = await insertWebhookEndpoint({ db: db(), url: 'http://127.0.0.1:1/a', createdBy: 'tester@example.org' });
    if (!r.ok) throw new Error('not added');
    const [row] = await db().select().from(webhookEndpoints).where(eq(webhookEndpoints.id, r.endpoint.id));
    expect(row?.secret).toBe(r.secret);
    const body = '{"type":"alert.opened"}';
    // Reference library: a signature made with the stored secret verifies with the one shown.
    const headers = webhookHeaders({ secret: row!.secret, id: 'msg_x', timestampS: Math.floor(Date.now() / 1000), body });
    expect(new Webhook(r.secret).verify(body, headers)).toEqual({ type: 'alert.opened' });
  });
});
