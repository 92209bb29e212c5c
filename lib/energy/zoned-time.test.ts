import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { epochMsOfWallClock, utcOffsetMs, wallClockMs } from './zoned-time';

const H = 3_600_000;

describe('wallClockMs and utcOffsetMs', () => {
  it('reads local time in a zone, across a change of offset', () => {
    expect(wallClockMs(Date.UTC(2026, 2, 29, 0, 59, 59), 'Europe/Oslo')).toBe(Date.UTC(2026, 2, 29, 1, 59, 59));
    expect(wallClockMs(Date.UTC(2026, 2, 29, 1, 0, 0), 'Europe/Oslo')).toBe(Date.UTC(2026, 2, 29, 3, 0, 0));
    expect(utcOffsetMs(Date.UTC(2026, 0, 15), 'America/New_York')).toBe(-5 * H);
    expect(utcOffsetMs(Date.UTC(2026, 6, 15), 'Asia/Kathmandu')).toBe(5.75 * H);
  });

  it('keeps milliseconds and treats UTC as identity', () => {
    expect(wallClockMs(Date.UTC(2026, 0, 1, 0, 0, 0, 123), 'Europe/Oslo')).toBe(Date.UTC(2026, 0, 1, 1, 0, 0, 123));
    expect(wallClockMs(42, 'UTC')).toBe(42);
  });

  it('throws RangeError for an unknown zone or a non-finite time', () => {
    expect(() => wallClockMs(0, 'Mars/Olympus')).toThrow(/Mars\/Olympus/);
    expect(() => wallClockMs(Number.NaN, 'Europe/Oslo')).toThrow(RangeError);
    expect(() => epochMsOfWallClock(Number.POSITIVE_INFINITY, 'Europe/Oslo')).toThrow(RangeError);
  });
});

describe('epochMsOfWallClock', () => {
  it('inverts wallClockMs for an ordinary time', () => {
    expect(epochMsOfWallClock(Date.UTC(2026, 6, 1, 12), 'Europe/Oslo')).toBe(Date.UTC(2026, 6, 1, 10));
  });

  it('moves a skipped time forward by the jump', () => {
    // 02:30 does not exist in Oslo on 29 March 2026; read at +01:00 it is 01:30 UTC (03:30 CEST).
    expect(epochMsOfWallClock(Date.UTC(2026, 2, 29, 2, 30), 'Europe/Oslo')).toBe(Date.UTC(2026, 2, 29, 1, 30));
  });

  it('takes the earlier of a time shown twice', () => {
    expect(epochMsOfWallClock(Date.UTC(2026, 9, 25, 2, 30), 'Europe/Oslo')).toBe(Date.UTC(2026, 9, 25, 0, 30));
  });

  it('gives the instant of the jump for a skipped midnight', () => {
    // São Paulo began summer time at local midnight on 4 November 2018 (clock 00:00 -> 01:00, -03:00 -> -02:00).
    expect(epochMsOfWallClock(Date.UTC(2018, 10, 4), 'America/Sao_Paulo')).toBe(Date.UTC(2018, 10, 4, 3));
  });

  it('round-trips every instant whose wall time is shown once', () => {
    const zones = ['Europe/Oslo', 'America/New_York', 'Australia/Lord_Howe', 'Asia/Kathmandu', 'Pacific/Chatham', 'UTC'];
    fc.assert(
      fc.property(fc.integer({ min: Date.UTC(2000, 0, 1), max: Date.UTC(2040, 0, 1) }), fc.constantFrom(...zones), (t, zone) => {
        const wall = wallClockMs(t, zone);
        const back = epochMsOfWallClock(wall, zone);
        // Either the same instant, or the earlier showing of a repeated wall time.
        expect(wallClockMs(back, zone)).toBe(wall);
        expect(back).toBeLessThanOrEqual(t);
        expect(t - back).toBeLessThanOrEqual(H);
      }),
    );
  });
});
