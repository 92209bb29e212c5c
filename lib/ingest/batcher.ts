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
import type { Receipt } from './connections';
import { CommitTimeoutError, isTransientDbError, type IngestDatabase } from './sql';
import { EMPTY_BLOCK } from './sample-block';
import type { UnitDirectory } from './unit-directory';
import { prepareBatch, writePrepared, type BatchResult, type DecodedMessage, type PreparedBatch } from './writer';

/** A decoded message waiting for its batch, with the means to acknowledge it. */
export interface PendingMessage extends DecodedMessage {
  /** QoS of the delivery (0 needs no acknowledgement and is never redelivered). */
  qos: number;
  /** Acknowledges it on the connection it came on; `alive()` is false once that closed (the broker will deliver it again). */
  receipt: Receipt;
}

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

export interface BatcherState {
  counters: BatcherCounters;
  bufferedSamples: number;
  bufferLimit: number;
  committing: boolean;
  /** Of `bufferedSamples`, those in batches taken for the database (the rest wait for a batch). */
  committingSamples: number;
  database: { reachable: boolean; outageSinceMs?: number; outages: number; lastError?: string };
  /** `lagMs`: commit time minus the newest sample stored, of the last batch that stored samples. */
  lastBatch?: { samples: number; rows: number; ms: number; lagMs?: number; waitMs: number; atMs: number };
}

function weightOf(m: DecodedMessage): number {
  return Math.max(1, m.samples.count + m.quarantined.length);
}

const sleep = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms));

