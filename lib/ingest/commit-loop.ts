/**
 * When batches are taken and committed: one batch in the database at a
 * time; a full batch at once, a partial one `batchMs` after its first
 * message. While one batch is in the database the next full one is made
 * ready, so that the CPU work does not come between two transactions.
 */
import type { Logger } from '@/lib/log/logger';
import type { BatchQueue, PendingMessage } from './batch-queue';

export interface CommitLoopOptions<P> {
  queue: BatchQueue;
  /** A partial batch closes this long after its first message, ms. */
  batchMs: number;
  now: () => number;
  log: Logger;
  /** Starts making a batch ready for `commit`; must not reject unhandled. */
  prepare(batch: PendingMessage[]): Promise<P>;
  /** Commits a batch (never rejects: refusals are handled inside). */
  commit(batch: PendingMessage[], prepared?: Promise<P>): Promise<void>;
  /** Called after each batch and when the loop ends: room may have been made. */
  afterBatch(): void;
}

/** A batch taken from the queue and its preparation (started when taken). */
interface Taken<P> {
  batch: PendingMessage[];
  weight: number;
  prepared?: Promise<P>;
}

const sleep = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms));

/** Takes batches from the queue and commits them one at a time (see the module comment). */
export class CommitLoop<P> {
  /** Weight of the batches taken and not yet done. */
  inFlightWeight = 0;
  private timer: NodeJS.Timeout | undefined;
  private running: Promise<void> | undefined;
  private stopped = false;
  /** Set when stopping without (or no longer) draining: no more commits start. */
  private abortedNow = false;

  constructor(private readonly options: CommitLoopOptions<P>) {}

  /** Samples held: waiting for a batch or in one taken. */
  get held(): number {
    return this.options.queue.weight + this.inFlightWeight;
  }

  /** True while a batch is being committed. */
  get committing(): boolean {
    return this.running !== undefined;
  }

  /** True once stopping without (or no longer) draining. */
  get aborted(): boolean {
    return this.abortedNow;
  }

  /** After a message arrived or a run ended: commits a full batch now, or sets the timer of a partial one. */
  schedule(): void {
    const { queue, batchMs, now } = this.options;
    if (this.stopped || this.running) return;
    if (queue.full) {
      void this.run();
      return;
    }
    if (queue.length > 0 && !this.timer) {
      const wait = Math.max(0, queue.firstAtMs + batchMs - now());
      this.timer = setTimeout(() => {
        this.timer = undefined;
        void this.run();
      }, wait);
    }
  }

  /** Commits batches until none is due; resolves when the run ends (at once when one is already under way, with it). */
  async run(): Promise<void> {
    if (this.running) return this.running;
    this.clearTimer();
    // Nothing to commit (the batch timer can fire after every waiting message was let go
    // because its connection closed). Without this the loop below would end before
    // `running` is assigned, and stay assigned for ever: no batch would start again.
    if (this.options.queue.length === 0 || this.abortedNow) return;
    const run = { ended: false };
    const loop = this.commitWhileDue(run);
    // The loop always waits for its first batch, so it cannot have ended yet; checked all the same.
    if (!run.ended) this.running = loop;
    return loop;
  }

  /** The run itself: batch after batch while one is due; `run.ended` is set as it ends. */
  private async commitWhileDue(run: { ended: boolean }): Promise<void> {
    const { queue, afterBatch } = this.options;
    let next: Taken<P> | undefined = this.takeNext();
    try {
      while (next && !this.abortedNow) {
        const current = next;
        next = undefined;
        const done = this.commitTaken(current);
        // While this batch is in the database, the next full one is made ready (CPU
        // work that would otherwise come between two transactions).
        if (!this.stopped && queue.full) next = this.takeNext(true);
        await done;
        afterBatch();
        // Keep batches full under load: commit again at once only when a full batch waits
        // (or, when draining, anything does).
        if (!next && !this.abortedNow && (this.stopped ? queue.length > 0 : queue.full)) next = this.takeNext();
      }
    } finally {
      // Taken but not written (stopping without draining): left for the broker to deliver again.
      if (next) this.inFlightWeight -= next.weight;
      run.ended = true;
      this.running = undefined;
      afterBatch();
      this.schedule();
    }
  }

  private async commitTaken({ batch, weight, prepared }: Taken<P>): Promise<void> {
    try {
      await this.options.commit(batch, prepared);
    } finally {
      this.inFlightWeight -= weight;
    }
  }

  /**
   * Takes the next batch and starts making it ready: at once, or, with
   * `afterTurn`, once the event loop has turned, so that the batch in the
   * database has sent its first statements and the work fills the wait for
   * their answer instead of delaying them.
   */
  private takeNext(afterTurn = false): Taken<P> {
    const { batch, weight } = this.options.queue.take();
    this.inFlightWeight += weight;
    if (!afterTurn) return { batch, weight, prepared: this.options.prepare(batch) };
    const prepared = new Promise<void>((resolve) => setImmediate(resolve)).then(() => this.options.prepare(batch));
    prepared.catch(() => {});
    return { batch, weight, prepared };
  }

  /** No batch is started by the timer or by arrivals from now on; {@link drain} or {@link abort} next. */
  stop(): void {
    this.stopped = true;
    this.clearTimer();
  }

  /** No commit starts from now on; the batch in the database finishes. */
  abort(): void {
    this.abortedNow = true;
  }

  /**
   * Commits what waits, for at most `timeoutMs`; then aborts, leaving the
   * rest unacknowledged for the broker to deliver again.
   */
  async drain(timeoutMs: number): Promise<void> {
    const { queue, now, log } = this.options;
    const deadline = now() + timeoutMs;
    const drained = (async () => {
      while (queue.length > 0 || this.running) {
        await (this.running ?? this.run());
        if (this.abortedNow) return;
      }
    })();
    let timeout: NodeJS.Timeout | undefined;
    await Promise.race([
      drained,
      new Promise<void>((resolve) => {
        timeout = setTimeout(() => {
          this.abortedNow = true;
          log.warn('stopping with messages not committed; the broker will deliver them again', { bufferedSamples: this.held });
          resolve();
        }, Math.max(0, deadline - now()));
      }),
    ]);
    if (timeout) clearTimeout(timeout);
    await Promise.race([this.running, sleep(1000)]);
  }

  private clearTimer(): void {
    if (!this.timer) return;
    clearTimeout(this.timer);
    this.timer = undefined;
  }
}
