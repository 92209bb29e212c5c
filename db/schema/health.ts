/**
 * Unit health: the latest diagnosis of each unit and the history the trend is
 * drawn from. Written by lib/diagnosis, read by the dashboard and alerts.
 */
import { bigint, doublePrecision, index, integer, jsonb, pgEnum, pgTable, timestamp } from 'drizzle-orm/pg-core';
import { units } from './fleet';

export const VERDICTS = ['healthy', 'demagnetised', 'shorted-turns', 'speed-sensor-fault', 'insufficient-data'] as const;
export type Verdict = (typeof VERDICTS)[number];
export const verdictEnum = pgEnum('verdict', VERDICTS);

export const SEVERITIES = ['info', 'warning', 'alarm'] as const;
export type Severity = (typeof SEVERITIES)[number];
export const severityEnum = pgEnum('severity', SEVERITIES);

export interface StoredFinding {
  code: string;
  severity: Severity;
  message: string;
}

const healthColumns = () => ({
  unitKey: integer()
    .notNull()
    .references(() => units.key),
  diagnosedAt: timestamp({ withTimezone: true }).notNull(),
  windowFrom: timestamp({ withTimezone: true }).notNull(),
  windowTo: timestamp({ withTimezone: true }).notNull(),
  verdict: verdictEnum().notNull(),
  samplesUsed: integer().notNull(),
  keRatio: doublePrecision(),
  keRatioLow: doublePrecision(),
  keRatioHigh: doublePrecision(),
  unbalancePct: doublePrecision(),
  speedRatio: doublePrecision(),
  findings: jsonb().$type<StoredFinding[]>().notNull(),
  /** Extra figures of the diagnosis (per-phase EMF, magnet temperature used, ...). */
  detail: jsonb().$type<Record<string, unknown>>().notNull(),
});

/** One row per unit: its latest diagnosis and trend. */
export const unitHealth = pgTable('unit_health', {
  ...healthColumns(),
  unitKey: integer()
    .primaryKey()
    .references(() => units.key),
  /** Trend of the corrected Ke ratio over the history, and when it may cross its limit. */
  trend: jsonb().$type<Record<string, unknown>>(),
});

export type UnitHealthRow = typeof unitHealth.$inferSelect;
export type NewUnitHealthRow = typeof unitHealth.$inferInsert;

/** Diagnosis results kept for the trend: at most one an hour per unit, and every change of verdict. */
export const unitHealthHistory = pgTable(
  'unit_health_history',
  {
    id: bigint({ mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    ...healthColumns(),
  },
  (t) => [index('unit_health_history_unit_idx').on(t.unitKey, t.diagnosedAt)],
);

export type UnitHealthHistoryRow = typeof unitHealthHistory.$inferSelect;
export type NewUnitHealthHistoryRow = typeof unitHealthHistory.$inferInsert;
