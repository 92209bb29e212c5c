/**
 * The retry schedule on its own: exponential backoff from the first wait,
 * capped, never past the give-up deadline. The Standard Webhooks
 * specification leaves the schedule to the sender and asks for exponential
 * backoff; the figures (5 s doubling to 10 min, 24 h) are ours, common
 * practice for webhook senders, not from a published source.
 */
import { describe, expect, it } from 'vitest';
import { DEFAULT_RETRY_POLICY, WEBHOOK_FIRST_RETRY_MS, WEBHOOK_GIVE_UP_AFTER_MS, WEBHOOK_MAX_RETRY_MS, retryAt } from './deliver';

describe('retryAt', () => {
  it('doubles the wait from 5 s and caps it at 10 minutes', () => {
    const waits = [1, 2, 3, 4, 5, 6, 7, 8, 9, 60].map((attempts) => retryAt({ attempts, createdAtMs: 0, nowMs: 1_000, policy: DEFAULT_RETRY_POLICY })! - 1_000);
    expect(waits).toEqual([5_000, 10_000, 20_000, 40_000, 80_000, 160_000, 320_000, 600_000, 600_000, 600_000]);
    expect(WEBHOOK_FIRST_RETRY_MS).toBe(5_000);
    expect(WEBHOOK_MAX_RETRY_MS).toBe(600_000);
  });

  it('never schedules past 24 h after queueing, and gives up at that age', () => {
    expect(WEBHOOK_GIVE_UP_AFTER_MS).toBe(86_400_000);
    const deadline = 1_000 + WEBHOOK_GIVE_UP_AFTER_MS;
    expect(retryAt({ attempts: 30, createdAtMs: 1_000, nowMs: deadline - 1 })).toBe(deadline);
    expect(retryAt({ attempts: 30, createdAtMs: 1_000, nowMs: deadline - 600_001 })).toBe(deadline - 1);
    expect(retryAt({ attempts: 30, createdAtMs: 1_000, nowMs: deadline })).toBeUndefined();
    expect(retryAt({ attempts: 1, createdAtMs: 1_000, nowMs: deadline + 5 })).toBeUndefined();
  });

  it('takes a shorter policy, and refuses an attempt count below one, naming it', () => {
    const policy = { firstMs: 50, maxMs: 120, giveUpAfterMs: 1_000 };
    expect([1, 2, 3].map((attempts) => retryAt({ attempts, createdAtMs: 0, nowMs: 0, policy }))).toEqual([50, 100, 120]);
    expect(() => retryAt({ attempts: 0, createdAtMs: 0, nowMs: 0 })).toThrow(new RangeError('attempts: expected a whole number from 1, got 0'));
  });
});
