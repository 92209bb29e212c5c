/**
 * Writing an alert's change: the row, its events and its webhook messages in
 * one transaction, from the lifecycle's step (lib/alerts/lifecycle.ts). The
 * evaluator and people's actions (acknowledge, shelve) both come through
 * here; each re-reads the row under a lock first, so two evaluators, or an
 * evaluator and a person at once, never record the same change twice.
 */
import { and, eq, inArray, isNull, sql } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { unitAlertEvents, unitAlerts, units, type UnitAlertRow } from '@/db/schema';
import type { AlertObject, WebhookType } from '@/lib/contract/alerts';
import { enqueueWebhookMessages } from '@/lib/alerts/webhooks/queries';
import type { AlertChange, AlertLife, AlertStep } from './lifecycle';

/** The lifecycle's view of a stored alert. */
export function alertLifeOf(row: UnitAlertRow): AlertLife {
  const ms = (d: Date | null) => (d === null ? null : d.getTime());
  return {
    state: row.state,
    openedAtMs: row.openedAt.getTime(),
    changedAtMs: row.changedAt.getTime(),
    goneSinceMs: ms(row.goneSince),
    acknowledgedAtMs: ms(row.acknowledgedAt),
    clearedAtMs: ms(row.clearedAt),
    shelvedUntilMs: ms(row.shelvedUntil),
    flaps: row.flaps,
    flapWindowStartMs: ms(row.flapWindowStart),
  };
}

/** The columns that hold a lifecycle state. */
export function columnsOfLife(life: AlertLife) {
  const date = (ms: number | null) => (ms === null ? null : new Date(ms));
  return {
    state: life.state,
    openedAt: new Date(life.openedAtMs),
    changedAt: new Date(life.changedAtMs),
    goneSince: date(life.goneSinceMs),
    acknowledgedAt: date(life.acknowledgedAtMs),
    clearedAt: date(life.clearedAtMs),
    shelvedUntil: date(life.shelvedUntilMs),
    flaps: life.flaps,
    flapWindowStart: date(life.flapWindowStartMs),
  };
}

/** The alert object of the API and webhooks (contract section 7); `baseUrl` makes `url` absolute when set. */
export function alertObjectOf(row: UnitAlertRow, ids: { siteId: string; unitId: string }, baseUrl = ''): AlertObject {
  const iso = (d: Date | null) => (d === null ? null : d.toISOString());
  return {
    id: String(row.id),
    siteId: ids.siteId,
    unitId: ids.unitId,
    condition: row.condition,
    severity: row.severity,
    state: row.state,
    openedAt: row.openedAt.toISOString(),
    changedAt: row.changedAt.toISOString(),
    message: row.message,
    value: row.value,
    limit: row.limitValue,
    acknowledgedAt: iso(row.acknowledgedAt),
    acknowledgedBy: row.acknowledgedBy,
    clearedAt: iso(row.clearedAt),
    shelvedUntil: iso(row.shelvedUntil),
    url: `${baseUrl.replace(/\/$/, '')}/sites/${ids.siteId}/units/${ids.unitId}`,
  };
}

/** The webhook type of a change; escalations are not announced to endpoints. */
function webhookTypeOf(change: AlertChange): WebhookType | undefined {
  return change.type === 'escalated' ? undefined : (`alert.${change.type}` as WebhookType);
}

/** Who made a change, and with what words. */
export interface ChangeActor {
  readonly label: string;
  readonly personId?: number;
  readonly note?: string;
}

/** Records the changes of a step on a locked row: events, then one webhook message per change. */
async function recordChanges(tx: Db, row: UnitAlertRow, changes: readonly AlertChange[], actor: ChangeActor, nowMs: number, baseUrl: string): Promise<void> {
  const [ids] = await tx.select({ siteId: units.siteId, unitId: units.id }).from(units).where(eq(units.key, row.unitKey));
  for (const change of changes) {
    await tx.insert(unitAlertEvents).values({
      alertId: row.id,
      at: new Date(nowMs),
      type: change.type,
      fromState: change.from,
      toState: change.to,
      actor: actor.label,
      note: actor.note ?? null,
      value: row.value,
    });
    const type = webhookTypeOf(change);
    if (type && ids) await enqueueWebhookMessages({ db: tx, type, alert: alertObjectOf(row, ids, baseUrl), nowMs });
  }
}

