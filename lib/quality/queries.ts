/**
 * The telemetry set aside (the `quarantine` table), for the data-quality
 * screen: newest first a page at a time, and how much each unit sent of it
 * over the last day, so an operator can tell a crew which device sends bad
 * data. Every read is bounded: pages walk the received-time index backwards
 * from a cursor, and the day's counts read at most {@link DAY_COUNT_CAP} rows.
 */
import { desc, sql, type SQL } from 'drizzle-orm';
import { z } from 'zod';
import { dbNumber, dbNumberOrNull, dbTime, parseRows, rowsOf, type Db } from '@/db/client';
import { quarantine } from '@/db/schema';
import { siteFilter, type Viewer } from '@/lib/auth/viewer';

/** Rows a page shows. */
export const QUARANTINE_PAGE_SIZE = 25;
/** Most rows the last day's counts read; beyond this they say "at least". */
export const DAY_COUNT_CAP = 100_000;

export interface QuarantineEntry {
  id: number;
  receivedAt: Date;
  topic: string;
  siteId: string | null;
  unitId: string | null;
  /** Site time zone, when the site is registered. */
  timezone: string | null;
  sampleIndex: number | null;
  payload: string;
  payloadBytes: number;
  reason: string;
}

/** Where a page starts: just older than this entry. */
export interface QuarantineCursor {
  receivedAt: Date;
  id: number;
}

/** A cursor as a search parameter, and back. */
export function formatCursor(c: QuarantineCursor): string {
  return `${c.receivedAt.getTime()}-${c.id}`;
}
export function parseCursor(text: string): QuarantineCursor | undefined {
  const m = /^(\d{1,15})-(\d{1,18})$/.exec(text);
  return m ? { receivedAt: new Date(Number(m[1])), id: Number(m[2]) } : undefined;
}

function scope(viewer: Viewer, siteId: string | undefined, unitId: string | undefined): SQL[] {
  const where: SQL[] = [];
  const only = siteFilter(viewer);
  // Rows of no registered site (a bad topic) belong to nobody's sites: only a viewer of every site sees them.
  if (only !== undefined) where.push(only.length === 0 ? sql`false` : sql`q.site_id in (${sql.join(only.map((s) => sql`${s}`), sql`, `)})`);
  if (siteId !== undefined) where.push(sql`q.site_id = ${siteId}`);
  if (unitId !== undefined) where.push(sql`q.unit_id = ${unitId}`);
  return where;
}

function whereOf(parts: SQL[]): SQL {
  return parts.length === 0 ? sql`true` : sql.join(parts, sql` and `);
}

/** The columns of a page's statement, parsed (db/rows.ts). */
const entryRowSchema = z.object({
  id: dbNumber,
  received_at: dbTime,
  topic: z.string(),
  site_id: z.string().nullable(),
  unit_id: z.string().nullable(),
  timezone: z.string().nullable(),
  sample_index: dbNumberOrNull,
  payload: z.string(),
  payload_bytes: dbNumber,
  reason: z.string(),
});

const unitCountRowSchema = z.object({
  site_id: z.string().nullable(),
  unit_id: z.string().nullable(),
  n: dbNumber,
  total: dbNumber,
  last_at: dbTime,
  last_reason: z.string(),
});

/**
 * One page of set-aside telemetry, newest first, older than `before` when
 * given; `next` is the cursor of the page after, if there is one.
 */
export async function getQuarantinePage({
  db,
  viewer,
  siteId,
  unitId,
  before,
  limit = QUARANTINE_PAGE_SIZE,
}: {
  db: Db;
  viewer: Viewer;
  siteId?: string;
  unitId?: string;
  before?: QuarantineCursor;
  limit?: number;
}): Promise<{ entries: QuarantineEntry[]; next?: QuarantineCursor }> {
  const where = scope(viewer, siteId, unitId);
  if (before) where.push(sql`(q.received_at, q.id) < (${before.receivedAt.toISOString()}::timestamptz, ${before.id})`);
  const rows = parseRows(
    'set-aside page',
    entryRowSchema,
    await db.execute(sql`select q.id, q.received_at, q.topic, q.site_id, q.unit_id, s.timezone, q.sample_index, q.payload, q.payload_bytes, q.reason
      from quarantine q left join sites s on s.id = q.site_id
      where ${whereOf(where)}
      order by q.received_at desc, q.id desc
      limit ${limit + 1}`),
  );
  const entries = rows.slice(0, limit).map((r) => ({
    id: r.id,
    receivedAt: r.received_at,
    topic: r.topic,
    siteId: r.site_id,
    unitId: r.unit_id,
    timezone: r.timezone,
    sampleIndex: r.sample_index,
    payload: r.payload,
    payloadBytes: r.payload_bytes,
    reason: r.reason,
  }));
  const last = entries[entries.length - 1];
  return { entries, next: rows.length > limit && last ? { receivedAt: last.receivedAt, id: last.id } : undefined };
}

