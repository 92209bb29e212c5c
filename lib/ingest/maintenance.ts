/**
 * Partitions ahead and retention: raw samples are kept `retentionDays` by
 * dropping whole monthly partitions once every day in them is older than
 * that; rollups are kept for ever.
 */
import { PARTITION_MONTHS_AHEAD, type Db } from '../../db/client';
import { dropPartitionsBefore, ensureMonthlyPartitions, monthStartMs, nextMonthStartMs } from '../../db/partitions';

const MS_PER_DAY = 86_400_000;

export interface MaintenanceResult {
  dropped: string[];
  created: string[];
  cutoffMs: number;
}

/** Drops partitions past retention and makes those of the months ahead. */
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
  let ahead = nowMs;
  for (let i = 0; i < PARTITION_MONTHS_AHEAD; i++) ahead = nextMonthStartMs(ahead);
  const created = await ensureMonthlyPartitions({ db, fromMs: monthStartMs(nowMs), toMs: ahead });
  return { dropped, created, cutoffMs };
}
