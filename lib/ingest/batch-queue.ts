/**
 * The messages waiting for a batch, in arrival order, with the samples they
 * weigh. A batch is taken from the front, up to `batchSamples` of weight.
 */
import type { Receipt } from './connections';
import type { DecodedMessage } from './writer';

/** A decoded message waiting for its batch, with the means to acknowledge it. */
export interface PendingMessage extends DecodedMessage {
  /** QoS of the delivery (0 needs no acknowledgement and is never redelivered). */
  qos: number;
  /** Acknowledges it on the connection it came on; `alive()` is false once that closed (the broker will deliver it again). */
  receipt: Receipt;
}

/**
 * What a message counts for against the batch size and the buffer: its
 * samples and quarantined entries, and at least 1 (a presence message or a
 * bad topic still costs a row).
 */
export function weightOf(m: DecodedMessage): number {
  return Math.max(1, m.samples.count + m.quarantined.length);
}

/** True when the broker will deliver `m` again: it needed an acknowledgement and its connection closed. */
export function awaitsRedelivery(m: PendingMessage): boolean {
  return m.qos > 0 && !m.receipt.alive();
}

/** A batch taken from the queue, and the weight it took. */
export interface TakenMessages {
  batch: PendingMessage[];
  weight: number;
}

/** The messages waiting for a batch (see the module comment). */
export class BatchQueue {
  private messages: PendingMessage[] = [];
  /** Weight of the messages waiting. */
  weight = 0;
  /** Receipt time of the oldest message waiting, epoch ms (0 when none was waiting). */
  firstAtMs = 0;

  constructor(private readonly batchSamples: number) {}

  /** Messages waiting. */
  get length(): number {
    return this.messages.length;
  }

  /** True when at least a full batch waits. */
  get full(): boolean {
    return this.weight >= this.batchSamples;
  }

  push(message: PendingMessage): void {
    if (this.messages.length === 0) this.firstAtMs = message.receivedAtMs;
    this.messages.push(message);
    this.weight += weightOf(message);
  }

  /** Takes messages from the front up to `batchSamples` of weight; always at least one while any waits. */
  take(): TakenMessages {
    const pending = this.messages;
    let weight = 0;
    let n = 0;
    while (n < pending.length && (n === 0 || weight + weightOf(pending[n]!) <= this.batchSamples)) weight += weightOf(pending[n++]!);
    const batch = pending.slice(0, n);
    this.messages = pending.slice(n);
    this.weight -= weight;
    this.firstAtMs = this.messages[0]?.receivedAtMs ?? 0;
    return { batch, weight };
  }

  /**
   * Lets go of the messages the broker will deliver again (see
   * {@link awaitsRedelivery}); returns how many. `firstAtMs` stays: the batch
   * timer already running keeps its time.
   */
  releaseDead(): number {
    const live: PendingMessage[] = [];
    let released = 0;
    for (const m of this.messages) {
      if (awaitsRedelivery(m)) {
        released++;
        this.weight -= weightOf(m);
      } else live.push(m);
    }
    if (released > 0) this.messages = live;
    return released;
  }

  /** Lets go of everything waiting (stopping without draining). */
  clear(): void {
    this.messages = [];
    this.weight = 0;
  }
}
