/**
 * Sites and units: who is where, and each unit's nameplate (contract, section 2).
 */
import { sql } from 'drizzle-orm';
import {
  check,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  text,
  timestamp,
} from 'drizzle-orm/pg-core';
import { MAGNET_MATERIALS, UNIT_KINDS, type DiagnosisLimits } from '@/lib/contract/nameplate';

export const unitKindEnum = pgEnum('unit_kind', UNIT_KINDS);
export const magnetMaterialEnum = pgEnum('magnet_material', MAGNET_MATERIALS);

const stamps = {
  createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
};

export const sites = pgTable('sites', {
  id: text().primaryKey(),
  name: text().notNull(),
  timezone: text().notNull(),
  ...stamps,
});

export type SiteRow = typeof sites.$inferSelect;
export type NewSiteRow = typeof sites.$inferInsert;

export const units = pgTable(
  'units',
  {
    /** Compact key the telemetry tables use; the slug `id` is what people and devices see. */
    key: integer().primaryKey().generatedAlwaysAsIdentity(),
    id: text().notNull().unique(),
    siteId: text()
      .notNull()
      .references(() => sites.id),
    name: text(),
    kind: unitKindEnum().notNull(),
    ratedKw: doublePrecision().notNull(),
    ratedRpm: doublePrecision().notNull(),
    maxRpm: doublePrecision().notNull(),
    poles: integer().notNull(),
    keVPerKrpm: doublePrecision().notNull(),
    keRefC: doublePrecision().notNull().default(20),
    magnet: magnetMaterialEnum().notNull(),
    magnetTempCoeffPctPerC: doublePrecision(),
    phaseOhm: doublePrecision().notNull(),
    phaseMh: doublePrecision().notNull().default(0),
    powerCurve: jsonb().$type<Array<{ ms: number; kw: number }>>(),
    cutInMs: doublePrecision(),
    cutOutMs: doublePrecision(),
    rotorDiameterM: doublePrecision(),
    designHeadM: doublePrecision(),
    designFlowM3s: doublePrecision('design_flow_m3s'),
    efficiency: doublePrecision(),
    diagnosis: jsonb().$type<DiagnosisLimits>(),
    ...stamps,
  },
  (t) => [
    index('units_site_id_idx').on(t.siteId),
    check('units_poles_even', sql`${t.poles} > 0 and ${t.poles} % 2 = 0`),
  ],
);

export type UnitRow = typeof units.$inferSelect;
export type NewUnitRow = typeof units.$inferInsert;
