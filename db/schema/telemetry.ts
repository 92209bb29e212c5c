/**
 * Raw telemetry, its rollups, quarantine and presence.
 *
 * `telemetry_samples` is range-partitioned by month on `ts`. drizzle-kit cannot
 * express partitioning, so the table's CREATE statement in the first migration
 * was edited by hand (see db/migrations/0000_*.sql) and partitions are made by
 * db/partitions.ts. Never `drizzle-kit push` this schema.
 */
import {
  bigint,
  doublePrecision,
  index,
  integer,
  pgEnum,
  pgTable,
  primaryKey,
  real,
  text,
  timestamp,
} from 'drizzle-orm/pg-core';
import { units } from './fleet';

export const telemetrySamples = pgTable(
  'telemetry_samples',
  {
    // No foreign key to units: the ingester resolves every unit before it
    // writes, units are never deleted, and a per-row key check would cost
    // insert throughput on the hottest path.
    unitKey: integer().notNull(),
    ts: timestamp({ withTimezone: true, precision: 3 }).notNull(),
    rpm: real().notNull(),
    hz: real(),
    vab: real().notNull(),
    vbc: real(),
    vca: real(),
    ia: real(),
    ib: real(),
    ic: real(),
    kw: real(),
    statorC: real(),
    ambientC: real(),
    windMs: real(),
    airKgM3: real('air_kg_m3'),
    flowM3s: real('flow_m3s'),
    headM: real(),
  },
  (t) => [primaryKey({ columns: [t.unitKey, t.ts] }), index('telemetry_samples_ts_brin').using('brin', t.ts)],
);

export type TelemetrySampleRow = typeof telemetrySamples.$inferSelect;
export type NewTelemetrySampleRow = typeof telemetrySamples.$inferInsert;

/** Columns shared by both rollup grains: count, min/mean (as sum)/max of the main fields, energy. */
const rollupColumns = () => ({
  unitKey: integer()
    .notNull()
    .references(() => units.key),
  bucketStart: timestamp({ withTimezone: true }).notNull(),
  samples: integer().notNull(),
  firstTs: timestamp({ withTimezone: true, precision: 3 }).notNull(),
  lastTs: timestamp({ withTimezone: true, precision: 3 }).notNull(),
  /** Seconds between consecutive samples (no longer than a gap) that end in this bucket. */
  coveredS: doublePrecision().notNull().default(0),
  /** Trapezoidal energy of those intervals, kWh. */
  kwh: doublePrecision().notNull().default(0),
  rpmMin: real(),
  rpmMax: real(),
  rpmSum: doublePrecision(),
  vllMin: real(),
  vllMax: real(),
  vllSum: doublePrecision(),
  ampsMin: real(),
  ampsMax: real(),
  ampsSum: doublePrecision(),
  ampsCount: integer().notNull().default(0),
  kwMin: real(),
  kwMax: real(),
  kwSum: doublePrecision(),
  kwCount: integer().notNull().default(0),
  statorCMin: real(),
  statorCMax: real(),
  statorCSum: doublePrecision(),
  statorCCount: integer().notNull().default(0),
  resourceMin: real(),
  resourceMax: real(),
  resourceSum: doublePrecision(),
  resourceCount: integer().notNull().default(0),
});

/** Ten-minute rollups per unit; `resource*` is wind speed (wind) or flow (hydro). */
export const telemetryRollups10m = pgTable('telemetry_rollups_10m', rollupColumns(), (t) => [
  primaryKey({ columns: [t.unitKey, t.bucketStart] }),
]);

/** Daily (UTC) rollups per unit. */
export const telemetryRollupsDaily = pgTable('telemetry_rollups_daily', rollupColumns(), (t) => [
  primaryKey({ columns: [t.unitKey, t.bucketStart] }),
]);

export type RollupRow = typeof telemetryRollups10m.$inferSelect;

/** Samples and payloads that failed validation, with the reason in words a person can act on. */
export const quarantine = pgTable(
  'quarantine',
  {
    id: bigint({ mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    receivedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    topic: text().notNull(),
    siteId: text(),
    unitId: text(),
    /** Index of the sample in an array payload; null for the whole payload. */
    sampleIndex: integer(),
    /** The raw payload or sample, cut to a bounded size. */
    payload: text().notNull(),
    payloadBytes: integer().notNull(),
    reason: text().notNull(),
  },
  (t) => [index('quarantine_received_at_idx').on(t.receivedAt), index('quarantine_unit_idx').on(t.siteId, t.unitId)],
);

export type QuarantineRow = typeof quarantine.$inferSelect;
export type NewQuarantineRow = typeof quarantine.$inferInsert;

export const PRESENCE_STATES = ['online', 'offline'] as const;
export const presenceEnum = pgEnum('presence_state', PRESENCE_STATES);

/** What the ingester last heard of each unit: its presence topic and its newest sample. */
export const unitStatus = pgTable('unit_status', {
  unitKey: integer()
    .primaryKey()
    .references(() => units.key),
  presence: presenceEnum(),
  presenceAt: timestamp({ withTimezone: true }),
  lastSampleTs: timestamp({ withTimezone: true, precision: 3 }),
  lastReceivedAt: timestamp({ withTimezone: true }),
});

export type UnitStatusRow = typeof unitStatus.$inferSelect;
