import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { dayBuckets, fixedBuckets, monthBuckets, monthHours, monthStartMs } from './calendar-buckets';

const H = 3_600_000;

describe('monthStartMs and monthHours', () => {
  it('starts UTC months at midnight UTC and counts their hours', () => {
    expect(monthStartMs(2026, 3)).toBe(Date.UTC(2026, 2, 1));
    expect(monthHours(2026, 2)).toBe(672);
    expect(monthHours(2024, 2)).toBe(696);
    expect(monthHours(2026, 12)).toBe(744);
  });

  it('starts zoned months at local midnight and rolls months over', () => {
    expect(monthStartMs(2026, 4, 'Europe/Oslo')).toBe(Date.UTC(2026, 2, 31, 22));
    expect(monthStartMs(2026, 13, 'Europe/Oslo')).toBe(monthStartMs(2027, 1, 'Europe/Oslo'));
    expect(monthStartMs(2026, 0)).toBe(Date.UTC(2025, 11, 1));
    expect(monthStartMs(50, 1)).toBe(new Date(0).setUTCFullYear(50, 0, 1));
  });

  it('throws RangeError for non-integer months', () => {
    expect(() => monthStartMs(2026, 1.5)).toThrow(RangeError);
  });
});

describe('monthBuckets', () => {
  it('lists every month from the first to the last instant', () => {
    const b = monthBuckets(Date.UTC(2025, 11, 31, 23, 59), Date.UTC(2026, 2, 1));
    expect(b.labels).toEqual(['2025-12', '2026-01', '2026-02', '2026-03']);
    expect(b.edgesMs).toEqual([Date.UTC(2025, 11, 1), Date.UTC(2026, 0, 1), Date.UTC(2026, 1, 1), Date.UTC(2026, 2, 1), Date.UTC(2026, 3, 1)]);
  });

  it('labels months by local date in a zone', () => {
    // 23:30 UTC on 31 January is already 1 February in Oslo.
    const b = monthBuckets(Date.UTC(2026, 0, 31, 23, 30), Date.UTC(2026, 0, 31, 23, 30), 'Europe/Oslo');
    expect(b.labels).toEqual(['2026-02']);
  });

  it('holds every instant of the range in one of its buckets', () => {
    const zones = ['UTC', 'Europe/Oslo', 'America/Santiago', 'Asia/Tehran', 'Australia/Lord_Howe'];
    fc.assert(
      fc.property(
        fc.integer({ min: Date.UTC(2001, 0, 1), max: Date.UTC(2038, 0, 1) }),
        fc.integer({ min: 0, max: 400 * 24 * H }),
        fc.constantFrom(...zones),
        (from, span, zone) => {
          const { edgesMs, labels } = monthBuckets(from, from + span, zone);
          expect(edgesMs.length).toBe(labels.length + 1);
          expect(edgesMs[0]).toBeLessThanOrEqual(from);
          expect(edgesMs[1]).toBeGreaterThan(from);
          expect(edgesMs[edgesMs.length - 2]).toBeLessThanOrEqual(from + span);
          expect(edgesMs[edgesMs.length - 1]).toBeGreaterThan(from + span);
          for (let k = 1; k < edgesMs.length; k++) {
            const hours = ((edgesMs[k] as number) - (edgesMs[k - 1] as number)) / H;
            expect(hours).toBeGreaterThanOrEqual(27 * 24);
            expect(hours).toBeLessThanOrEqual(31 * 24 + 1);
          }
        },
      ),
    );
  });
});

describe('dayBuckets', () => {
  it('makes a 23-hour day where summer time begins', () => {
    const b = dayBuckets(Date.UTC(2026, 2, 28, 12), Date.UTC(2026, 2, 29, 12), 'Europe/Oslo');
    expect(b.labels).toEqual(['2026-03-28', '2026-03-29']);
    expect(((b.edgesMs[2] as number) - (b.edgesMs[1] as number)) / H).toBe(23);
  });

  it('drops a date the zone skipped', () => {
    // Samoa moved across the date line and had no 30 December 2011.
    const b = dayBuckets(Date.UTC(2011, 11, 29, 12), Date.UTC(2011, 11, 31, 12), 'Pacific/Apia');
    expect(b.labels).toEqual(['2011-12-29', '2011-12-31', '2012-01-01']);
    for (let k = 1; k < b.edgesMs.length; k++) expect(b.edgesMs[k]).toBeGreaterThan(b.edgesMs[k - 1] as number);
  });
});

describe('fixedBuckets', () => {
  it('aligns 10-minute buckets to the clock', () => {
    const b = fixedBuckets(Date.UTC(2026, 0, 1, 0, 4), Date.UTC(2026, 0, 1, 0, 20), 600_000);
    expect(b.labels).toEqual(['2026-01-01T00:00:00.000Z', '2026-01-01T00:10:00.000Z', '2026-01-01T00:20:00.000Z']);
    expect(b.edgesMs[3]).toBe(Date.UTC(2026, 0, 1, 0, 30));
  });

  it('throws RangeError for a bad width or range', () => {
    expect(() => fixedBuckets(0, 10, 0)).toThrow(/widthMs/);
    expect(() => fixedBuckets(10, 0, 5)).toThrow(/toMs/);
    expect(() => fixedBuckets(0, 1e15, 1)).toThrow(/buckets/);
  });
});
