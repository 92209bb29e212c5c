/**
 * Alerts (contract section 7): one condition on one unit, its lifecycle and
 * every change of it; the evaluator's memory of each condition (on- and
 * off-delays survive a restart); webhook endpoints and their deliveries.
 * The rules live in lib/alerts; these are the rows.
 */
import { sql } from 'drizzle-orm';
import { bigint, boolean, doublePrecision, index, integer, jsonb, pgEnum, pgTable, primaryKey, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { ALERT_CONDITIONS, ALERT_EVENT_TYPES, ALERT_STATES } from '@/lib/contract/alerts';
import { units, sites } from './fleet';
import { severityEnum } from './health';
import { people } from './people';

export const alertConditionEnum = pgEnum('alert_condition', ALERT_CONDITIONS);
export const unitAlertStateEnum = pgEnum('unit_alert_state', ALERT_STATES);
export const alertEventTypeEnum = pgEnum('alert_event_type', ALERT_EVENT_TYPES);

const at = () => timestamp({ withTimezone: true });

export const unitAlerts = pgTable(
  'unit_alerts',
  {
    id: bigint({ mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    unitKey: integer()
      .notNull()
      .references(() => units.key),
    condition: alertConditionEnum().notNull(),
    severity: severityEnum().notNull(),
    state: unitAlertStateEnum().notNull(),
    /** Plain words, with the reading and the limit. */
    message: text().notNull(),
    value: doublePrecision(),
    limitValue: doublePrecision(),
    detail: jsonb().$type<Record<string, unknown>>().notNull().default({}),
    openedAt: at().notNull(),
    changedAt: at().notNull(),
    /** When the condition stopped holding; the alert clears once this is older than the hold-off. */
    goneSince: at(),
    acknowledgedAt: at(),
    acknowledgedBy: text(),
    acknowledgedById: bigint({ mode: 'number' }).references(() => people.id),
    acknowledgeNote: text(),
    clearedAt: at(),
    shelvedUntil: at(),
    shelveReason: text(),
    /** Re-openings within the chatter window, and when that window began. */
    flaps: integer().notNull().default(0),
    flapWindowStart: at(),
    /** Notifications held back (chattering, flood) since the last one sent. */
    notificationsHeld: integer().notNull().default(0),
    /** Escalation steps taken (0 none, 1 the site's operators, 2 the admins). */
    escalation: integer().notNull().default(0),
  },
  (t) => [
    // One alert not yet cleared per unit and condition: two evaluators can never raise it twice.
    uniqueIndex('unit_alerts_open_one').on(t.unitKey, t.condition).where(sql`${t.clearedAt} is null`),
    index('unit_alerts_changed_idx').on(t.changedAt),
    index('unit_alerts_unit_opened_idx').on(t.unitKey, t.openedAt),
    index('unit_alerts_state_idx').on(t.state, t.openedAt),
  ],
);

export type UnitAlertRow = typeof unitAlerts.$inferSelect;
export type NewUnitAlertRow = typeof unitAlerts.$inferInsert;

export const unitAlertEvents = pgTable(
  'unit_alert_events',
  {
    id: bigint({ mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    alertId: bigint({ mode: 'number' })
      .notNull()
      .references(() => unitAlerts.id),
    at: at().notNull(),
    type: alertEventTypeEnum().notNull(),
    fromState: unitAlertStateEnum(),
    toState: unitAlertStateEnum().notNull(),
    /** Who (a person's address, or "evaluator"). */
    actor: text().notNull(),
    note: text(),
    value: doublePrecision(),
  },
  (t) => [index('unit_alert_events_alert_idx').on(t.alertId, t.at)],
);

export type UnitAlertEventRow = typeof unitAlertEvents.$inferSelect;

/** The evaluator's memory of one condition on one unit: since when it holds (on-delay) or is gone (off-delay). */
export const alertConditionStates = pgTable(
  'alert_condition_states',
  {
    unitKey: integer()
      .notNull()
      .references(() => units.key),
    condition: alertConditionEnum().notNull(),
    /** The raw condition holds (past the deadband) since then; null when it does not. */
    holdsSince: at(),
    lastValue: doublePrecision(),
    evaluatedAt: at().notNull(),
  },
  (t) => [primaryKey({ columns: [t.unitKey, t.condition] })],
);

export const webhookEndpoints = pgTable('webhook_endpoints', {
  id: bigint({ mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
  url: text().notNull(),
  /** Only this site's alerts; null for every site. */
  siteId: text().references(() => sites.id),
  minSeverity: severityEnum().notNull().default('warning'),
  /** `whsec_` + base64 of the key; needed to sign, so kept (shown once to the person who adds it). */
  secret: text().notNull(),
  enabled: boolean().notNull().default(true),
  createdAt: at().notNull().defaultNow(),
  createdBy: text().notNull(),
});

export type WebhookEndpointRow = typeof webhookEndpoints.$inferSelect;

/** One message to one endpoint, retried with the same `webhook-id` until delivered or given up. */
export const webhookDeliveries = pgTable(
  'webhook_deliveries',
  {
    id: bigint({ mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    endpointId: bigint({ mode: 'number' })
      .notNull()
      .references(() => webhookEndpoints.id),
    messageId: text().notNull(),
    type: text().notNull(),
    body: text().notNull(),
    createdAt: at().notNull(),
    attempts: integer().notNull().default(0),
    nextAttemptAt: at(),
    deliveredAt: at(),
    givenUpAt: at(),
    lastStatus: integer(),
    lastError: text(),
  },
  (t) => [uniqueIndex('webhook_deliveries_message_idx').on(t.endpointId, t.messageId), index('webhook_deliveries_due_idx').on(t.nextAttemptAt)],
);

export type WebhookDeliveryRow = typeof webhookDeliveries.$inferSelect;

/** Every attempt at a delivery, with what the endpoint answered. */
export const webhookAttempts = pgTable(
  'webhook_attempts',
  {
    id: bigint({ mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    deliveryId: bigint({ mode: 'number' })
      .notNull()
      .references(() => webhookDeliveries.id),
    at: at().notNull(),
    status: integer(),
    error: text(),
    durationMs: integer().notNull(),
  },
  (t) => [index('webhook_attempts_delivery_idx').on(t.deliveryId, t.at)],
);
