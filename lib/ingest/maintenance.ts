/**
 * Partitions ahead and retention: raw samples are kept `retentionDays` by
 * dropping whole monthly partitions once every day in them is older than
 * that; telemetry set aside (quarantine) is kept as long, by the time it
 * arrived; rollups are kept for ever.
 */
import { sql } from 'drizzle-orm';
import { PARTITION_MONTHS_AHEAD, rowsOf, type Db } from '@/db/client';
import { dropPartitionsBefore, ensureMonthlyPartitions, monthStartMs, nextMonthStartMs } from '@/db/partitions';

const MS_PER_DAY = 86_400_000;

export interface MaintenanceResult {
  dropped: string[];
  created: string[];
  /** Quarantine rows that arrived before the cutoff, deleted. */
  quarantineDeleted: number;
  cutoffMs: number;
}

/** Deletes quarantine rows that arrived before `cutoffMs` (by the received_at index); returns how many. */
export async function deleteQuarantineBefore({ db, cutoffMs }: { db: Db; cutoffMs: number }): Promise<number> {
  const rows = rowsOf<{ n: number }>(
    await db.execute(sql`with gone as (delete from quarantine where received_at < ${new Date(cutoffMs).toISOString()}::timestamptz returning 1)
      select count(*)::int as n from gone`),
  );
  return Number(rows[0]?.n ?? 0);
}

/** Drops partitions and quarantine rows past retention and makes the partitions of the months ahead. */
export async function runTelemetryMaintenance({
  db,
  retentionDays,
  nowMs = Date.now(),
}: {
  db: Db;
  retentionDays: number;
  nowMs?: number;
}): Promise<MaintenanceResult> {
  const cutoffMs = nowMs - retentionDays * MS_PER_DAY;
  const dropped = await dropPartitionsBefore({ db, cutoffMs });
  const quarantineDeleted = await deleteQuarantineBefore({ db, cutoffMs });
  let ahead = nowMs;
  for (let i = 0; i < PARTITION_MONTHS_AHEAD; i++) ahead = nextMonthStartMs(ahead);
  const created = await ensureMonthlyPartitions({ db, fromMs: monthStartMs(nowMs), toMs: ahead });
  return { dropped, created, quarantineDeleted, cutoffMs };
}
