/**
 * The webhook delivery loop against real HTTP endpoints on 127.0.0.1: a
 * refused message is retried with the same webhook-id until it gets through,
 * every attempt recorded with its status; a hanging endpoint holds up neither
 * another endpoint's messages nor the loop; an unanswered attempt ends at the
 * timeout; the waits double up to their cap and the message is given up at
 * the deadline (a fake clock); a failing delivery is logged once. The
 * outside reference is the Standard Webhooks specification (same webhook-id
 * on every retry, webhook-timestamp the attempt's time), with the
 * `standardwebhooks` npm library verifying what arrives.
 */
import { eq } from 'drizzle-orm';
import { Webhook } from 'standardwebhooks';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { webhookAttempts, webhookDeliveries } from '@/db/schema';
import { WEBHOOK_GIVE_UP_AFTER_MS, startWebhookDelivery, type WebhookDelivery, type WebhookDeliveryOptions } from '@/lib/alerts/webhooks/deliver';
import { enqueueWebhookMessages, insertWebhookEndpoint } from '@/lib/alerts/webhooks/queries';
import { testFleet, testLogger, testTag, waitFor } from '@/test/support/ingest';
import { startEndpoint, testAlert, webhookTestDatabase, type Answer, type TestEndpoint } from './webhook-endpoint';

const fleet = testFleet(testTag(), { windUnits: 1, hydroUnits: 0 });
const unit = fleet.units[0]!;
const db = webhookTestDatabase(fleet);
let endpoints: TestEndpoint[] = [];
let loops: WebhookDelivery[] = [];
let logLines: string[] = [];

beforeEach(() => {
  logLines = [];
});
afterEach(async () => {
  for (const loop of loops) await loop.stop();
  for (const e of endpoints) await e.close();
  loops = [];
  endpoints = [];
});

async function endpointAnswering(answer: Answer): Promise<{ endpoint: TestEndpoint; secret: string; id: number }> {
  const endpoint = await startEndpoint(answer);
  endpoints.push(endpoint);
  const r = await insertWebhookEndpoint({ db: db(), url: endpoint.url, minSeverity: 'info', createdBy: 'tester@example.org' });
  if (!r.ok) throw new Error(JSON.stringify(r.fieldErrors));
  return { endpoint, secret: r.secret, id: r.endpoint.id };
}

function start(options: Partial<WebhookDeliveryOptions> = {}): WebhookDelivery {
  const loop = startWebhookDelivery({ db: db(), log: testLogger('webhooks', logLines), pollMs: 20, ...options });
  loops.push(loop);
  return loop;
}

const alert = (id = '1') => testAlert({ siteId: unit.siteId, unitId: unit.id, severity: 'alarm', id });
const enqueue = (nowMs = Date.now(), id = '1') => enqueueWebhookMessages({ db: db(), type: 'alert.opened', alert: alert(id), nowMs });
const deliveryOf = async (messageId: string, endpointId: number) =>
  (await db().select().from(webhookDeliveries).where(eq(webhookDeliveries.messageId, messageId))).find((d) => d.endpointId === endpointId)!;
const attemptsOf = (deliveryId: number) => db().select().from(webhookAttempts).where(eq(webhookAttempts.deliveryId, deliveryId)).orderBy(webhookAttempts.id);
const logged = (level: string) => logLines.map((l) => JSON.parse(l) as Record<string, unknown>).filter((l) => l.level === level);

