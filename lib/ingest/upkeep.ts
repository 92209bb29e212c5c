/**
 * The ingester's upkeep: retention and the partitions ahead, run at start
 * and then daily. After a failed first run it is tried again every minute
 * until one succeeds.
 */
import type { Logger } from '@/lib/log/logger';
import type { MaintenanceResult } from './maintenance';

const DAY_MS = 86_400_000;
const RETRY_MS = 60_000;

/** What the upkeep has done since start. */
export interface RetentionState {
  days: number;
  lastRunAt?: string;
  droppedPartitions: number;
  quarantineRowsDeleted: number;
  lastError?: string;
}

export interface UpkeepOptions {
  /** One run of retention and partitions ahead. */
  run: () => Promise<MaintenanceResult>;
  retentionDays: number;
  log: Logger;
  /** False: never runs (the state stays empty). */
  enabled: boolean;
}

export interface Upkeep {
  readonly retention: RetentionState;
  /** Stops the daily run and any retry. */
  stop(): void;
}

/** Runs `run` once, counting what it did into `retention`; true when it succeeded. */
async function runOnce({ run, retentionDays, log }: UpkeepOptions, retention: RetentionState): Promise<boolean> {
  try {
    const result = await run();
    retention.lastRunAt = new Date().toISOString();
    retention.droppedPartitions += result.dropped.length;
    retention.quarantineRowsDeleted += result.quarantineDeleted;
    retention.lastError = undefined;
    if (result.dropped.length > 0) {
      log.info('raw samples past retention dropped', { partitions: result.dropped, retentionDays });
    }
    if (result.quarantineDeleted > 0) {
      log.info('telemetry set aside past retention deleted', { rows: result.quarantineDeleted, retentionDays });
    }
    return true;
  } catch (error) {
    retention.lastError = error instanceof Error ? error.message : String(error);
    log.error('retention and partition upkeep failed; trying again in a minute', { error });
    return false;
  }
}

/** Starts the upkeep (see the module comment); resolves after the first run. */
export async function startUpkeep(options: UpkeepOptions): Promise<Upkeep> {
  const retention: RetentionState = { days: options.retentionDays, droppedPartitions: 0, quarantineRowsDeleted: 0 };
  const timers: NodeJS.Timeout[] = [];
  if (options.enabled) {
    const ok = await runOnce(options, retention);
    const daily = setInterval(() => void runOnce(options, retention), DAY_MS);
    daily.unref();
    timers.push(daily);
    if (!ok) {
      const retry = setInterval(async () => {
        if (await runOnce(options, retention)) clearInterval(retry);
      }, RETRY_MS);
      retry.unref();
      timers.push(retry);
    }
  }
  return {
    retention,
    stop: () => {
      for (const t of timers) clearInterval(t);
    },
  };
}
