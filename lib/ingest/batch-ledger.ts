/**
 * The batcher's counts: what came in, what each committed batch stored, and
 * the figures of the last batch (its time, its lag behind the samples).
 */
import type { Logger } from '@/lib/log/logger';
import type { PendingMessage } from './batch-queue';
import type { BatchResult } from './writer';

export interface BatcherCounters {
  messages: number;
  samplesIn: number;
  rowsCommitted: number;
  duplicates: number;
  quarantined: number;
  presenceUpdates: number;
  batches: number;
  failedCommits: number;
  /** Messages let go unacknowledged because their connection closed (the broker delivers them again). */
  releasedForRedelivery: number;
  /** Messages with fields the contract does not know. */
  unknownFieldMessages: number;
}

/** The last committed batch. `lagMs`: commit time minus the newest sample stored, of the last batch that stored samples. */
export interface LastBatch {
  samples: number;
  rows: number;
  ms: number;
  lagMs?: number;
  /** Commit time minus the receipt of its oldest message. */
  waitMs: number;
  atMs: number;
}

/** Counts what the batcher takes in and commits (see the module comment). */
export class BatchLedger {
  readonly counters: BatcherCounters = {
    messages: 0,
    samplesIn: 0,
    rowsCommitted: 0,
    duplicates: 0,
    quarantined: 0,
    presenceUpdates: 0,
    batches: 0,
    failedCommits: 0,
    releasedForRedelivery: 0,
    unknownFieldMessages: 0,
  };
  lastBatch: LastBatch | undefined;
  private readonly warnedUnits = new Set<string>();

  constructor(
    private readonly log: Logger,
    private readonly now: () => number,
  ) {}

  /** A message came in. */
  received(message: PendingMessage): void {
    const { counters } = this;
    counters.messages++;
    counters.samplesIn += message.samples.count;
    if (message.unknownFields.length > 0) counters.unknownFieldMessages++;
  }

  /**
   * `batch`, written from `startedAtMs`, was committed with `result`. Unknown
   * fields are warned about once per unit: a device sends them in every message.
   * `pendingSamples` (still waiting) is only logged.
   */
  committed(result: BatchResult, batch: readonly PendingMessage[], startedAtMs: number, pendingSamples: number): void {
    const { counters, log } = this;
    counters.batches++;
    counters.rowsCommitted += result.inserted;
    counters.duplicates += result.duplicates;
    counters.quarantined += result.quarantined;
    counters.presenceUpdates += result.presence;
    for (const [unitId, fields] of result.unknownFieldsByUnit) {
      if (this.warnedUnits.has(unitId)) continue;
      this.warnedUnits.add(unitId);
      log.warn('unknown fields ignored (not stored); reported once per unit', { unit: unitId, fields: [...fields].sort() });
    }
    const end = this.now();
    let samples = 0;
    let oldest = Infinity;
    for (const m of batch) {
      samples += m.samples.count;
      if (m.receivedAtMs < oldest) oldest = m.receivedAtMs;
    }
    this.lastBatch = {
      samples,
      rows: result.inserted,
      ms: end - startedAtMs,
      // A batch that stored no sample (presence, redeliveries only) leaves the lag of the last one that did.
      lagMs: result.newestTsMs === undefined ? this.lastBatch?.lagMs : end - result.newestTsMs,
      waitMs: Number.isFinite(oldest) ? end - oldest : 0,
      atMs: end,
    };
    log.debug('batch committed', { messages: batch.length, ...this.lastBatch, pendingSamples, phases: result.phases });
  }
}
