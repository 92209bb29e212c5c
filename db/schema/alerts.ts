/**
 * Alerts raised on a unit's condition, and each change of their state. The
 * lifecycle and notifications belong to lib/alerts.
 */
import { bigint, index, integer, jsonb, pgEnum, pgTable, text, timestamp } from 'drizzle-orm/pg-core';
import { units } from './fleet';
import { severityEnum } from './health';

export const ALERT_STATES = ['open', 'acknowledged', 'resolved'] as const;
export type AlertState = (typeof ALERT_STATES)[number];
export const alertStateEnum = pgEnum('alert_state', ALERT_STATES);

export const alerts = pgTable(
  'alerts',
  {
    id: bigint({ mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    unitKey: integer()
      .notNull()
      .references(() => units.key),
    /** The condition, e.g. a finding code such as `ke-low`. */
    code: text().notNull(),
    severity: severityEnum().notNull(),
    state: alertStateEnum().notNull().default('open'),
    message: text().notNull(),
    detail: jsonb().$type<Record<string, unknown>>().notNull().default({}),
    openedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    resolvedAt: timestamp({ withTimezone: true }),
  },
  (t) => [index('alerts_unit_state_idx').on(t.unitKey, t.state), index('alerts_opened_at_idx').on(t.openedAt)],
);

export type AlertRow = typeof alerts.$inferSelect;
export type NewAlertRow = typeof alerts.$inferInsert;

export const alertEvents = pgTable(
  'alert_events',
  {
    id: bigint({ mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    alertId: bigint({ mode: 'number' })
      .notNull()
      .references(() => alerts.id),
    at: timestamp({ withTimezone: true }).notNull().defaultNow(),
    fromState: alertStateEnum(),
    toState: alertStateEnum().notNull(),
    note: text(),
  },
  (t) => [index('alert_events_alert_idx').on(t.alertId, t.at)],
);

export type AlertEventRow = typeof alertEvents.$inferSelect;
