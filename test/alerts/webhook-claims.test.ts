/**
 * Two processes delivering from one PostgreSQL queue never send the same
 * message twice at once: each claims due messages with FOR UPDATE SKIP
 * LOCKED and leases them. Two delivery loops on two connection pools race for
 * forty messages; the endpoint must receive each webhook-id exactly once
 * (Standard Webhooks: a repeat is for a retry, not for a second sender).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDatabase, type DatabaseHandle } from '@/db/client';
import { webhookAttempts, webhookDeliveries } from '@/db/schema';
import { startWebhookDelivery, type WebhookDelivery } from '@/lib/alerts/webhooks/deliver';
import { enqueueWebhookMessages, insertWebhookEndpoint } from '@/lib/alerts/webhooks/queries';
import { createPostgresDatabase } from '@/test/support/backend';
import { adminDatabaseUrl, registerFleet, testFleet, testLogger, testTag, waitFor } from '@/test/support/ingest';
import { postgresServer, skipUnless } from '@/test/support/services';
import { startEndpoint, testAlert, type TestEndpoint } from './webhook-endpoint';

const MESSAGES = 40;

// Needs a real PostgreSQL: two pools racing for row locks (PGlite is one connection in one process).
describe.skipIf(skipUnless(postgresServer, 'two webhook senders on one queue'))('two webhook delivery loops on one queue', { timeout: 60_000 }, () => {
  let database: { url: string; drop(): Promise<void> };
  let handles: DatabaseHandle[] = [];
  let loops: WebhookDelivery[] = [];
  let endpoint: TestEndpoint;

  beforeAll(async () => {
    database = await createPostgresDatabase(adminDatabaseUrl(), 'millrace_webhook_claims');
    handles = [await openDatabase({ url: database.url, maxConnections: 4 }), await openDatabase({ url: database.url, maxConnections: 4, migrate: false })];
    const fleet = testFleet(testTag(), { windUnits: 1, hydroUnits: 0 });
    await registerFleet(handles[0]!, fleet);
    // A little slow to answer, so both loops have claims in flight together.
    endpoint = await startEndpoint(() => 200, { delayMs: 30 });
    const added = await insertWebhookEndpoint({ db: handles[0]!.db, url: endpoint.url, minSeverity: 'info', createdBy: 'tester@example.org' });
    expect(added.ok).toBe(true);
    const unit = fleet.units[0]!;
    for (let i = 0; i < MESSAGES; i++) {
      await enqueueWebhookMessages({ db: handles[0]!.db, type: 'alert.opened', alert: testAlert({ siteId: unit.siteId, unitId: unit.id, severity: 'alarm', id: String(i) }), nowMs: Date.now() });
    }
  });

  afterAll(async () => {
    for (const loop of loops) await loop.stop();
    await endpoint?.close();
    for (const h of handles) await h.close();
    await database?.drop();
  });

  it('sends each message once', async () => {
    // Many slots per endpoint, so that only the claim keeps the two apart.
    loops = handles.map((h, i) => startWebhookDelivery({ db: h.db, log: testLogger(`webhooks-${i}`), pollMs: 5, perEndpoint: 8 }));
    await waitFor('every message delivered', async () => (await handles[0]!.db.select().from(webhookDeliveries)).every((d) => d.deliveredAt !== null), { timeoutMs: 30_000 });
    const ids = endpoint.ids();
    expect(ids).toHaveLength(MESSAGES);
    expect(new Set(ids).size).toBe(MESSAGES);
    expect(await handles[0]!.db.select().from(webhookAttempts)).toHaveLength(MESSAGES);
    const deliveries = await handles[0]!.db.select().from(webhookDeliveries);
    expect(deliveries.every((d) => d.attempts === 1 && d.lastStatus === 200)).toBe(true);
  });
});
