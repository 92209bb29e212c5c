/** The repeating background pass: at once, then after the interval, never two at once, and stop waits for the one under way. */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { repeatEvery } from './repeat';

afterEach(() => {
  vi.useRealTimers();
});

describe('repeatEvery', () => {
  it('runs at once, then each interval after the last pass ended, never two at once', async () => {
    vi.useFakeTimers();
    let running = 0;
    let most = 0;
    let runs = 0;
    const stop = repeatEvery(
      () => 1_000,
      async () => {
        runs++;
        running++;
        most = Math.max(most, running);
        await new Promise((r) => setTimeout(r, 300));
        running--;
      },
    );
    expect(runs).toBe(1);
    await vi.advanceTimersByTimeAsync(1_299);
    expect(runs).toBe(1);
    await vi.advanceTimersByTimeAsync(1);
    expect(runs).toBe(2);
    await vi.advanceTimersByTimeAsync(5_000);
    expect(most).toBe(1);
    expect(runs).toBe(5);
    const stopping = stop();
    await vi.advanceTimersByTimeAsync(10_000);
    await stopping;
    expect(runs).toBe(5);
  });

  it('stop waits for the pass under way and starts no other', async () => {
    let release: () => void = () => undefined;
    let runs = 0;
    const stop = repeatEvery(
      () => 0,
      () => {
        runs++;
        return new Promise<void>((r) => (release = r));
      },
    );
    let stopped = false;
    const done = stop().then(() => (stopped = true));
    await Promise.resolve();
    expect(stopped).toBe(false);
    release();
    await done;
    expect(stopped).toBe(true);
    await new Promise((r) => setTimeout(r, 20));
    expect(runs).toBe(1);
  });

  it('takes the elapsed time off the next wait when asked (a pass that took long runs again sooner)', async () => {
    vi.useFakeTimers();
    let runs = 0;
    const stop = repeatEvery(
      (elapsed) => 1_000 - elapsed,
      async () => {
        runs++;
        await new Promise((r) => setTimeout(r, 800));
      },
    );
    await vi.advanceTimersByTimeAsync(999);
    expect(runs).toBe(1);
    await vi.advanceTimersByTimeAsync(1);
    expect(runs).toBe(2);
    const stopping = stop();
    await vi.advanceTimersByTimeAsync(1_000);
    await stopping;
  });
});
