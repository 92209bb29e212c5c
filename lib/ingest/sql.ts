/**
 * Raw SQL on either driver, for the ingest path: postgres-js (`handle.sql`)
 * or PGlite (`handle.pglite`). Statements are plain text with `$n` array
 * parameters, so the same SQL runs on both.
 */
import type { DatabaseHandle } from '../../db/client';

/** Runs one statement and returns its rows. */
export interface SqlRunner {
  query<T = Record<string, unknown>>(text: string, params?: readonly unknown[]): Promise<T[]>;
}

function runnerOfPostgres(sql: NonNullable<DatabaseHandle['sql']>): SqlRunner {
  return {
    query: async <T>(text: string, params: readonly unknown[] = []) =>
      (await sql.unsafe(text, params as never[], { prepare: true })) as unknown as T[],
  };
}

/** A runner outside any transaction. */
export function sqlRunner(handle: DatabaseHandle): SqlRunner {
  if (handle.sql) return runnerOfPostgres(handle.sql);
  const pglite = handle.pglite;
  if (!pglite) throw new Error(`database handle ${handle.location} has neither a postgres-js client nor a PGlite instance`);
  return { query: async <T>(text: string, params: readonly unknown[] = []) => (await pglite.query<T>(text, params as unknown[])).rows };
}

/** Runs `fn` in one transaction: committed when it resolves, rolled back when it throws. */
export async function inTransaction<T>(handle: DatabaseHandle, fn: (tx: SqlRunner) => Promise<T>): Promise<T> {
  if (handle.sql) {
    return (await handle.sql.begin((tx) => fn(runnerOfPostgres(tx as unknown as NonNullable<DatabaseHandle['sql']>)))) as T;
  }
  const pglite = handle.pglite;
  if (!pglite) throw new Error(`database handle ${handle.location} has neither a postgres-js client nor a PGlite instance`);
  return pglite.transaction((tx) =>
    fn({ query: async <R>(text: string, params: readonly unknown[] = []) => (await tx.query<R>(text, params as unknown[])).rows }),
  );
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
  return /connect|terminat|socket|timeout|closed/i.test(message) && codes.length === 0;
}
