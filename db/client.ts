/**
 * The one database client factory. With a DATABASE_URL it is postgres-js
 * against that server; without, an embedded PGlite persisted in DATA_DIR and
 * guarded by a lock file. Both get the same drizzle schema and the same
 * committed migrations.
 */
import { existsSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { PGlite } from '@electric-sql/pglite';
import type { PgDatabase, PgQueryResultHKT } from 'drizzle-orm/pg-core';
import type postgres from 'postgres';
import { AppError } from '@/lib/errors/app-error';
import { getConfig } from '@/lib/config/env';
import * as schema from './schema';
import { acquireDataDirLock } from './lock';
import { ensureMonthlyPartitions, monthStartMs, nextMonthStartMs } from './partitions';

export { dbJson, dbNumber, dbNumberOrNull, dbTime, parseRows, rowsOf } from './rows';

export type Schema = typeof schema;
/** A drizzle database over either driver. */
export type Db = PgDatabase<PgQueryResultHKT, Schema>;

export type Backend = 'postgres' | 'pglite';

export interface DatabaseHandle {
  db: Db;
  backend: Backend;
  /** The postgres-js client (postgres backend), for COPY and raw statements. */
  sql?: postgres.Sql;
  /** The PGlite instance (pglite backend). */
  pglite?: PGlite;
  /** The server URL (postgres backend). */
  url?: string;
  /** Where the data lives, for logs and /api/health (no password). */
  location: string;
  close(): Promise<void>;
}

export interface OpenDatabaseOptions {
  /** postgres:// URL; when absent the embedded database is used. */
  url?: string;
  /** Folder of the embedded database; `memory://` for a throw-away one (tests). */
  dataDir?: string;
  /** Apply committed migrations and make the partitions ahead (default true). */
  migrate?: boolean;
  /** postgres-js pool size. */
  maxConnections?: number;
}

/**
 * The committed migrations: beside this file; when bundled, in the project
 * that holds the bundle (bin/ingest.mjs writes it to node_modules/.cache/millrace);
 * else under the working folder.
 */
export function migrationsFolder(): string {
  const here = dirname(fileURLToPath(import.meta.url));
  const candidates = [join(here, 'migrations'), resolve(here, '..', '..', '..', 'db', 'migrations'), resolve('db', 'migrations')];
  return candidates.find((folder) => existsSync(join(folder, 'meta', '_journal.json'))) ?? candidates[0]!;
}

/** Months of partitions made ahead of the current one. */
export const PARTITION_MONTHS_AHEAD = 3;

/** A database or broker URL without its password, fit for a log line. */
export function redactUrl(url: string): string {
  try {
    const u = new URL(url);
    if (u.password) u.password = '***';
    return u.toString();
  } catch {
    return '(unparsable URL)';
  }
}

async function openPostgres(url: string, maxConnections: number): Promise<DatabaseHandle> {
  const { default: postgresFactory } = await import('postgres');
  const { drizzle } = await import('drizzle-orm/postgres-js');
  // JIT off: this pool serves short reads of the screens, where compiling a plan
  // costs more than it saves (measured: the fleet query 96 ms with JIT, 30 ms without).
  const sql = postgresFactory(url, { max: maxConnections, onnotice: () => {}, connect_timeout: 10, connection: { jit: 'off' } });
  const db = drizzle(sql, { schema, casing: 'snake_case' }) as unknown as Db;
  return { db, backend: 'postgres', sql, url, location: redactUrl(url), close: () => sql.end({ timeout: 5 }) };
}

async function openPglite(dataDir: string): Promise<DatabaseHandle> {
  const { PGlite } = await import('@electric-sql/pglite');
  const { drizzle } = await import('drizzle-orm/pglite');
  const memory = dataDir === 'memory://';
  const folder = memory ? undefined : resolve(dataDir);
  const release = folder ? acquireDataDirLock(folder) : () => {};
  let pglite: PGlite;
  try {
    pglite = folder ? new PGlite(resolve(folder, 'pglite')) : new PGlite();
    await pglite.waitReady;
  } catch (cause) {
    release();
    throw new AppError('unavailable', 'db', `cannot open the embedded database in ${folder}: ${(cause as Error).message}`, {
      cause,
      expose: true,
    });
  }
  const db = drizzle(pglite, { schema, casing: 'snake_case' }) as unknown as Db;
  return {
    db,
    backend: 'pglite',
    pglite,
    location: folder ? `embedded PGlite in ${folder}` : 'embedded PGlite in memory',
    close: async () => {
      try {
        await pglite.close();
      } finally {
        release();
      }
    },
  };
}

/** Applies the committed migrations; on PostgreSQL under an advisory lock so that web and ingester may start together. */
export async function migrateDatabase(handle: DatabaseHandle): Promise<void> {
  if (handle.backend === 'pglite') {
    const { migrate } = await import('drizzle-orm/pglite/migrator');
    await migrate(handle.db as never, { migrationsFolder: migrationsFolder() });
  } else {
    const { migrate } = await import('drizzle-orm/postgres-js/migrator');
    const { drizzle } = await import('drizzle-orm/postgres-js');
    const { default: postgresFactory } = await import('postgres');
    // One connection of its own, so the advisory lock and the migration share it.
    const sql = postgresFactory(handle.url!, { max: 1, onnotice: () => {}, connect_timeout: 10 });
    try {
      await sql`select pg_advisory_lock(7271501)`;
      await migrate(drizzle(sql, { casing: 'snake_case' }), { migrationsFolder: migrationsFolder() });
      await sql`select pg_advisory_unlock(7271501)`;
    } finally {
      await sql.end({ timeout: 5 });
    }
  }
  const now = Date.now();
  let ahead = now;
  for (let i = 0; i < PARTITION_MONTHS_AHEAD; i++) ahead = nextMonthStartMs(ahead);
  await ensureMonthlyPartitions({ db: handle.db, fromMs: monthStartMs(now - 31 * 86_400_000), toMs: ahead });
}

/** Opens the database the options name, migrated unless told not to. */
export async function openDatabase(options: OpenDatabaseOptions = {}): Promise<DatabaseHandle> {
  const handle = options.url
    ? await openPostgres(options.url, options.maxConnections ?? 10)
    : await openPglite(options.dataDir ?? './data');
  if (options.migrate !== false) {
    try {
      await migrateDatabase(handle);
    } catch (cause) {
      await handle.close().catch(() => {});
      throw new AppError('unavailable', 'db', `cannot prepare the database at ${handle.location}: ${(cause as Error).message}`, {
        cause,
        expose: true,
      });
    }
  }
  return handle;
}

function optionsFromConfig(): OpenDatabaseOptions {
  const config = getConfig();
  return { url: config.DATABASE_URL, dataDir: config.DATA_DIR };
}

type GlobalWithDb = typeof globalThis & { __millraceDatabase?: Promise<DatabaseHandle> };

/**
 * The process-wide database. The custom server opens it before Next starts and
 * Next's bundled route code finds the same handle here (one PGlite per process);
 * opened from the configuration when nothing opened it first.
 */
export function getDatabase(options?: OpenDatabaseOptions): Promise<DatabaseHandle> {
  const g = globalThis as GlobalWithDb;
  if (!g.__millraceDatabase) {
    g.__millraceDatabase = openDatabase(options ?? optionsFromConfig());
    g.__millraceDatabase.catch(() => {
      delete g.__millraceDatabase;
    });
  }
  return g.__millraceDatabase;
}

/** Closes the process-wide database, if open. */
export async function closeDatabase(): Promise<void> {
  const g = globalThis as GlobalWithDb;
  const pending = g.__millraceDatabase;
  delete g.__millraceDatabase;
  if (pending) await (await pending).close();
}
