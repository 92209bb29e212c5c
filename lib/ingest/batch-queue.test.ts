import { describe, expect, it } from 'vitest';
import { BatchQueue, awaitsRedelivery, weightOf, type PendingMessage } from './batch-queue';
import { decodedMessage } from '@/test/support/ingest';
import { NO_ENTRIES, type QuarantineEntry } from './decode';

const T0 = 1_767_225_600_000;
const unit = { siteId: 'karrow-fell', id: 'wt-01' };

/** A telemetry message of `samples` samples received at `receivedAtMs`, on a connection open while `alive()`. */
function message(
  samples: number,
  receivedAtMs: number,
  { qos = 1, alive = () => true, quarantined = NO_ENTRIES }: { qos?: number; alive?: () => boolean; quarantined?: QuarantineEntry[] } = {},
): PendingMessage {
  const decoded = decodedMessage(unit, Array.from({ length: samples }, (_, i) => ({ ts: T0 + i * 1000, rpm: 250, vab: 230 })));
  return { ...decoded, receivedAtMs, quarantined, qos, receipt: { ack: () => {}, alive } };
}

const entry: QuarantineEntry = { sampleIndex: 0, payload: '{}', payloadBytes: 2, reason: 'ts: missing' };

describe('weightOf', () => {
  it('counts samples and quarantined entries, and at least 1 for a message with neither (presence, bad topic)', () => {
    expect(weightOf(message(10, T0))).toBe(10);
    expect(weightOf(message(3, T0, { quarantined: [entry, entry] }))).toBe(5);
    expect(weightOf(message(0, T0))).toBe(1);
  });
});

describe('awaitsRedelivery', () => {
  it('is true only for a QoS 1 or 2 message whose connection closed (QoS 0 is never delivered again)', () => {
    expect(awaitsRedelivery(message(1, T0, { qos: 1, alive: () => false }))).toBe(true);
    expect(awaitsRedelivery(message(1, T0, { qos: 1, alive: () => true }))).toBe(false);
    expect(awaitsRedelivery(message(1, T0, { qos: 0, alive: () => false }))).toBe(false);
  });
});

describe('BatchQueue', () => {
  it('takes from the front up to batchSamples of weight, never splitting a message', () => {
    const queue = new BatchQueue(25);
    for (let i = 0; i < 4; i++) queue.push(message(10, T0 + i));
    const first = queue.take();
    expect(first.batch.map((m) => m.receivedAtMs)).toEqual([T0, T0 + 1]);
    expect(first.weight).toBe(20);
    expect(queue.weight).toBe(20);
    expect(queue.firstAtMs).toBe(T0 + 2);
  });

  it('takes a message heavier than a whole batch on its own rather than never', () => {
    const queue = new BatchQueue(5);
    queue.push(message(8, T0));
    queue.push(message(1, T0 + 1));
    expect(queue.take()).toMatchObject({ weight: 8 });
    expect(queue.length).toBe(1);
  });

  it('is full from batchSamples of weight on (not only above)', () => {
    const queue = new BatchQueue(20);
    queue.push(message(10, T0));
    expect(queue.full).toBe(false);
    queue.push(message(10, T0));
    expect(queue.full).toBe(true);
  });

  it('keeps the receipt time of the oldest waiting message, and 0 once a take empties it', () => {
    const queue = new BatchQueue(100);
    queue.push(message(1, T0 + 5));
    queue.push(message(1, T0 + 9));
    expect(queue.firstAtMs).toBe(T0 + 5);
    queue.take();
    expect(queue.firstAtMs).toBe(0);
  });

  it('lets go of the messages the broker will deliver again, counting them, and keeps the rest in order', () => {
    const queue = new BatchQueue(100);
    queue.push(message(10, T0, { alive: () => false }));
    queue.push(message(5, T0 + 1));
    queue.push(message(7, T0 + 2, { qos: 0, alive: () => false }));
    expect(queue.releaseDead()).toBe(1);
    expect(queue.weight).toBe(12);
    // The batch timer already running keeps its time: firstAtMs stays that of the message let go.
    expect(queue.firstAtMs).toBe(T0);
    expect(queue.take().batch.map((m) => m.receivedAtMs)).toEqual([T0 + 1, T0 + 2]);
  });

  it('holds nothing after clear', () => {
    const queue = new BatchQueue(100);
    queue.push(message(10, T0));
    queue.clear();
    expect(queue.length).toBe(0);
    expect(queue.weight).toBe(0);
  });
});
