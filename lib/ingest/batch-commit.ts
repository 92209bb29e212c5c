/**
 * Commits one batch and then acknowledges its messages. An unreachable
 * database is waited out with backoff (nothing acknowledged meanwhile); a
 * batch the database refuses is tried again by INSERT, then message by
 * message, and a message refused on its own is quarantined whole.
 */
import type { Logger } from '@/lib/log/logger';
import { awaitsRedelivery, type PendingMessage } from './batch-queue';
import type { BatchLedger } from './batch-ledger';
import type { OutageTracker } from './outage';
import { EMPTY_BLOCK } from './sample-block';
import { CommitTimeoutError, isTransientDbError, type IngestDatabase } from './sql';
import type { UnitDirectory } from './unit-directory';
import { prepareBatch, writePrepared, type BatchResult, type PreparedBatch } from './writer';

export interface BatchCommitterOptions {
  database: IngestDatabase;
  directory: UnitDirectory;
  log: Logger;
  ledger: BatchLedger;
  outage: OutageTracker;
  /** First retry delay after a failed commit, ms; doubles up to `maxRetryMs`. */
  retryMs: number;
  maxRetryMs: number;
  /** A commit that takes longer counts as the database being out of reach (PostgreSQL), ms. */
  commitTimeoutMs: number;
  now: () => number;
  /** Samples still waiting for a batch (for the debug log). */
  pendingSamples: () => number;
  /** True once stopping without (or no longer) draining: retries end. */
  aborted: () => boolean;
  /** Called once per committed batch, after its acknowledgements; must not throw or wait. */
  onCommitted?: (result: BatchResult) => void;
}

/** How one attempt ended: committed, refused for a reason other than reach, or given up because stopping. */
type Attempt = { ok: true } | { ok: false; error: unknown } | { aborted: true };

const sleep = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms));

/** One write, with a watchdog on PostgreSQL: a connection can hang rather than fail. */
async function writeWatched(database: IngestDatabase, prepared: Promise<PreparedBatch>, byInsert: boolean, timeoutMs: number): Promise<BatchResult> {
  const writing = prepared.then((batch) => writePrepared({ database, batch, byInsert }));
  if (database.backend !== 'postgres') return writing;
  let timer: NodeJS.Timeout | undefined;
  try {
    return await Promise.race([
      writing,
      new Promise<never>((_, reject) => {
        timer = setTimeout(() => reject(new CommitTimeoutError(timeoutMs)), timeoutMs);
      }),
    ]);
  } finally {
    clearTimeout(timer);
    writing.catch(() => {});
  }
}

/** Writes batches and releases their acknowledgements (see the module comment). */
export class BatchCommitter {
  constructor(private readonly options: BatchCommitterOptions) {}

  /** Starts making `batch` ready (see prepareBatch); a failure shows when it is written. */
  prepare(batch: PendingMessage[]): Promise<PreparedBatch> {
    const prepared = prepareBatch({ directory: this.options.directory, messages: batch });
    prepared.catch(() => {});
    return prepared;
  }

  /** Commits a batch (made ready by `prepared` if given); a batch the database refuses twice is committed message by message. */
  async commit(batch: PendingMessage[], prepared?: Promise<PreparedBatch>): Promise<void> {
    const { log, retryMs } = this.options;
    let result = await this.attempt(batch, false, prepared);
    if ('ok' in result && !result.ok) {
      log.warn('database refused a batch; retrying it once', { error: result.error, messages: batch.length });
      await sleep(retryMs);
      result = await this.attempt(batch, true);
    }
    if (!('ok' in result) || result.ok) return;
    log.warn('database refused a batch again; committing its messages one by one', { error: result.error, messages: batch.length });
    for (const m of batch) {
      if (!(await this.commitAlone(m))) return;
    }
  }

  /** Commits `m` on its own, or quarantines it whole with the database's words; false when stopping cut it short. */
  private async commitAlone(m: PendingMessage): Promise<boolean> {
    const { log } = this.options;
    const alone = await this.attempt([m], true);
    if (!('ok' in alone)) return false;
    if (alone.ok) return true;
    const reason = `the database refused this message: ${alone.error instanceof Error ? alone.error.message : String(alone.error)}`;
    log.error('message refused by the database; quarantining it', { topic: m.topic, error: alone.error });
    const stand: PendingMessage = { ...m, kind: 'bad-topic', samples: EMPTY_BLOCK, quarantined: [], unknownFields: [], topicProblem: reason };
    const quarantined = await this.attempt([stand]);
    if (!('ok' in quarantined)) return false;
    if (!quarantined.ok) {
      log.error('message neither stored nor quarantined; left unacknowledged for the broker to deliver again', {
        topic: m.topic,
        error: quarantined.error,
      });
    }
    return true;
  }

  /**
   * Writes `batch` and acknowledges its messages, waiting out an unreachable
   * database with backoff; a refusal for any other reason comes back.
   * `byInsert` writes samples by INSERT, whose refusals say what was wrong.
   */
  private async attempt(batch: PendingMessage[], byInsert = false, prepared?: Promise<PreparedBatch>): Promise<Attempt> {
    const { database, ledger, outage, now, aborted } = this.options;
    let delay = this.options.retryMs;
    for (;;) {
      const live = batch.filter((m) => !awaitsRedelivery(m));
      ledger.counters.releasedForRedelivery += batch.length - live.length;
      // A batch made ready before some of its messages' connection closed is made again without them.
      if (live.length !== batch.length) prepared = undefined;
      batch = live;
      if (batch.length === 0) return { ok: true };
      const startedAt = now();
      try {
        const result = await writeWatched(database, (prepared ??= this.prepare(batch)), byInsert, this.options.commitTimeoutMs);
        outage.succeeded();
        this.accept(result, batch, startedAt);
        return { ok: true };
      } catch (error) {
        prepared = undefined;
        // A fresh client: a connection that failed may never send again, and a fresh
        // partition cache makes any partition dropped meanwhile again.
        database.reset();
        ledger.counters.failedCommits++;
        if (!isTransientDbError(error)) return { ok: false, error };
        outage.failed(error);
        if (aborted()) return { aborted: true };
        await sleep(delay);
        if (aborted()) return { aborted: true };
        delay = Math.min(this.options.maxRetryMs, delay * 2);
      }
    }
  }

  /** Counts a committed batch, acknowledges its messages and tells the after-commit hook. */
  private accept(result: BatchResult, batch: PendingMessage[], startedAt: number): void {
    const { ledger, log, onCommitted } = this.options;
    ledger.committed(result, batch, startedAt, this.options.pendingSamples());
    for (const m of batch) m.receipt.ack();
    if (onCommitted && result.sampledUnits.length > 0) {
      try {
        onCommitted(result);
      } catch (error) {
        log.warn('after-commit hook failed', { error });
      }
    }
  }
}