export function createBatcher(options: BatcherOptions) {
  const { database, directory, log, batchSamples, batchMs, bufferSamples } = options;
  const commitTimeoutMs = options.commitTimeoutMs ?? 60_000;
  const retryMs = options.retryMs ?? 250;
  const maxRetryMs = options.maxRetryMs ?? 10_000;
  const now = options.now ?? Date.now;

  let pending: PendingMessage[] = [];
  let pendingWeight = 0;
  let inFlightWeight = 0;
  let firstPendingAt = 0;
  let timer: NodeJS.Timeout | undefined;
  let committing: Promise<void> | undefined;
  let stopped = false;
  /** Set when stopping without (or no longer) draining: no more commits start. */
  let stopAbort = false;
  let roomWaiters: Array<() => void> = [];
  const warnedUnits = new Set<string>();
  const counters: BatcherCounters = {
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
  const dbState: BatcherState['database'] = { reachable: true, outages: 0 };
  let lastBatch: BatcherState['lastBatch'];

  const held = () => pendingWeight + inFlightWeight;

  function releaseRoom() {
    if (held() >= bufferSamples || roomWaiters.length === 0) return;
    const waiters = roomWaiters;
    roomWaiters = [];
    for (const w of waiters) w();
  }

  function schedule() {
    if (stopped || committing) return;
    if (pendingWeight >= batchSamples) {
      void commitLoop();
      return;
    }
    if (pending.length > 0 && !timer) {
      const wait = Math.max(0, firstPendingAt + batchMs - now());
      timer = setTimeout(() => {
        timer = undefined;
        void commitLoop();
      }, wait);
    }
  }

  /** Takes up to `batchSamples` of the pending messages. */
  function take(): PendingMessage[] {
    let weight = 0;
    let n = 0;
    while (n < pending.length && (n === 0 || weight + weightOf(pending[n]!) <= batchSamples)) weight += weightOf(pending[n++]!);
    const batch = pending.slice(0, n);
    pending = pending.slice(n);
    pendingWeight -= weight;
    inFlightWeight += weight;
    firstPendingAt = pending[0]?.receivedAtMs ?? 0;
    return batch;
  }

  function dropDead(batch: PendingMessage[]): PendingMessage[] {
    const live = batch.filter((m) => m.qos === 0 || m.receipt.alive());
    counters.releasedForRedelivery += batch.length - live.length;
    return live;
  }

  function account(result: BatchResult, batch: PendingMessage[], startedAt: number) {
    counters.batches++;
    counters.rowsCommitted += result.inserted;
    counters.duplicates += result.duplicates;
    counters.quarantined += result.quarantined;
    counters.presenceUpdates += result.presence;
    for (const [unitId, fields] of result.unknownFieldsByUnit) {
      if (warnedUnits.has(unitId)) continue;
      warnedUnits.add(unitId);
      log.warn('unknown fields ignored (not stored); reported once per unit', { unit: unitId, fields: [...fields].sort() });
    }
    const end = now();
    let samples = 0;
    let oldest = Infinity;
    for (const m of batch) {
      samples += m.samples.count;
      if (m.receivedAtMs < oldest) oldest = m.receivedAtMs;
    }
    lastBatch = {
      samples,
      rows: result.inserted,
      ms: end - startedAt,
      // A batch that stored no sample (presence, redeliveries only) leaves the lag of the last one that did.
      lagMs: result.newestTsMs === undefined ? lastBatch?.lagMs : end - result.newestTsMs,
      waitMs: Number.isFinite(oldest) ? end - oldest : 0,
      atMs: end,
    };
    log.debug('batch committed', { messages: batch.length, ...lastBatch, pendingSamples: pendingWeight, phases: result.phases });
  }

  function noteOutage(error: unknown) {
    counters.failedCommits++;
    dbState.lastError = error instanceof Error ? error.message : String(error);
    if (dbState.reachable) {
      dbState.reachable = false;
      dbState.outageSinceMs = now();
      dbState.outages++;
      log.error('database unreachable: holding messages unacknowledged and retrying', {
        database: database.location,
        error,
        bufferedSamples: held(),
      });
    }
  }

  function noteRecovery() {
    if (dbState.reachable) return;
    dbState.reachable = true;
    log.info('database reachable again', {
      database: database.location,
      outageMs: now() - (dbState.outageSinceMs ?? now()),
      bufferedSamples: held(),
    });
    dbState.outageSinceMs = undefined;
  }

  /** One write, with a watchdog on PostgreSQL: a connection can hang rather than fail. */
  async function write(prepared: Promise<PreparedBatch>, byInsert: boolean): Promise<BatchResult> {
    const writing = prepared.then((batch) => writePrepared({ database, batch, byInsert }));
    if (database.backend !== 'postgres') return writing;
    let timer: NodeJS.Timeout | undefined;
    try {
      return await Promise.race([
        writing,
        new Promise<never>((_, reject) => {
          timer = setTimeout(() => reject(new CommitTimeoutError(commitTimeoutMs)), commitTimeoutMs);
        }),
      ]);
    } finally {
      clearTimeout(timer);
      writing.catch(() => {});
    }
  }

  /** Starts making `batch` ready (see prepareBatch); a failure shows when it is written. */
  function prepare(batch: PendingMessage[]): Promise<PreparedBatch> {
    const prepared = prepareBatch({ directory, messages: batch });
    prepared.catch(() => {});
    return prepared;
  }

  /** A batch taken from the pending messages, and its preparation (started when taken). */
  interface Taken {
    batch: PendingMessage[];
    prepared?: Promise<PreparedBatch>;
  }

  type Attempt = { ok: true } | { ok: false; error: unknown } | { aborted: true };

  /**
   * Writes `batch` and acknowledges its messages, waiting out an unreachable
   * database with backoff; a refusal for any other reason comes back.
   * `byInsert` writes samples by INSERT, whose refusals say what was wrong.
   */
  async function attempt(batch: PendingMessage[], byInsert = false, prepared?: Promise<PreparedBatch>): Promise<Attempt> {
    let delay = retryMs;
    for (;;) {
      const live = dropDead(batch);
      // A batch made ready before some of its messages' connection closed is made again without them.
      if (live.length !== batch.length) prepared = undefined;
      batch = live;
      if (batch.length === 0) return { ok: true };
      const startedAt = now();
      try {
        const result = await write((prepared ??= prepare(batch)), byInsert);
        noteRecovery();
        account(result, batch, startedAt);
        for (const m of batch) m.receipt.ack();
        if (options.onCommitted && result.sampledUnits.length > 0) {
          try {
            options.onCommitted(result);
          } catch (error) {
            log.warn('after-commit hook failed', { error });
          }
        }
        return { ok: true };
      } catch (error) {
        prepared = undefined;
        // A fresh client: a connection that failed may never send again, and a fresh
        // partition cache makes any partition dropped meanwhile again.
        database.reset();
        if (!isTransientDbError(error)) {
          counters.failedCommits++;
          return { ok: false, error };
        }
        noteOutage(error);
        if (stopAbort) return { aborted: true };
        await sleep(delay);
        if (stopAbort) return { aborted: true };
        delay = Math.min(maxRetryMs, delay * 2);
      }
    }
  }

  /** Commits a batch; a batch the database refuses twice is committed message by message. */
  async function commitBatch({ batch, prepared }: Taken): Promise<void> {
    const weight = batch.reduce((s, m) => s + weightOf(m), 0);
    try {
      let result = await attempt(batch, false, prepared);
      if ('ok' in result && !result.ok) {
        log.warn('database refused a batch; retrying it once', { error: result.error, messages: batch.length });
        await sleep(retryMs);
        result = await attempt(batch, true);
      }
      if (!('ok' in result) || result.ok) return;
      log.warn('database refused a batch again; committing its messages one by one', { error: result.error, messages: batch.length });
      for (const m of batch) {
        const alone = await attempt([m], true);
        if (!('ok' in alone)) return;
        if (alone.ok) continue;
        // Refused on its own: quarantine it whole, with the database's words.
        const reason = `the database refused this message: ${alone.error instanceof Error ? alone.error.message : String(alone.error)}`;
        log.error('message refused by the database; quarantining it', { topic: m.topic, error: alone.error });
        const stand: PendingMessage = { ...m, kind: 'bad-topic', samples: EMPTY_BLOCK, quarantined: [], unknownFields: [], topicProblem: reason };
        const quarantined = await attempt([stand]);
        if (!('ok' in quarantined)) return;
        if (!quarantined.ok) {
          log.error('message neither stored nor quarantined; left unacknowledged for the broker to deliver again', {
            topic: m.topic,
            error: quarantined.error,
          });
        }
      }
    } finally {
      inFlightWeight -= weight;
    }
  }

  /**
   * Takes the next batch and starts making it ready: at once, or, with
   * `afterTurn`, once the event loop has turned, so that the batch in the
   * database has sent its first statements and the work fills the wait for
   * their answer instead of delaying them.
   */
  function takeNext(afterTurn = false): Taken {
    const batch = take();
    if (!afterTurn) return { batch, prepared: prepare(batch) };
    const prepared = new Promise<void>((resolve) => setImmediate(resolve)).then(() => prepare(batch));
    prepared.catch(() => {});
    return { batch, prepared };
  }

  async function commitLoop(): Promise<void> {
    if (committing) return committing;
    if (timer) {
      clearTimeout(timer);
      timer = undefined;
    }
    // Nothing to commit (the batch timer can fire after every waiting message was let go
    // because its connection closed). Without this the loop below would end before
    // `committing` is assigned, and stay assigned for ever: no batch would start again.
    if (pending.length === 0 || stopAbort) return;
    let ended = false;
    const loop = (async () => {
      let next: Taken | undefined = takeNext();
      try {
        while (next && !stopAbort) {
          const current = next;
          next = undefined;
          const done = commitBatch(current);
          // While this batch is in the database, the next full one is made ready (CPU
          // work that would otherwise come between two transactions).
          if (!stopped && pendingWeight >= batchSamples) next = takeNext(true);
          await done;
          releaseRoom();
          // Keep batches full under load: commit again at once only when a full batch waits
          // (or, when draining, anything does).
          if (!next && !stopAbort && (stopped ? pending.length > 0 : pendingWeight >= batchSamples)) next = takeNext();
        }
      } finally {
        // Taken but not written (stopping without draining): left for the broker to deliver again.
        if (next) inFlightWeight -= next.batch.reduce((s, m) => s + weightOf(m), 0);
        ended = true;
        committing = undefined;
        releaseRoom();
        schedule();
      }
    })();
    // The loop always waits for its first batch, so it cannot have ended yet; checked all the same.
    if (!ended) committing = loop;
    return loop;
  }

  return {
    /** Adds a message; resolves at once while there is room, later when the buffer has drained below its limit. */
    add(message: PendingMessage): void {
      counters.messages++;
      counters.samplesIn += message.samples.count;
      if (message.unknownFields.length > 0) counters.unknownFieldMessages++;
      if (pending.length === 0) firstPendingAt = message.receivedAtMs;
      pending.push(message);
      pendingWeight += weightOf(message);
      schedule();
    },
    /** True while the buffer has room for more. */
    hasRoom: () => held() < bufferSamples,
    /** Resolves when the buffer has room again. */
    room(): Promise<void> {
      if (held() < bufferSamples || stopped) return Promise.resolve();
      return new Promise((resolve) => roomWaiters.push(resolve));
    },
    /** Lets go of pending messages whose connection closed: the broker will deliver them again. */
    releaseDead(): void {
      const before = pending.length;
      const live: PendingMessage[] = [];
      for (const m of pending) {
        if (m.qos > 0 && !m.receipt.alive()) {
          counters.releasedForRedelivery++;
          pendingWeight -= weightOf(m);
        } else live.push(m);
      }
      if (live.length !== before) {
        pending = live;
        releaseRoom();
      }
    },
    state(): BatcherState {
      return {
        counters: { ...counters },
        bufferedSamples: held(),
        bufferLimit: bufferSamples,
        committing: committing !== undefined,
        committingSamples: inFlightWeight,
        database: { ...dbState },
        lastBatch: lastBatch && { ...lastBatch },
      };
    },
    /**
     * Stops. With `drain`, commits what is pending first (for at most
     * `timeoutMs` while the database is out of reach); without, lets it go
     * unacknowledged for the broker to deliver again.
     */
    async stop({ drain, timeoutMs = 10_000 }: { drain: boolean; timeoutMs?: number }): Promise<void> {
      stopped = true;
      if (timer) {
        clearTimeout(timer);
        timer = undefined;
      }
      const waiters = roomWaiters;
      roomWaiters = [];
      for (const w of waiters) w();
      if (!drain) {
        stopAbort = true;
        pending = [];
        pendingWeight = 0;
        return;
      }
      const deadline = now() + timeoutMs;
      const drained = (async () => {
        while (pending.length > 0 || committing) {
          await (committing ?? commitLoop());
          if (stopAbort) return;
        }
      })();
      let timeout: NodeJS.Timeout | undefined;
      await Promise.race([
        drained,
        new Promise<void>((resolve) => {
          timeout = setTimeout(() => {
            stopAbort = true;
            log.warn('stopping with messages not committed; the broker will deliver them again', { bufferedSamples: held() });
            resolve();
          }, Math.max(0, deadline - now()));
        }),
      ]);
      if (timeout) clearTimeout(timeout);
      await Promise.race([committing, sleep(1000)]);
    },
  };
}

export type Batcher = ReturnType<typeof createBatcher>;
