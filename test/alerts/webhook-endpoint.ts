/**
 * For the webhook tests: a receiving endpoint on 127.0.0.1 (node:http, a
 * free port) that answers as the test says, or never; an alert object of
 * contract section 7; and a database with a fleet whose webhook tables are
 * emptied before each test.
 */
import { createServer, type IncomingHttpHeaders } from 'node:http';
import { afterAll, beforeAll, beforeEach } from 'vitest';
import type { Db } from '@/db/client';
import { webhookAttempts, webhookDeliveries, webhookEndpoints } from '@/db/schema';
import type { AlertObject } from '@/lib/contract/alerts';
import type { Fleet } from '@/lib/contract/nameplate';
import { createTestDatabase, type TestDatabase } from '@/test/support/backend';
import { registerFleet } from '@/test/support/ingest';

export interface Received {
  readonly headers: IncomingHttpHeaders;
  readonly body: string;
  /** performance.now() when the body had arrived. */
  readonly atMs: number;
}

/** What the endpoint does with its n-th request (0 first): answer with a status, or hang until closed. */
export type Answer = (n: number) => number | 'hang';

export interface TestEndpoint {
  readonly url: string;
  readonly received: Received[];
  /** The `webhook-id` header of each request, in order. */
  ids(): string[];
  close(): Promise<void>;
}

/** An endpoint on a free port; `delayMs` holds each answer back that long. */
export async function startEndpoint(answer: Answer, { path = '/hook', delayMs = 0 } = {}): Promise<TestEndpoint> {
  const received: Received[] = [];
  const server = createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on('data', (c: Buffer) => chunks.push(c));
    req.on('end', () => {
      const n = received.length;
      received.push({ headers: req.headers, body: Buffer.concat(chunks).toString('utf8'), atMs: performance.now() });
      const what = answer(n);
      if (what === 'hang') return;
      const reply = () => res.writeHead(what, { 'content-type': 'text/plain' }).end(what >= 300 ? `refused ${n}` : 'ok');
      if (delayMs > 0) setTimeout(reply, delayMs);
      else reply();
    });
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as { port: number };
  return {
    url: `http://127.0.0.1:${port}${path}`,
    received,
    ids: () => received.map((r) => String(r.headers['webhook-id'])),
    close: () =>
      new Promise<void>((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}

/** An alert of one unit, as the alert lifecycle hands it to the webhooks. */
export function testAlert({ siteId, unitId, severity, id = '1' }: { siteId: string; unitId: string; severity: AlertObject['severity']; id?: string }): AlertObject {
  return {
    id,
    siteId,
    unitId,
    condition: 'overspeed',
    severity,
    state: 'active',
    openedAt: '2026-03-01T10:00:00.000Z',
    changedAt: '2026-03-01T10:00:00.000Z',
    message: 'Speed 470 rpm, above the limit of 420 rpm',
    value: 470,
    limit: 420,
    acknowledgedAt: null,
    acknowledgedBy: null,
    clearedAt: null,
    shelvedUntil: null,
    url: `/sites/${siteId}/units/${unitId}`,
  };
}

/** A fresh database of this run's backend with `fleet` registered, for the file; no endpoint or message left from the test before. */
export function webhookTestDatabase(fleet: Fleet): () => Db {
  let test: TestDatabase | undefined;
  beforeAll(async () => {
    test = await createTestDatabase();
    await registerFleet(test.handle, fleet);
  }, 60_000);
  afterAll(async () => {
    await test?.drop();
  });
  beforeEach(async () => {
    await test!.handle.db.delete(webhookAttempts);
    await test!.handle.db.delete(webhookDeliveries);
    await test!.handle.db.delete(webhookEndpoints);
  });
  return () => test!.handle.db;
}
