/**
 * Monthly partitions of `telemetry_samples`: made ahead of time and on demand,
 * and dropped whole when older than the retention period.
 */
import { sql } from 'drizzle-orm';
import type { Db } from './client';
import { rowsOf } from './rows';

const PARENT = 'telemetry_samples';

/** Start (UTC ms) of the calendar month that holds `ms`. */
export function monthStartMs(ms: number): number {
  const d = new Date(ms);
  return Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), 1);
}

/** Start of the month after the one that holds `ms`. */
export function nextMonthStartMs(ms: number): number {
  const d = new Date(ms);
  return Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, 1);
}

/** Partition table name of the month holding `ms`, e.g. telemetry_samples_y2026m03. */
export function partitionName(ms: number): string {
  const d = new Date(ms);
  return `${PARENT}_y${d.getUTCFullYear()}m${String(d.getUTCMonth() + 1).padStart(2, '0')}`;
}

const known = new WeakMap<object, Set<string>>();

/**
 * Creates the partitions for every month from `fromMs` to `toMs` (inclusive)
 * that does not exist yet. Safe to call from several processes at once.
 */
export async function ensureMonthlyPartitions({ db, fromMs, toMs }: { db: Db; fromMs: number; toMs: number }): Promise<string[]> {
  let cache = known.get(db);
  if (!cache) {
    cache = new Set();
    known.set(db, cache);
  }
  const created: string[] = [];
  for (let start = monthStartMs(fromMs); start <= toMs; start = nextMonthStartMs(start)) {
    const name = partitionName(start);
    if (cache.has(name)) continue;
    const from = new Date(start).toISOString();
    const to = new Date(nextMonthStartMs(start)).toISOString();
    try {
      await db.execute(
        sql.raw(`CREATE TABLE IF NOT EXISTS "${name}" PARTITION OF "${PARENT}" FOR VALUES FROM ('${from}') TO ('${to}')`),
      );
      created.push(name);
    } catch (error) {
      // Two processes racing on the same month: the loser sees "already exists".
      const code = (error as { code?: string; cause?: { code?: string } }).code ?? (error as { cause?: { code?: string } }).cause?.code;
      if (code !== '42P07' && code !== '23505') throw error;
    }
    cache.add(name);
  }
  return created;
}

/** Names of the existing partitions, oldest first. */
export async function listPartitions({ db }: { db: Db }): Promise<string[]> {
  const result = await db.execute<{ name: string }>(sql`
    select c.relname as name from pg_inherits i
    join pg_class c on c.oid = i.inhrelid
    join pg_class p on p.oid = i.inhparent
    where p.relname = ${PARENT} order by c.relname`);
  return rowsOf<{ name: string }>(result).map((r) => r.name);
}

/** Drops every monthly partition that ends on or before `cutoffMs` (retention). */
export async function dropPartitionsBefore({ db, cutoffMs }: { db: Db; cutoffMs: number }): Promise<string[]> {
  const dropped: string[] = [];
  for (const name of await listPartitions({ db })) {
    const m = /_y(\d{4})m(\d{2})$/.exec(name);
    if (!m) continue;
    const end = Date.UTC(Number(m[1]), Number(m[2]), 1);
    if (end <= cutoffMs) {
      await db.execute(sql.raw(`DROP TABLE IF EXISTS "${name}"`));
      known.get(db)?.delete(name);
      dropped.push(name);
    }
  }
  return dropped;
}
