/**
 * Webhook endpoints and the queue of messages to them (contract section 7).
 * A change of an alert's state enqueues one message per matching endpoint in
 * the same transaction as the change; lib/alerts/webhooks/deliver.ts sends
 * them, outside the ingest path.
 */
import { randomBytes } from 'node:crypto';
import { and, asc, eq, inArray, isNull, or, sql, type SQL } from 'drizzle-orm';
import { z } from 'zod';
import type { Db } from '@/db/client';
import { SEVERITIES, sites, webhookDeliveries, webhookEndpoints, type Severity } from '@/db/schema';
import { writeAudit } from '@/lib/auth/audit';
import { SLUG } from '@/lib/contract/nameplate';
import { WEBHOOK_TYPES, type AlertObject, type WebhookType } from '@/lib/contract/alerts';
import { newWebhookSecret } from './sign';

/** An endpoint as people see it: everything but the secret. */
export interface WebhookEndpointView {
  readonly id: number;
  readonly url: string;
  /** Only this site's alerts; null for every site. */
  readonly siteId: string | null;
  readonly minSeverity: Severity;
  readonly enabled: boolean;
  readonly createdAt: Date;
  readonly createdBy: string;
}

/** An endpoint with what its queue holds. */
export interface WebhookEndpointSummary extends WebhookEndpointView {
  /** Messages still to send (due or waiting for a retry). */
  readonly pending: number;
  readonly delivered: number;
  readonly givenUp: number;
}

const endpointInput = z.object({
  url: z
    .string({ error: 'expected the address the messages are posted to' })
    .trim()
    .max(2000, { error: 'must be at most 2,000 characters' })
    .pipe(z.url({ protocol: /^https?$/, error: (i) => `must be an http:// or https:// address, got ${JSON.stringify(i.input)}` })),
  siteId: z
    .string()
    .trim()
    .regex(SLUG, { error: (i) => `must be a site id (1 to 64 of a-z, 0-9 and -), got ${JSON.stringify(i.input)}` })
    .nullable(),
  minSeverity: z.enum(SEVERITIES, { error: (i) => `must be info, warning or alarm, got ${JSON.stringify(i.input)}` }),
  createdBy: z.string().trim().min(1, { error: 'must name who adds the endpoint' }).max(320),
});

const VIEW_COLUMNS = {
  id: webhookEndpoints.id,
  url: webhookEndpoints.url,
  siteId: webhookEndpoints.siteId,
  minSeverity: webhookEndpoints.minSeverity,
  enabled: webhookEndpoints.enabled,
  createdAt: webhookEndpoints.createdAt,
  createdBy: webhookEndpoints.createdBy,
};

/** The address without credentials, query or fragment: fit for a log line or the audit log. */
export function endpointLabel(url: string): string {
  try {
    const u = new URL(url);
    return `${u.origin}${u.pathname}`;
  } catch {
    return '(unparsable address)';
  }
}

export type InsertWebhookEndpointResult =
  | { ok: true; endpoint: WebhookEndpointView; secret: string }
  | { ok: false; fieldErrors: Partial<Record<'url' | 'siteId' | 'minSeverity' | 'createdBy', string>> };

/**
 * Adds an endpoint with a new secret. The secret is returned here only; show
 * it once. Problems come back by field (an unknown site named).
 */
export async function insertWebhookEndpoint({
  db,
  url,
  siteId = null,
  minSeverity = 'warning',
  createdBy,
}: {
  db: Db;
  url: string;
  siteId?: string | null;
  minSeverity?: string;
  createdBy: string;
}): Promise<InsertWebhookEndpointResult> {
  const parsed = endpointInput.safeParse({ url, siteId, minSeverity, createdBy });
  if (!parsed.success) {
    const fieldErrors: Record<string, string> = {};
    for (const issue of parsed.error.issues) fieldErrors[String(issue.path[0] ?? 'url')] ??= issue.message;
    return { ok: false, fieldErrors };
  }
  const input = parsed.data;
  if (input.siteId !== null) {
    const [site] = await db.select({ id: sites.id }).from(sites).where(eq(sites.id, input.siteId)).limit(1);
    if (!site) return { ok: false, fieldErrors: { siteId: `no site "${input.siteId}": add the site first, or leave the site out for every site` } };
  }
  const secret = newWebhookSecret();
  const [row] = await db.insert(webhookEndpoints).values({ ...input, secret }).returning(VIEW_COLUMNS);
  await writeAudit({
    db,
    actor: { label: input.createdBy },
    action: 'webhook-endpoint-added',
    target: `webhook ${row!.id}`,
    detail: { url: endpointLabel(input.url), siteId: input.siteId, minSeverity: input.minSeverity },
  });
  return { ok: true, endpoint: row!, secret };
}

/** Every endpoint, oldest first, with the counts of its queue (never the secret). */
export async function listWebhookEndpoints({ db }: { db: Db }): Promise<WebhookEndpointSummary[]> {
  const d = webhookDeliveries;
  const counted = (where: SQL) => sql<number>`count(${d.id}) filter (where ${where})`.mapWith(Number);
  return db
    .select({
      ...VIEW_COLUMNS,
      pending: counted(sql`${d.deliveredAt} is null and ${d.givenUpAt} is null`),
      delivered: counted(sql`${d.deliveredAt} is not null`),
      givenUp: counted(sql`${d.givenUpAt} is not null`),
    })
    .from(webhookEndpoints)
    .leftJoin(d, eq(d.endpointId, webhookEndpoints.id))
    .groupBy(webhookEndpoints.id)
    .orderBy(asc(webhookEndpoints.id));
}

