/**
 * Gathers decoded messages from every connection into batches, commits one
 * batch at a time, and only then releases the acknowledgements of its
 * messages. A batch closes at `batchSamples` samples or `batchMs` after its
 * first message, whichever comes first.
 *
 * Memory is bounded by `bufferSamples`: at the limit the connections stop
 * reading (the broker keeps the rest). When the database cannot be reached
 * the batch is retried with backoff, nothing is acknowledged, the outage is
 * logged once and its end once.
 */
import type { Logger } from '@/lib/log/logger';
import { RoomGate } from './back-pressure';
import { BatchCommitter } from './batch-commit';
import { BatchLedger, type BatcherCounters, type LastBatch } from './batch-ledger';
import { BatchQueue, type PendingMessage } from './batch-queue';
import { CommitLoop } from './commit-loop';
import { OutageTracker, type DatabaseReachability } from './outage';
import type { IngestDatabase } from './sql';
import type { UnitDirectory } from './unit-directory';
import type { BatchResult, PreparedBatch } from './writer';

export type { BatcherCounters, PendingMessage };

export interface BatcherOptions {
  database: IngestDatabase;
  directory: UnitDirectory;
  log: Logger;
  batchSamples: number;
  batchMs: number;
  bufferSamples: number;
  /** First retry delay after a failed commit, ms; doubles up to `maxRetryMs`. */
  retryMs?: number;
  maxRetryMs?: number;
  /** A commit that takes longer counts as the database being out of reach (PostgreSQL), ms. */
  commitTimeoutMs?: number;
  now?: () => number;
  /** Called once per committed batch, after its acknowledgements (the live feed); must not throw or wait. */
  onCommitted?: (result: BatchResult) => void;
}

export interface BatcherState {
  counters: BatcherCounters;
  bufferedSamples: number;
  bufferLimit: number;
  committing: boolean;
  /** Of `bufferedSamples`, those in batches taken for the database (the rest wait for a batch). */
  committingSamples: number;
  database: DatabaseReachability;
  /** `lagMs`: commit time minus the newest sample stored, of the last batch that stored samples. */
  lastBatch?: LastBatch;
}

/**
 * Makes the batcher of one ingester from its parts: the queue of messages
 * waiting, the back-pressure gate, the commit loop, the committer (retries,
 * outages) and the counts.
 */
export function createBatcher(options: BatcherOptions) {
  const { database, directory, log, batchSamples, batchMs, bufferSamples } = options;
  const now = options.now ?? Date.now;
  const queue = new BatchQueue(batchSamples);
  const ledger = new BatchLedger(log, now);
  const held = () => loop.held;
  const outage = new OutageTracker({ log, location: database.location, now, held });
  const gate = new RoomGate(bufferSamples, held);
  const committer = new BatchCommitter({
    database,
    directory,
    log,
    ledger,
    outage,
    retryMs: options.retryMs ?? 250,
    maxRetryMs: options.maxRetryMs ?? 10_000,
    commitTimeoutMs: options.commitTimeoutMs ?? 60_000,
    now,
    pendingSamples: () => queue.weight,
    aborted: () => loop.aborted,
    onCommitted: options.onCommitted,
  });
  const loop: CommitLoop<PreparedBatch> = new CommitLoop({
    queue,
    batchMs,
    now,
    log,
    prepare: (batch) => committer.prepare(batch),
    commit: (batch, prepared) => committer.commit(batch, prepared),
    afterBatch: () => gate.release(),
  });

  return {
    /** Adds a message; resolves at once while there is room, later when the buffer has drained below its limit. */
    add(message: PendingMessage): void {
      ledger.received(message);
      queue.push(message);
      loop.schedule();
    },
    /** True while the buffer has room for more. */
    hasRoom: () => gate.hasRoom(),
    /** Resolves when the buffer has room again. */
    room: () => gate.room(),
    /** Lets go of pending messages whose connection closed: the broker will deliver them again. */
    releaseDead(): void {
      const released = queue.releaseDead();
      if (released === 0) return;
      ledger.counters.releasedForRedelivery += released;
      gate.release();
    },
    state(): BatcherState {
      return {
        counters: { ...ledger.counters },
        bufferedSamples: held(),
        bufferLimit: bufferSamples,
        committing: loop.committing,
        committingSamples: loop.inFlightWeight,
        database: outage.snapshot(),
        lastBatch: ledger.lastBatch && { ...ledger.lastBatch },
      };
    },
    /**
     * Stops. With `drain`, commits what is pending first (for at most
     * `timeoutMs` while the database is out of reach); without, lets it go
     * unacknowledged for the broker to deliver again.
     */
    async stop({ drain, timeoutMs = 10_000 }: { drain: boolean; timeoutMs?: number }): Promise<void> {
      loop.stop();
      gate.openForGood();
      if (drain) return loop.drain(timeoutMs);
      loop.abort();
      queue.clear();
    },
  };
}

export type Batcher = ReturnType<typeof createBatcher>;
