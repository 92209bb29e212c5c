/**
 * Which backend the integration tests use. `npm test` runs on embedded
 * defaults (PGlite, aedes) unless DATABASE_URL / MQTT_URL name real services;
 * CI runs the suite once each way. Tests that need a database of their own get
 * a fresh one here: a new PostgreSQL database (dropped after) or an in-memory
 * PGlite.
 */
import { randomBytes } from 'node:crypto';
import postgres from 'postgres';
import { openDatabase, type DatabaseHandle } from '@/db/client';

/** The PostgreSQL server named by DATABASE_URL, or undefined on embedded defaults. */
export const realDatabaseUrl: string | undefined = process.env.DATABASE_URL || undefined;
/** The MQTT broker named by MQTT_URL, or undefined on embedded defaults. */
export const realBrokerUrl: string | undefined = process.env.MQTT_URL || undefined;

/** A line saying which backend this run uses. */
export function backendDescription(): string {
  const db = realDatabaseUrl ? `PostgreSQL (${new URL(realDatabaseUrl).host})` : 'embedded PGlite';
  const broker = realBrokerUrl ? `MQTT broker at ${realBrokerUrl}` : 'embedded aedes broker';
  return `${db}, ${broker}`;
}

/** `url` with its database name replaced. */
export function withDatabase(url: string, name: string): string {
  const u = new URL(url);
  u.pathname = `/${name}`;
  return u.toString();
}

export interface TestDatabase {
  handle: DatabaseHandle;
  /** postgres:// URL of the fresh database, or undefined for PGlite. */
  url?: string;
  drop(): Promise<void>;
}

/** Creates an empty PostgreSQL database on the server of `adminUrl`; returns its URL and a drop function. */
export async function createPostgresDatabase(adminUrl: string, prefix = 'millrace_test') {
  const name = `${prefix}_${randomBytes(5).toString('hex')}`;
  const admin = postgres(adminUrl, { max: 1, onnotice: () => {} });
  await admin.unsafe(`create database "${name}"`);
  await admin.end();
  return {
    url: withDatabase(adminUrl, name),
    drop: async () => {
      const again = postgres(adminUrl, { max: 1, onnotice: () => {} });
      await again.unsafe(`drop database if exists "${name}" with (force)`);
      await again.end();
    },
  };
}

/** A fresh, migrated database on this run's backend. */
export async function createTestDatabase(): Promise<TestDatabase> {
  if (!realDatabaseUrl) {
    const handle = await openDatabase({ dataDir: 'memory://' });
    return { handle, drop: () => handle.close() };
  }
  const created = await createPostgresDatabase(realDatabaseUrl);
  const handle = await openDatabase({ url: created.url, maxConnections: 4 });
  return {
    handle,
    url: created.url,
    drop: async () => {
      await handle.close();
      await created.drop();
    },
  };
}