/** What a new alert says, from the condition's reading. */
export interface AlertOpening {
  readonly unitKey: number;
  readonly condition: UnitAlertRow['condition'];
  readonly severity: UnitAlertRow['severity'];
  readonly message: string;
  readonly value: number | null;
  readonly limit: number | null;
  readonly detail?: Record<string, unknown>;
}

/**
 * Opens an alert from its first step; undefined when one not yet cleared exists already (another
 * evaluator opened it first: the partial unique index decides).
 */
export async function insertAlert({ db, opening, step, nowMs, baseUrl = '' }: { db: Db; opening: AlertOpening; step: AlertStep; nowMs: number; baseUrl?: string }): Promise<UnitAlertRow | undefined> {
  return db.transaction(async (tx) => {
    const [row] = await tx
      .insert(unitAlerts)
      .values({
        unitKey: opening.unitKey,
        condition: opening.condition,
        severity: opening.severity,
        message: opening.message,
        value: opening.value,
        limitValue: opening.limit,
        detail: opening.detail ?? {},
        ...columnsOfLife(step.life),
      })
      .onConflictDoNothing({ target: [unitAlerts.unitKey, unitAlerts.condition], where: sql`${unitAlerts.clearedAt} is null` })
      .returning();
    if (!row) return undefined;
    await recordChanges(tx, row, step.changes, { label: 'evaluator' }, nowMs, baseUrl);
    return row;
  });
}

/**
 * Applies `next` (a lifecycle step from the row as it is now, read under a lock) to one alert,
 * with the reading's new words when given; resolves to the row after, or undefined when the
 * alert is gone. A step without changes still stores what moved (goneSince, the reading).
 */
export async function updateAlert({
  db,
  alertId,
  next,
  reading,
  actor,
  nowMs,
  baseUrl = '',
}: {
  db: Db;
  alertId: number;
  next: (life: AlertLife, row: UnitAlertRow) => AlertStep;
  reading?: Pick<AlertOpening, 'message' | 'value' | 'limit' | 'severity'>;
  actor: ChangeActor;
  nowMs: number;
  baseUrl?: string;
}): Promise<{ row: UnitAlertRow; changes: readonly AlertChange[] } | undefined> {
  return db.transaction(async (tx) => {
    const [locked] = await tx.select().from(unitAlerts).where(eq(unitAlerts.id, alertId)).for('update');
    if (!locked) return undefined;
    const step = next(alertLifeOf(locked), locked);
    const taken = step.changes.some((c) => c.type === 'acknowledged');
    const shelved = step.changes.some((c) => c.type === 'shelved');
    const [row] = await tx
      .update(unitAlerts)
      .set({
        ...columnsOfLife(step.life),
        ...(reading && locked.clearedAt === null ? { message: reading.message, value: reading.value, limitValue: reading.limit, severity: reading.severity } : {}),
        ...(taken ? { acknowledgedBy: actor.label, acknowledgedById: actor.personId ?? null, acknowledgeNote: actor.note ?? null } : {}),
        ...(shelved ? { shelveReason: actor.note ?? null } : {}),
      })
      .where(eq(unitAlerts.id, alertId))
      .returning();
    await recordChanges(tx, row!, step.changes, actor, nowMs, baseUrl);
    return { row: row!, changes: step.changes };
  });
}

/** The alerts not yet cleared of some units (all units when `unitKeys` is undefined). */
export async function getOpenAlerts({ db, unitKeys }: { db: Db; unitKeys?: readonly number[] }): Promise<UnitAlertRow[]> {
  return db
    .select()
    .from(unitAlerts)
    .where(and(isNull(unitAlerts.clearedAt), unitKeys === undefined ? undefined : inArray(unitAlerts.unitKey, [...unitKeys])));
}
