/**
 * Raw SQL on either driver, for the ingest path: postgres-js or PGlite.
 * Statements are plain text with `$n` array parameters, so the same SQL runs
 * on both.
 *
 * On PostgreSQL the ingester keeps a postgres-js client of its own, apart
 * from the application's pool, and replaces it after a connection failure.
 * postgres-js 3.4.9 can leave a connection that died mid-write unable to send
 * again (a query then waits for ever), and `sql.begin` sends ROLLBACK on the
 * dead connection, which can throw outside any promise and end the process.
 * So transactions run on a reserved connection, no ROLLBACK is sent after a
 * connection failure (the server rolls back on its own), and after any
 * failure the whole client is replaced by a fresh one.
 */
import type postgres from 'postgres';
import type { DatabaseHandle, Db } from '@/db/client';

/** Runs one statement and returns its rows. */
export interface SqlRunner {
  query<T = Record<string, unknown>>(text: string, params?: readonly unknown[]): Promise<T[]>;
  /** Runs one statement and returns the number of rows it affected (ingest transactions). */
  command?(text: string, params?: readonly unknown[]): Promise<number>;
  /**
   * True when statements issued together (without waiting) go out together
   * and run in order (postgres-js on one connection); false when each should
   * wait for the one before (PGlite).
   */
  pipelines?: boolean;
  /** Streams COPY ... FROM STDIN data (PostgreSQL ingest transactions only). */
  copyIn?(text: string, chunks: Iterable<Uint8Array>): Promise<void>;
}

/** The ingester's way into the database. */
export interface IngestDatabase {
  backend: DatabaseHandle['backend'];
  location: string;
  /** Statements outside a transaction. */
  runner: SqlRunner;
  /** drizzle over the same client (for db/partitions.ts). */
  db(): Db;
  /** Runs `fn` in one transaction: committed when it resolves, rolled back when it throws. */
  transaction<T>(fn: (tx: SqlRunner) => Promise<T>): Promise<T>;
  /** Replaces the client after a failure (PostgreSQL); nothing on PGlite. */
  reset(): void;
  close(): Promise<void>;
}

function runnerOf(sql: postgres.Sql | postgres.ReservedSql): SqlRunner {
  return {
    pipelines: true,
    query: async <T>(text: string, params: readonly unknown[] = []) =>
      (await sql.unsafe(text, params as never[], { prepare: true })) as unknown as T[],
    command: async (text: string, params: readonly unknown[] = []) => (await sql.unsafe(text, params as never[], { prepare: true })).count,
    async copyIn(text: string, chunks: Iterable<Uint8Array>) {
      const stream = await sql.unsafe(text).writable();
      // postgres-js 3.4.9 never ends the stream when the server refuses the data after
      // CopyDone (a duplicate key, a row outside every partition): the refusal is dropped
      // and 'finish' never comes. So a second statement follows the COPY on the same
      // connection; it fails with 25P02 exactly when the COPY failed.
      type Finalising = { _final(cb: (error?: Error | null) => void): void };
      let probeSent!: (probe: Promise<unknown>) => void;
      const probe = new Promise<Promise<unknown>>((resolve) => (probeSent = resolve));
      const final = (stream as unknown as Finalising)._final;
      (stream as unknown as Finalising)._final = function (this: unknown, cb) {
        final.call(this, cb); // sends CopyDone; only then may another statement go
        const sent = sql.unsafe('select 1');
        sent.catch(() => {});
        probeSent(sent);
      };
      await new Promise<void>((resolve, reject) => {
        stream.once('error', reject);
        stream.once('finish', () => resolve());
        (async () => {
          for (const chunk of chunks) {
            if (!stream.write(chunk)) await new Promise((r) => stream.once('drain', r));
          }
          stream.end();
          await (await probe);
        })().catch((error: unknown) => reject(codesOf(error).includes('25P02') ? new CopyRefusedError(error) : error));
      });
    },
  };
}

/**
 * The server refused the rows of a COPY; postgres-js does not pass on its
 * words, so the batch is retried by the unnest insert, which does.
 */
export class CopyRefusedError extends Error {
  readonly code = 'COPY_REFUSED';
  constructor(cause: unknown) {
    super('the database refused the rows sent by COPY (the reason is in the server log; the retry by INSERT reports it)', { cause });
    this.name = 'CopyRefusedError';
  }
}

function runnerOfPglite(db: { query<T>(text: string, params?: unknown[]): Promise<{ rows: T[]; affectedRows?: number }> }): SqlRunner {
  return {
    query: async <T>(text: string, params: readonly unknown[] = []) => (await db.query<T>(text, params as unknown[])).rows,
    command: async (text: string, params: readonly unknown[] = []) => (await db.query(text, params as unknown[])).affectedRows ?? 0,
  };
}

/** A runner on the handle's own client, outside any transaction (tests, tools). */
export function sqlRunner(handle: DatabaseHandle): SqlRunner {
  if (handle.sql) return runnerOf(handle.sql);
  const pglite = handle.pglite;
  if (!pglite) throw new Error(`database handle ${handle.location} has neither a postgres-js client nor a PGlite instance`);
  return runnerOfPglite(pglite);
}