/**
 * Stops sending to an endpoint. Its messages not yet delivered are given up
 * with the reason recorded, not dropped. `undefined` when there is no such endpoint.
 */
export async function disableWebhookEndpoint({
  db,
  id,
  by,
  nowMs = Date.now(),
}: {
  db: Db;
  id: number;
  /** Who disables it, for the audit log. */
  by: string;
  nowMs?: number;
}): Promise<{ endpoint: WebhookEndpointView; givenUp: number } | undefined> {
  return db.transaction(async (tx) => {
    const [row] = await tx.update(webhookEndpoints).set({ enabled: false }).where(eq(webhookEndpoints.id, id)).returning(VIEW_COLUMNS);
    if (!row) return undefined;
    const now = new Date(nowMs);
    const abandoned = await tx
      .update(webhookDeliveries)
      .set({ givenUpAt: now, nextAttemptAt: null, lastError: `endpoint disabled by ${by}` })
      .where(and(eq(webhookDeliveries.endpointId, id), isNull(webhookDeliveries.deliveredAt), isNull(webhookDeliveries.givenUpAt)))
      .returning({ id: webhookDeliveries.id });
    await writeAudit({ db: tx, actor: { label: by }, action: 'webhook-endpoint-disabled', target: `webhook ${id}`, detail: { url: endpointLabel(row.url), givenUp: abandoned.length }, at: now });
    return { endpoint: row, givenUp: abandoned.length };
  });
}

/** The severities that reach an endpoint of `min` and above (info < warning < alarm). */
function severitiesUpTo(severity: Severity): Severity[] {
  return SEVERITIES.slice(0, SEVERITIES.indexOf(severity) + 1);
}

/** A new message id: `msg_` and 16 random bytes, base64url. */
export function newWebhookMessageId(): string {
  return `msg_${randomBytes(16).toString('base64url')}`;
}

/** The exact JSON text of a message (contract section 7), which is what gets signed and sent. */
export function webhookBody({ type, alert, nowMs }: { type: WebhookType; alert: AlertObject; nowMs: number }): string {
  return JSON.stringify({ type, timestamp: new Date(nowMs).toISOString(), data: alert });
}

function checkEnqueueInput({ type, alert, severity, siteId, nowMs }: { type: string; alert: AlertObject; severity: string; siteId: string; nowMs: number }): void {
  if (!(WEBHOOK_TYPES as readonly string[]).includes(type)) throw new RangeError(`type: expected one of ${WEBHOOK_TYPES.join(', ')}, got ${JSON.stringify(type)}`);
  if (!(SEVERITIES as readonly string[]).includes(severity)) throw new RangeError(`severity: expected info, warning or alarm, got ${JSON.stringify(severity)}`);
  if (severity !== alert.severity) throw new RangeError(`severity: ${severity} differs from the alert's own (${alert.severity})`);
  if (siteId !== alert.siteId) throw new RangeError(`siteId: ${JSON.stringify(siteId)} differs from the alert's own (${JSON.stringify(alert.siteId)})`);
  if (!Number.isFinite(nowMs)) throw new RangeError(`nowMs: expected epoch milliseconds, got ${nowMs}`);
}

/**
 * Queues one message about a change of an alert for every enabled endpoint
 * of the alert's site (or of every site) whose minimum severity it meets.
 * All of them share one message id (the same message to each); each retry
 * keeps it. Pass the transaction of the alert's change as `db`, so the
 * change and its messages commit together. Then `kick()` the delivery loop.
 */
export async function enqueueWebhookMessages({
  db,
  type,
  alert,
  severity = alert.severity,
  siteId = alert.siteId,
  nowMs,
}: {
  db: Db;
  type: WebhookType;
  alert: AlertObject;
  /** The alert's severity (the default); a different one is a mistake and throws. */
  severity?: Severity;
  /** The alert's site (the default); a different one is a mistake and throws. */
  siteId?: string;
  nowMs: number;
}): Promise<{ messageId: string; endpointIds: number[] }> {
  checkEnqueueInput({ type, alert, severity, siteId, nowMs });
  const endpoints = await db
    .select({ id: webhookEndpoints.id })
    .from(webhookEndpoints)
    .where(
      and(
        eq(webhookEndpoints.enabled, true),
        or(isNull(webhookEndpoints.siteId), eq(webhookEndpoints.siteId, siteId)),
        inArray(webhookEndpoints.minSeverity, severitiesUpTo(severity)),
      ),
    )
    .orderBy(asc(webhookEndpoints.id));
  const messageId = newWebhookMessageId();
  if (endpoints.length === 0) return { messageId, endpointIds: [] };
  const now = new Date(nowMs);
  const body = webhookBody({ type, alert, nowMs });
  await db.insert(webhookDeliveries).values(endpoints.map((e) => ({ endpointId: e.id, messageId, type, body, createdAt: now, nextAttemptAt: now })));
  return { messageId, endpointIds: endpoints.map((e) => e.id) };
}
