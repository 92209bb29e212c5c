import { describe, expect, it } from 'vitest';
import { keTrend, type KeHistoryPoint } from './trend';
import { seededNormal, seededRandom } from '@/test/support/synthetic-unit';

const DAY = 86_400_000;
const T0 = Date.UTC(2026, 0, 1);

/**
 * Hourly diagnoses over `days` days declining `pctPerMonth` % of nameplate a
 * 30-day month from 1.000, with day-to-day noise `sigma` (temperature and
 * load errors move a whole day) and a third of it hour to hour.
 */
function history(days: number, pctPerMonth: number, sigma: number, seed: number): KeHistoryPoint[] {
  const normal = seededNormal(seededRandom(seed));
  const out: KeHistoryPoint[] = [];
  for (let d = 0; d < days; d++) {
    const dayNoise = sigma * normal();
    for (let h = 0; h < 24; h++) {
      const t = d + h / 24;
      out.push({ tsMs: T0 + t * DAY, keRatio: 1 - (pctPerMonth / 100) * (t / 30) + dayNoise + 0.3 * sigma * normal() });
    }
  }
  return out;
}

const until = (h: readonly KeHistoryPoint[], day: number) => h.filter((p) => p.tsMs < T0 + day * DAY);

describe('keTrend', () => {
  // 1 % a month from 1.000 crosses 0.95 after 150 days.
  const TRUE_CROSSING_DAY = 150;

  for (const seed of [1, 2, 3, 4, 5]) {
    it(`detects a 1 %-a-month decline within a month, months before it crosses 0.95 (seed ${seed})`, () => {
      const full = history(200, 1, 0.003, seed);
      let detectedDay: number | undefined;
      for (let day = 10; day <= 60 && detectedDay === undefined; day++) {
        if (keTrend(until(full, day)).status === 'declining') detectedDay = day;
      }
      expect(detectedDay).toBeDefined();
      expect(detectedDay!).toBeLessThanOrEqual(30);
      // When detected, the unit is still well inside its limits: no single diagnosis would alarm.
      const level = keTrend(until(full, detectedDay!)).level!;
      expect(level).toBeGreaterThan(0.98);
      // Two months in, the projected crossing is within ±25 days of the truth.
      const at60 = keTrend(until(full, 60));
      expect(at60.status).toBe('declining');
      expect(at60.slopePctPerMonth!).toBeCloseTo(-1, 0);
      expect(Math.abs((at60.crossingMs! - T0) / DAY - TRUE_CROSSING_DAY)).toBeLessThan(25);
      expect(at60.crossingEarliestMs!).toBeLessThanOrEqual(at60.crossingMs!);
    });

    it(`stays stable on a healthy unit with the same noise (seed ${seed})`, () => {
      const full = history(200, 0, 0.003, seed + 100);
      for (const day of [15, 30, 60, 90, 120, 200]) {
        const t = keTrend(until(full, day));
        expect(t.status, `day ${day}`).toBe('stable');
        expect(t.crossingMs).toBeUndefined();
      }
    });
  }

  it('says below-threshold once the level is under it', () => {
    const t = keTrend(history(60, 0, 0.002, 9).map((p) => ({ ...p, keRatio: p.keRatio! - 0.08 })));
    expect(t.status).toBe('below-threshold');
    expect(t.crossingMs).toBeUndefined();
  });

  it('needs ten days, ignores null ratios and any order', () => {
    expect(keTrend(history(9, 1, 0.003, 1)).status).toBe('insufficient');
    expect(keTrend([]).days).toBe(0);
    const h = history(60, 1, 0.003, 2);
    const withNulls = h.flatMap((p, i) => (i % 5 === 0 ? [p, { tsMs: p.tsMs + 1, keRatio: null }] : [p]));
    const reversed = [...withNulls].reverse();
    expect(keTrend(reversed)).toEqual(keTrend(h));
  });

  it('is not thrown off by a few wild days', () => {
    const h = history(90, 1, 0.003, 3).map((p) => {
      const day = Math.floor((p.tsMs - T0) / DAY);
      return day % 17 === 5 ? { ...p, keRatio: 0.7 } : p;
    });
    const t = keTrend(h);
    expect(t.slopePctPerMonth!).toBeCloseTo(-1, 0);
    expect(t.status).toBe('declining');
  });

  it('names a bad option', () => {
    expect(() => keTrend([], { thresholdRatio: 0 })).toThrow(/thresholdRatio.*0/);
    expect(() => keTrend([], { minDays: 2 })).toThrow(/minDays.*2/);
  });
});