export interface QuarantineUnitCount {
  siteId: string | null;
  unitId: string | null;
  count: number;
  lastAt: Date;
  /** The newest reason from that unit. */
  lastReason: string;
}

/**
 * Set-aside telemetry per unit over the last 24 h, most first (the 100
 * units with most), and the total over all of them. `capped` is
 * true when more than {@link DAY_COUNT_CAP} rows arrived (the counts are then
 * of the newest ones only).
 */
export async function getQuarantineCountsByUnit({
  db,
  viewer,
  siteId,
  unitId,
  nowMs = Date.now(),
  cap = DAY_COUNT_CAP,
}: {
  db: Db;
  viewer: Viewer;
  siteId?: string;
  unitId?: string;
  nowMs?: number;
  cap?: number;
}): Promise<{ units: QuarantineUnitCount[]; total: number; capped: boolean }> {
  const where = scope(viewer, siteId, unitId);
  where.push(sql`q.received_at > ${new Date(nowMs - 86_400_000).toISOString()}::timestamptz`);
  const rows = parseRows(
    'set-aside counts',
    unitCountRowSchema,
    await db.execute(sql`select site_id, unit_id, count(*)::int as n, (sum(count(*)) over ())::int as total, max(received_at) as last_at,
        (array_agg(reason order by received_at desc, id desc))[1] as last_reason
      from (select q.id, q.site_id, q.unit_id, q.received_at, q.reason from quarantine q
            where ${whereOf(where)} order by q.received_at desc limit ${cap + 1}) t
      group by site_id, unit_id
      order by n desc, max(received_at) desc
      limit 100`),
  );
  const units = rows.map((r) => ({ siteId: r.site_id, unitId: r.unit_id, count: r.n, lastAt: r.last_at, lastReason: r.last_reason }));
  const total = rows[0]?.total ?? 0;
  return { units, total: Math.min(total, cap), capped: total > cap };
}

/** Counts of set-aside telemetry stop here: a device that floods the table must not make every page render scan it. */
export const QUARANTINE_COUNT_CAP = 10_000;

export interface QuarantineSummary {
  /** Rows kept (retention: RETENTION_DAYS), at most {@link QUARANTINE_COUNT_CAP} + 1 (meaning "more than the cap"). */
  total: number;
  /** Rows that arrived in the last day, capped the same way. */
  lastDay: number;
  recent: Array<{ receivedAt: Date; topic: string; reason: string }>;
}

/** How much telemetry was set aside as invalid, and the newest reasons, for the operator. */
export async function getQuarantineSummary({ db, recentLimit = 5 }: { db: Db; recentLimit?: number }): Promise<QuarantineSummary> {
  const limit = QUARANTINE_COUNT_CAP + 1;
  // Each count reads at most cap + 1 rows (the last day by the received_at index).
  const [counts] = rowsOf<{ total: number; lastDay: number }>(
    await db.execute(sql`select
      (select count(*) from (select 1 from ${quarantine} limit ${limit}) t)::int as "total",
      (select count(*) from (select 1 from ${quarantine} where ${quarantine.receivedAt} > now() - interval '1 day' limit ${limit}) d)::int as "lastDay"`),
  );
  const recent = await db
    .select({ receivedAt: quarantine.receivedAt, topic: quarantine.topic, reason: quarantine.reason })
    .from(quarantine)
    .orderBy(desc(quarantine.id))
    .limit(recentLimit);
  return { total: Number(counts?.total ?? 0), lastDay: Number(counts?.lastDay ?? 0), recent };
}
