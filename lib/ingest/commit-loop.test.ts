import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createLogger } from '@/lib/log/logger';
import { decodedMessage } from '@/test/support/ingest';
import { BatchQueue, type PendingMessage } from './batch-queue';
import { CommitLoop } from './commit-loop';

const T0 = 1_767_225_600_000;

/** A QoS 1 message of `samples` samples (its weight), received now, on a connection open while `alive()`. */
function message(samples: number, alive = () => true): PendingMessage {
  const decoded = decodedMessage({ siteId: 'karrow-fell', id: 'wt-01' }, Array.from({ length: samples }, (_, i) => ({ ts: T0 + i * 1000, rpm: 250, vab: 230 })));
  return { ...decoded, qos: 1, receipt: { ack: () => {}, alive } };
}

/** A loop over a fake database: each commit waits until the test calls its `done`. */
function harness({ batchSamples = 10, batchMs = 50 } = {}) {
  const queue = new BatchQueue(batchSamples);
  const commits: Array<{ batch: PendingMessage[]; prepared?: Promise<number>; done: () => void }> = [];
  const prepared: PendingMessage[][] = [];
  const lines: string[] = [];
  let afterBatch = 0;
  const loop = new CommitLoop<number>({
    queue,
    batchMs,
    now: () => Date.now(),
    log: createLogger('ingest', 'debug', (line) => lines.push(line)),
    prepare: async (batch) => prepared.push(batch),
    commit: (batch, ready) => new Promise<void>((done) => commits.push({ batch, prepared: ready, done })),
    afterBatch: () => afterBatch++,
  });
  const add = (m: PendingMessage) => {
    queue.push(m);
    loop.schedule();
  };
  /** Ends the commit under way and lets the loop go on. */
  const finish = async (k: number) => {
    commits[k]!.done();
    await vi.advanceTimersByTimeAsync(0);
  };
  return { queue, loop, commits, prepared, lines, add, finish, afterBatches: () => afterBatch };
}

describe('CommitLoop', () => {
  beforeEach(() => {
    vi.useFakeTimers({ now: T0 });
  });
  afterEach(() => {
    vi.useRealTimers();
  });

  it('commits a full batch at once, without waiting batchMs', () => {
    const { add, commits, loop } = harness({ batchSamples: 10, batchMs: 60_000 });
    add(message(10));
    expect(commits).toHaveLength(1);
    expect(loop.committing).toBe(true);
  });

  it('commits a partial batch batchMs after its first message', async () => {
    const { add, commits } = harness({ batchSamples: 10, batchMs: 50 });
    add(message(3));
    await vi.advanceTimersByTimeAsync(20);
    add(message(3));
    await vi.advanceTimersByTimeAsync(29);
    expect(commits).toHaveLength(0);
    await vi.advanceTimersByTimeAsync(1);
    expect(commits).toHaveLength(1);
    expect(commits[0]!.batch).toHaveLength(2);
  });

  it('has one batch in the database at a time, and makes the next full one ready meanwhile', async () => {
    const { queue, commits, prepared, finish, loop } = harness({ batchSamples: 10 });
    for (let i = 0; i < 3; i++) queue.push(message(10));
    loop.schedule();
    expect(commits).toHaveLength(1);
    await vi.advanceTimersByTimeAsync(0); // one turn of the event loop: the next batch is made ready
    expect(prepared).toHaveLength(2);
    expect(commits).toHaveLength(1);
    expect(loop.inFlightWeight).toBe(20);
    await finish(0);
    expect(commits).toHaveLength(2);
    expect(await commits[1]!.prepared).toBe(2); // the one made ready while the first was in the database
  });

  it('keeps a partial batch waiting for its timer while committing under load (batches stay full)', async () => {
    const { add, commits, finish, loop } = harness({ batchSamples: 10, batchMs: 50 });
    add(message(10));
    add(message(4));
    await finish(0);
    expect(commits).toHaveLength(1);
    expect(loop.committing).toBe(false);
    await vi.advanceTimersByTimeAsync(50);
    expect(commits).toHaveLength(2);
  });

  it('tells after each batch and when a run ends that room may have been made', async () => {
    const { add, finish, afterBatches } = harness({ batchSamples: 10 });
    add(message(10));
    await finish(0);
    expect(afterBatches()).toBe(2);
  });

  it('stays able to commit after its timer fired with every waiting message let go (the stall of the no-loss test)', async () => {
    const { add, commits, queue, loop } = harness({ batchSamples: 1000, batchMs: 50 });
    let open = true;
    add(message(10, () => open));
    open = false;
    queue.releaseDead();
    await vi.advanceTimersByTimeAsync(150); // past batchMs: the timer has fired on an empty queue
    expect(loop.committing).toBe(false);
    add(message(10));
    await vi.advanceTimersByTimeAsync(50);
    expect(commits).toHaveLength(1);
  });

  it('stopped without draining: the batch in the database finishes, none starts after, and nothing is held', async () => {
    const { add, commits, finish, queue, loop } = harness({ batchSamples: 10 });
    add(message(10));
    add(message(10));
    add(message(10));
    await vi.advanceTimersByTimeAsync(0);
    loop.stop();
    loop.abort();
    queue.clear();
    await finish(0);
    expect(commits).toHaveLength(1);
    expect(loop.committing).toBe(false);
    expect(loop.held).toBe(0);
    add(message(10));
    expect(commits).toHaveLength(1);
  });

  it('drains what waits at once when stopping, a partial batch included', async () => {
    const { add, commits, loop } = harness({ batchSamples: 10, batchMs: 60_000 });
    add(message(3));
    loop.stop();
    const drained = loop.drain(10_000);
    await vi.advanceTimersByTimeAsync(0);
    expect(commits).toHaveLength(1);
    commits[0]!.done();
    await drained;
    expect(loop.committing).toBe(false);
    expect(loop.aborted).toBe(false);
  });

  it('gives up draining after timeoutMs when the database does not answer, and says what is left', async () => {
    const { add, loop, lines } = harness({ batchSamples: 10 });
    add(message(10));
    add(message(4));
    loop.stop();
    const drained = loop.drain(2000);
    await vi.advanceTimersByTimeAsync(2000);
    expect(loop.aborted).toBe(true);
    await vi.advanceTimersByTimeAsync(1000); // the last wait for the batch in the database
    await drained;
    const warned = lines.map((l) => JSON.parse(l) as { msg: string; bufferedSamples?: number }).find((l) => l.msg.startsWith('stopping with messages'));
    expect(warned?.bufferedSamples).toBe(14);
  });
});
