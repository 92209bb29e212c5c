import { describe, expect, it } from 'vitest';
import type { KeTrend } from '@/lib/diagnosis/trend';
import { keProjection, keWindow } from './ke-window';

const DAY = 86_400_000;
const NOW = Date.UTC(2026, 5, 1, 12);

function trend(over: Partial<KeTrend>): KeTrend {
  return {
    status: 'declining',
    days: 40,
    spanDays: 39,
    slopePctPerMonth: -1,
    slopeLowPctPerMonth: -1.5,
    slopeHighPctPerMonth: -0.5,
    level: 0.97,
    ewma: 0.97,
    baseline: 1,
    cusumAlarmMs: undefined,
    thresholdRatio: 0.95,
    crossingMs: NOW + 60 * DAY,
    crossingEarliestMs: NOW + 40 * DAY,
    crossingLatestMs: NOW + 120 * DAY,
    ...over,
  };
}

describe('keProjection', () => {
  it('runs from the last day at the trend’s level to the projected crossing of the alarm line, with the interval’s dates', () => {
    // Contract, section 7 (`ke-trend`: projected to cross the demagnetisation limit) and section 5 (demagnetised below 0.95).
    expect(keProjection(trend({}), NOW - DAY)).toEqual({ fromT: NOW - DAY, level: 0.97, crossT: NOW + 60 * DAY, earliestT: NOW + 40 * DAY, latestT: NOW + 120 * DAY });
    // Contract, section 7: when the slowest rate never crosses, there is no latest date (the key is left out, not undefined).
    expect(Object.keys(keProjection(trend({ crossingLatestMs: undefined }), NOW)!)).toEqual(['fromT', 'level', 'crossT', 'earliestT']);
  });

  it('draws nothing without a projected crossing or without a day to start from', () => {
    // Contract, section 7: only a projected crossing is a `ke-trend`; a stable trend projects none.
    expect(keProjection(trend({ status: 'stable', crossingMs: undefined }), NOW)).toBeUndefined();
    expect(keProjection(trend({}), undefined)).toBeUndefined();
  });
});

describe('keWindow', () => {
  it('shows at least the last 14 days, and all days when there are more', () => {
    expect(keWindow({ firstDayT: undefined, projection: undefined, nowMs: NOW })).toEqual({ fromMs: NOW - 14 * DAY, toMs: NOW });
    expect(keWindow({ firstDayT: NOW - 3 * DAY, projection: undefined, nowMs: NOW }).fromMs).toBe(NOW - 14 * DAY);
    expect(keWindow({ firstDayT: NOW - 90 * DAY, projection: undefined, nowMs: NOW }).fromMs).toBe(NOW - 90 * DAY);
  });

  it('reaches the latest projected crossing, else the crossing, and stops two years ahead', () => {
    // Contract, section 7 (`ke-trend`): the window shows where the projection meets the demagnetisation limit.
    const p = keProjection(trend({}), NOW - DAY)!;
    expect(keWindow({ firstDayT: NOW - 40 * DAY, projection: p, nowMs: NOW }).toMs).toBe(NOW + 120 * DAY);
    const noLatest = keProjection(trend({ crossingLatestMs: undefined }), NOW - DAY)!;
    expect(keWindow({ firstDayT: NOW - 40 * DAY, projection: noLatest, nowMs: NOW }).toMs).toBe(NOW + 60 * DAY);
    const far = keProjection(trend({ crossingMs: NOW + 900 * DAY, crossingLatestMs: NOW + 5000 * DAY }), NOW - DAY)!;
    expect(keWindow({ firstDayT: NOW - 40 * DAY, projection: far, nowMs: NOW }).toMs).toBe(NOW + 730 * DAY);
    // A crossing already behind now (below the line) does not pull the end before now.
    const past = keProjection(trend({ crossingMs: NOW - 5 * DAY, crossingLatestMs: NOW - 2 * DAY }), NOW - DAY)!;
    expect(keWindow({ firstDayT: NOW - 40 * DAY, projection: past, nowMs: NOW }).toMs).toBe(NOW);
  });
});
