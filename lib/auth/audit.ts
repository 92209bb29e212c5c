/**
 * The audit log: who did what, when, from where, and what changed. Written
 * for sign-ins and their failures, sign-outs, people and credential changes,
 * setup changes (sites, units, limits) and acknowledgements; read by the
 * admin screen /admin/audit, newest first.
 */
import { and, desc, eq, lt, or, type SQL } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { auditLog, type AuditRow } from '@/db/schema';
import type { Viewer } from './viewer';

/** Who did it, as the log records it. */
export interface Actor {
  personId?: number | null;
  /** An e-mail address, "command line", "local" … */
  label: string;
  ip?: string | null;
}

/** The actor of a viewer (a person, the local viewer, a display link). */
export function actorOfViewer(viewer: Viewer, ip?: string | null): Actor {
  const personId = viewer.personId ?? null;
  return { personId, label: viewer.email ?? (viewer.id === 'local' ? 'local (no accounts)' : viewer.id), ip: ip ?? viewer.ip ?? null };
}

/** Writes one entry. `detail` holds what changed (before/after, never a secret or a password). */
export async function writeAudit({
  db,
  actor,
  action,
  target,
  detail = {},
  at,
}: {
  db: Db;
  actor: Actor;
  action: string;
  target?: string | null;
  detail?: Record<string, unknown>;
  at?: Date;
}): Promise<void> {
  await db.insert(auditLog).values({
    personId: actor.personId ?? null,
    actor: actor.label.slice(0, 320),
    ip: actor.ip ?? null,
    action,
    target: target ?? null,
    detail,
    ...(at ? { at } : {}),
  });
}

/** An acknowledgement of an alert, for the alert lifecycle of a later issue. */
export function auditAcknowledgement({ db, viewer, alertId, note }: { db: Db; viewer: Viewer; alertId: number; note?: string }): Promise<void> {
  return writeAudit({ db, actor: actorOfViewer(viewer), action: 'alert-acknowledged', target: `alert ${alertId}`, detail: note ? { note } : {} });
}

export const AUDIT_PAGE_SIZE = 50;

/**
 * A page of the log, newest first, after the cursor `before` (`at` ISO + id of
 * the last row shown), filtered by person and action.
 */
export async function getAuditPage({
  db,
  personId,
  action,
  before,
  limit = AUDIT_PAGE_SIZE,
}: {
  db: Db;
  personId?: number;
  action?: string;
  before?: { at: Date; id: number };
  limit?: number;
}): Promise<{ rows: AuditRow[]; next?: { at: Date; id: number } }> {
  const where: SQL[] = [];
  if (personId !== undefined) where.push(eq(auditLog.personId, personId));
  if (action !== undefined) where.push(eq(auditLog.action, action));
  if (before) where.push(or(lt(auditLog.at, before.at), and(eq(auditLog.at, before.at), lt(auditLog.id, before.id)))!);
  const rows = await db
    .select()
    .from(auditLog)
    .where(where.length ? and(...where) : undefined)
    .orderBy(desc(auditLog.at), desc(auditLog.id))
    .limit(limit + 1);
  const page = rows.slice(0, limit);
  const last = page.at(-1);
  return { rows: page, next: rows.length > limit && last ? { at: last.at, id: last.id } : undefined };
}

/** The actions that appear in the log (for the filter). */
export const AUDIT_ACTIONS = [
  'sign-in',
  'sign-in-failed',
  'sign-out',
  'password-changed',
  'person-added',
  'person-disabled',
  'person-enabled',
  'person-changed',
  'password-reset',
  'api-token-created',
  'api-token-revoked',
  'display-link-created',
  'display-link-revoked',
  'site-added',
  'site-changed',
  'unit-added',
  'unit-changed',
  'fleet-imported',
  'alert-acknowledged',
  'alert-shelved',
] as const;