/**
 * Runs `fn` in one transaction on the handle's own client (tests, tools); the
 * ingester itself uses {@link openIngestDatabase}.
 */
export async function inTransaction<T>(handle: DatabaseHandle, fn: (tx: SqlRunner) => Promise<T>): Promise<T> {
  if (handle.sql) return (await handle.sql.begin((tx) => fn(runnerOf(tx as unknown as postgres.Sql)))) as T;
  const pglite = handle.pglite;
  if (!pglite) throw new Error(`database handle ${handle.location} has neither a postgres-js client nor a PGlite instance`);
  return pglite.transaction((tx) => fn(runnerOfPglite(tx)));
}

/** The ingester's own access to the handle's database. */
export async function openIngestDatabase(handle: DatabaseHandle): Promise<IngestDatabase> {
  if (handle.backend === 'pglite') {
    const pglite = handle.pglite;
    if (!pglite) throw new Error(`database handle ${handle.location} has no PGlite instance`);
    return {
      backend: 'pglite',
      location: handle.location,
      runner: runnerOfPglite(pglite),
      db: () => handle.db,
      transaction: (fn) => pglite.transaction((tx) => fn(runnerOfPglite(tx))),
      reset: () => {},
      close: async () => {},
    };
  }
  if (!handle.url) throw new Error(`database handle ${handle.location} has no URL`);
  const url = handle.url;
  const { default: postgresFactory } = await import('postgres');
  const { drizzle } = await import('drizzle-orm/postgres-js');
  const connect = () => {
    const sql = postgresFactory(url, { max: 2, onnotice: () => {}, connect_timeout: 10, idle_timeout: 0 });
    return { sql, db: drizzle(sql, { casing: 'snake_case' }) as unknown as Db };
  };
  let current = connect();
  const retired = new Set<postgres.Sql>();
  const retire = (sql: postgres.Sql) => {
    retired.add(sql);
    void sql.end({ timeout: 0 }).catch(() => {}).finally(() => retired.delete(sql));
  };
  return {
    backend: 'postgres',
    location: handle.location,
    runner: { query: (text, params) => runnerOf(current.sql).query(text, params) },
    db: () => current.db,
    async transaction<T>(fn: (tx: SqlRunner) => Promise<T>): Promise<T> {
      const reserved = await current.sql.reserve();
      const tx = runnerOf(reserved);
      try {
        // Sent with the transaction's first statements, not waited for alone: postgres-js
        // pipelines statements on one connection, and the server runs them in order.
        const begun = tx.query('begin');
        const [, result] = await Promise.all([begun, fn(tx)]);
        await tx.query('commit');
        return result;
      } catch (error) {
        if (!isTransientDbError(error)) await tx.query('rollback').catch(() => {});
        throw error;
      } finally {
        reserved.release();
      }
    },
    reset() {
      retire(current.sql);
      current = connect();
    },
    async close() {
      await current.sql.end({ timeout: 5 }).catch(() => {});
      for (const sql of retired) await sql.end({ timeout: 0 }).catch(() => {});
    },
  };
}

const TRANSIENT_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'EPIPE',
  'ETIMEDOUT',
  'EHOSTUNREACH',
  'ENETUNREACH',
  'ENOTFOUND',
  'EAI_AGAIN',
  'CONNECTION_CLOSED',
  'CONNECTION_ENDED',
  'CONNECTION_DESTROYED',
  'CONNECT_TIMEOUT',
  'COMMIT_TIMEOUT',
  // SQLSTATE: admin shutdown, crash shutdown, cannot connect now, too many connections,
  // serialization failure, deadlock, out of memory / disk (the server may recover).
  '57P01',
  '57P02',
  '57P03',
  '53300',
  '53200',
  '53100',
  '40001',
  '40P01',
]);

function codesOf(error: unknown): string[] {
  const codes: string[] = [];
  let e: unknown = error;
  for (let depth = 0; e && typeof e === 'object' && depth < 5; depth++) {
    const code = (e as { code?: unknown }).code;
    if (typeof code === 'string') codes.push(code);
    const errno = (e as { errno?: unknown }).errno;
    if (typeof errno === 'string') codes.push(errno);
    e = (e as { cause?: unknown }).cause;
  }
  return codes;
}

/**
 * True when the error says the database is out of reach or busy rather than
 * that this batch is wrong: worth retrying the same batch later.
 */
export function isTransientDbError(error: unknown): boolean {
  const codes = codesOf(error);
  if (codes.some((c) => TRANSIENT_CODES.has(c) || c.startsWith('08'))) return true;
  const message = error instanceof Error ? error.message : String(error);
  return codes.length === 0 && /connect|terminat|socket|timed? ?out|closed/i.test(message);
}

/** An error that counts as the database being out of reach. */
export class CommitTimeoutError extends Error {
  readonly code = 'COMMIT_TIMEOUT';
  constructor(ms: number) {
    super(`the database did not answer within ${ms} ms`);
    this.name = 'CommitTimeoutError';
  }
}