describe('webhook delivery', () => {
  it('retries a refused message with the same webhook-id until it gets through, each attempt recorded', { timeout: 60_000 }, async () => {
    const { endpoint, secret, id } = await endpointAnswering((n) => [500, 503, 200][n] ?? 200);
    const { messageId } = await enqueue();
    start({ retry: { firstMs: 60, maxMs: 120, giveUpAfterMs: 60_000 } });
    await waitFor('the third attempt delivered', async () => (await deliveryOf(messageId, id)).deliveredAt !== null, { timeoutMs: 20_000 });
    // Standard Webhooks: the same webhook-id on every retry.
    expect(endpoint.ids()).toEqual([messageId, messageId, messageId]);
    const delivery = await deliveryOf(messageId, id);
    for (const r of endpoint.received) {
      expect(r.body).toBe(delivery.body);
      // Reference library: each attempt's signature (with its own timestamp) verifies.
      expect(new Webhook(secret).verify(r.body, r.headers as Record<string, string>)).toEqual(JSON.parse(delivery.body));
      expect(r.headers['content-type']).toBe('application/json');
    }
    // The waits double: 60 ms, then 120 ms (timers may fire a little early on some systems: 10 ms of slack).
    const [a, b, c] = endpoint.received.map((r) => r.atMs) as [number, number, number];
    expect(b - a).toBeGreaterThanOrEqual(50);
    expect(c - b).toBeGreaterThanOrEqual(110);
    expect(delivery).toMatchObject({ attempts: 3, lastStatus: 200, lastError: null, givenUpAt: null, nextAttemptAt: null });
    const attempts = await attemptsOf(delivery.id);
    expect(attempts.map((t) => [t.status, t.error])).toEqual([
      [500, 'HTTP 500: refused 0'],
      [503, 'HTTP 503: refused 1'],
      [200, null],
    ]);
    expect(attempts.every((t) => t.durationMs >= 0 && t.durationMs < 5_000)).toBe(true);
    // Logged once when it first failed (with its status), once when it got through; not on every retry.
    expect(logged('warn').map((l) => [l.messageId, l.status, l.attempt])).toEqual([[messageId, 500, 1]]);
    expect(logged('info').map((l) => [l.msg, l.attempt])).toEqual([['webhook delivered after failed attempts', 3]]);
  });

  it('delivers to a healthy endpoint within a second while another hangs, and stops cleanly', { timeout: 60_000 }, async () => {
    const hanging = await endpointAnswering(() => 'hang');
    const healthy = await endpointAnswering(() => 204);
    const messages = [];
    for (let i = 0; i < 4; i++) messages.push((await enqueue(Date.now(), String(i))).messageId);
    const t0 = performance.now();
    const loop = start();
    await waitFor('the healthy endpoint’s four messages', () => healthy.endpoint.received.length === 4, { timeoutMs: 25_000 });
    const lastArrivalMs = Math.max(...healthy.endpoint.received.map((r) => r.atMs)) - t0;
    // Well before the hanging endpoint's 10 s timeout: the healthy one never waited for it (a loaded CI machine gets room).
    expect(lastArrivalMs).toBeLessThan(5_000);
    expect(healthy.endpoint.ids().sort()).toEqual([...messages].sort());
    for (const m of messages) expect((await deliveryOf(m, healthy.id)).deliveredAt).not.toBeNull();
    // The hanging one holds at most two attempts at once (the per-endpoint bound), still waiting for an answer.
    expect(hanging.endpoint.received.length).toBe(2);
    const stoppedAt = performance.now();
    await loop.stop();
    // Stopping does not wait out the hanging attempt's 10 s timeout.
    expect(performance.now() - stoppedAt).toBeLessThan(5_000);
    // Cut short by the stop: recorded, and due again at once (not given up, no backoff).
    const cut = await Promise.all(messages.map((m) => deliveryOf(m, hanging.id)));
    const tried = cut.filter((d) => d.attempts === 1);
    expect(tried).toHaveLength(2);
    for (const d of cut) {
      expect(d.deliveredAt).toBeNull();
      expect(d.givenUpAt).toBeNull();
      expect(d.nextAttemptAt!.getTime()).toBeLessThanOrEqual(Date.now());
    }
    expect(tried.map((d) => d.lastError)).toEqual(['cut short: the process stopped', 'cut short: the process stopped']);
  });

  it('ends an unanswered attempt at the timeout and schedules the next', { timeout: 60_000 }, async () => {
    const { id } = await endpointAnswering(() => 'hang');
    const { messageId } = await enqueue();
    const before = Date.now();
    start({ timeoutMs: 300 });
    await waitFor('the timed-out attempt recorded', async () => (await deliveryOf(messageId, id)).attempts === 1, { timeoutMs: 25_000 });
    const delivery = await deliveryOf(messageId, id);
    const [attempt] = await attemptsOf(delivery.id);
    expect(attempt).toMatchObject({ status: null, error: 'no answer within 0.3 s' });
    expect(attempt!.durationMs).toBeGreaterThanOrEqual(280);
    // The first retry 5 s after the attempt (Standard Webhooks leaves the schedule to the sender; ours doubles from 5 s).
    expect(delivery.nextAttemptAt!.getTime() - before).toBeGreaterThanOrEqual(5_000);
    expect(delivery.nextAttemptAt!.getTime() - Date.now()).toBeLessThanOrEqual(5_000);
    expect(logged('warn')).toHaveLength(1);
    expect(logged('warn')[0]).toMatchObject({ messageId, status: null, error: 'no answer within 0.3 s' });
  });

  it('records a refused connection in words, and does not follow a redirect', { timeout: 60_000 }, async () => {
    const moved = await endpointAnswering(() => 307);
    const gone = await endpointAnswering(() => 200);
    await gone.endpoint.close();
    const { messageId } = await enqueue();
    start();
    await waitFor('both attempts recorded', async () => (await deliveryOf(messageId, moved.id)).attempts === 1 && (await deliveryOf(messageId, gone.id)).attempts === 1, { timeoutMs: 25_000 });
    expect(await deliveryOf(messageId, moved.id)).toMatchObject({ lastStatus: 307, deliveredAt: null });
    expect(await deliveryOf(messageId, gone.id)).toMatchObject({ lastStatus: null, lastError: 'connection refused', deliveredAt: null });
  });

  it('waits 5 s, 10 s, 20 s … at most 10 min between attempts and gives up 24 h after queueing (fake clock)', { timeout: 240_000 }, async () => {
    const t0 = Date.parse('2026-03-01T10:00:00Z');
    let clock = t0;
    const { endpoint, id } = await endpointAnswering(() => 503);
    const { messageId } = await enqueue(t0);
    start({ now: () => clock });
    const waits: number[] = [];
    const attemptDone = async (n: number) => waitFor(`attempt ${n}`, async () => (await deliveryOf(messageId, id)).attempts === n, { timeoutMs: 25_000 });
    for (let n = 1; n <= 9; n++) {
      await attemptDone(n);
      const next = (await deliveryOf(messageId, id)).nextAttemptAt!.getTime();
      waits.push(next - clock);
      clock = next;
    }
    expect(waits).toEqual([5_000, 10_000, 20_000, 40_000, 80_000, 160_000, 320_000, 600_000, 600_000]);
    // Standard Webhooks: webhook-timestamp is the attempt's time (here the fake clock's).
    expect(endpoint.received.at(-1)!.headers['webhook-timestamp']).toBe(String(Math.floor((clock - 600_000) / 1000)));
    // Near the deadline the last wait is cut to it; at the deadline the message is given up.
    clock = t0 + WEBHOOK_GIVE_UP_AFTER_MS - 60_000;
    await attemptDone(10);
    expect((await deliveryOf(messageId, id)).nextAttemptAt!.getTime()).toBe(t0 + WEBHOOK_GIVE_UP_AFTER_MS);
    clock = t0 + WEBHOOK_GIVE_UP_AFTER_MS;
    await attemptDone(11);
    const givenUp = await deliveryOf(messageId, id);
    expect(givenUp).toMatchObject({ attempts: 11, lastStatus: 503, deliveredAt: null, nextAttemptAt: null });
    expect(givenUp.givenUpAt?.getTime()).toBe(t0 + WEBHOOK_GIVE_UP_AFTER_MS);
    // No more attempts after it is given up, however long the clock runs.
    clock += 3_600_000;
    await new Promise((resolve) => setTimeout(resolve, 200));
    expect(endpoint.received).toHaveLength(11);
    expect(logged('warn')).toHaveLength(1);
    expect(logged('error').map((l) => [l.msg, l.messageId, l.status, l.attempt])).toEqual([['webhook given up: the endpoint did not accept it in time', messageId, 503, 11]]);
  });

  it('refuses a poll interval that is not above zero, naming it', () => {
    expect(() => startWebhookDelivery({ db: db(), log: testLogger('webhooks'), pollMs: 0 })).toThrow(new RangeError('pollMs: expected milliseconds above 0, got 0'));
  });
});
