/**
 * People, their sessions and credentials, display links, sign-in throttling
 * and the audit log (lib/auth). Secrets (session tokens, API tokens, display
 * tokens) are stored only as SHA-256 hashes; passwords only as scrypt hashes.
 */
import { sql } from 'drizzle-orm';
import { bigint, boolean, index, integer, jsonb, pgEnum, pgTable, primaryKey, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { ROLES } from '@/lib/contract/roles';
import { sites } from './fleet';

export const roleEnum = pgEnum('person_role', ROLES);

const at = () => timestamp({ withTimezone: true });

export const people = pgTable(
  'people',
  {
    id: bigint({ mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    /** Kept as typed; unique without regard to case (the index on lower(email)). */
    email: text().notNull(),
    role: roleEnum().notNull(),
    /** scrypt$N$r$p$salt$hash (lib/auth/passwords.ts). */
    passwordHash: text().notNull(),
    /** A password someone else set (demo admin, reset): it must be changed at the next sign-in. */
    mustChangePassword: boolean().notNull().default(false),
    disabled: boolean().notNull().default(false),
    createdAt: at().notNull().defaultNow(),
    updatedAt: at().notNull().defaultNow(),
  },
  (t) => [uniqueIndex('people_email_lower_idx').on(sql`lower(${t.email})`)],
);

export type PersonRow = typeof people.$inferSelect;
export type NewPersonRow = typeof people.$inferInsert;

/** The sites of a crew member or owner (admins and operators see all sites). */
export const personSites = pgTable(
  'person_sites',
  {
    personId: bigint({ mode: 'number' })
      .notNull()
      .references(() => people.id, { onDelete: 'cascade' }),
    siteId: text()
      .notNull()
      .references(() => sites.id, { onDelete: 'cascade' }),
  },
  (t) => [primaryKey({ columns: [t.personId, t.siteId] }), index('person_sites_site_idx').on(t.siteId)],
);

export const sessions = pgTable(
  'sessions',
  {
    id: bigint({ mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    /** SHA-256 of the cookie's token, hex. */
    tokenHash: text().notNull(),
    personId: bigint({ mode: 'number' })
      .notNull()
      .references(() => people.id, { onDelete: 'cascade' }),
    createdAt: at().notNull().defaultNow(),
    lastSeenAt: at().notNull().defaultNow(),
    /** lastSeenAt plus the idle time; moved on as the session is used. */
    idleExpiresAt: at().notNull(),
    /** createdAt plus the longest a session lives; never moved. */
    absoluteExpiresAt: at().notNull(),
    ip: text(),
    userAgent: text(),
  },
  (t) => [uniqueIndex('sessions_token_hash_idx').on(t.tokenHash), index('sessions_person_idx').on(t.personId)],
);

export type SessionRow = typeof sessions.$inferSelect;

export const apiTokens = pgTable(
  'api_tokens',
  {
    id: bigint({ mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    tokenHash: text().notNull(),
    name: text().notNull(),
    personId: bigint({ mode: 'number' })
      .notNull()
      .references(() => people.id, { onDelete: 'cascade' }),
    createdAt: at().notNull().defaultNow(),
    lastUsedAt: at(),
    revokedAt: at(),
  },
  (t) => [uniqueIndex('api_tokens_token_hash_idx').on(t.tokenHash), index('api_tokens_person_idx').on(t.personId)],
);

export type ApiTokenRow = typeof apiTokens.$inferSelect;

/** Read-only links for a wall screen: one site, or the whole fleet when siteId is null. */
export const displayLinks = pgTable(
  'display_links',
  {
    id: bigint({ mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    tokenHash: text().notNull(),
    name: text().notNull(),
    siteId: text().references(() => sites.id, { onDelete: 'cascade' }),
    createdBy: bigint({ mode: 'number' })
      .notNull()
      .references(() => people.id),
    createdAt: at().notNull().defaultNow(),
    lastUsedAt: at(),
    revokedAt: at(),
  },
  (t) => [uniqueIndex('display_links_token_hash_idx').on(t.tokenHash), index('display_links_created_by_idx').on(t.createdBy)],
);

export type DisplayLinkRow = typeof displayLinks.$inferSelect;

/**
 * Sign-in throttling (lib/auth/throttle.ts): one row per key, `address:IP`,
 * `account:EMAIL` or `pair:EMAIL IP`. A pair row with lastSuccessAt marks an
 * address this account signed in from before.
 */
export const signInThrottle = pgTable('sign_in_throttle', {
  key: text().primaryKey(),
  failures: integer().notNull().default(0),
  lastFailureAt: at(),
  blockedUntil: at(),
  lastSuccessAt: at(),
});

export type SignInThrottleRow = typeof signInThrottle.$inferSelect;

export const auditLog = pgTable(
  'audit_log',
  {
    id: bigint({ mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    at: at().notNull().defaultNow(),
    /** Who did it; null for the command line, a display link or someone not signed in. */
    personId: bigint({ mode: 'number' }).references(() => people.id, { onDelete: 'set null' }),
    /** Who did it in words as it was then (an e-mail, "command line", "local"). */
    actor: text().notNull(),
    ip: text(),
    /** What, e.g. `sign-in`, `sign-in-failed`, `unit-updated`, `person-added`. */
    action: text().notNull(),
    /** What it was done to, e.g. `unit north/n-1`, `person ana@example.invalid`. */
    target: text(),
    detail: jsonb().$type<Record<string, unknown>>().notNull().default({}),
  },
  (t) => [index('audit_log_at_idx').on(t.at, t.id), index('audit_log_person_idx').on(t.personId, t.at), index('audit_log_action_idx').on(t.action, t.at)],
);

export type AuditRow = typeof auditLog.$inferSelect;
