/**
 * MQTT accounts: one per unit (its device) and the ingesters' account. Only a
 * hash of each password is kept, in Mosquitto's own PBKDF2 format, so the same
 * stored hash checks a device on the embedded broker and goes into Mosquitto's
 * password file (`npx millrace device export-broker-auth`).
 */
import { sql } from 'drizzle-orm';
import { check, integer, pgTable, text, timestamp } from 'drizzle-orm/pg-core';
import { units } from './fleet';

/**
 * Only devices are stored so far; 'ingester' is room for an ingesters' account
 * kept here (the broker's check already honours it). Today the export takes
 * that account from MQTT_USERNAME / MQTT_PASSWORD instead (lib/cli/device.ts).
 */
export const MQTT_ACCOUNT_ROLES = ['device', 'ingester'] as const;

export const mqttAccounts = pgTable(
  'mqtt_accounts',
  {
    /** `<siteId>.<unitId>` for a device (slugs have no dot, so it reads back unambiguously). */
    username: text().primaryKey(),
    role: text({ enum: MQTT_ACCOUNT_ROLES }).notNull(),
    /** The unit a device account publishes for; null for the ingesters' account. */
    unitKey: integer()
      .unique('mqtt_accounts_unit_key_unique')
      .references(() => units.key),
    /** `$7$<iterations>$<base64 salt>$<base64 hash>`: PBKDF2-HMAC-SHA512, as mosquitto_passwd writes it. */
    passwordHash: text().notNull(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    /** When the current password was issued (equals createdAt until the first rotation). */
    rotatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    /** Set when the account was revoked: it no longer connects, and is left out of the export. */
    revokedAt: timestamp({ withTimezone: true }),
  },
  (t) => [
    check('mqtt_accounts_role_unit', sql`(${t.role} = 'device') = (${t.unitKey} is not null)`),
    check('mqtt_accounts_role', sql`${t.role} in ('device', 'ingester')`),
  ],
);

export type MqttAccountRow = typeof mqttAccounts.$inferSelect;
