import { describe, expect, it } from 'vitest';
import { faultEffects, liveOutage, validateFaultPlan, type FaultPlan } from './faults';

const DAY = 86_400_000;
const epochMs = Date.UTC(2026, 2, 1);

describe('faultEffects', () => {
  it('has no effect without plans', () => {
    const e = faultEffects([], epochMs + DAY, { epochMs });
    expect(e).toEqual({
      fluxFactor: 1,
      phaseEmfFactors: [1, 1, 1],
      extraHeatingKAtRated: 0,
      speedReadingFactor: 1,
      overspeedGust: undefined,
      inHistoryGap: false,
    });
  });

  it('loses flux linearly from the onset at the plan rate, then stops at the floor', () => {
    const plan: FaultPlan = { kind: 'demagnetisation', onsetDays: 1, pctPerDay: 1, floorFraction: 0.9 };
    expect(faultEffects([plan], epochMs + 0.5 * DAY, { epochMs }).fluxFactor).toBe(1);
    expect(faultEffects([plan], epochMs + 3 * DAY, { epochMs }).fluxFactor).toBeCloseTo(0.98, 12);
    expect(faultEffects([plan], epochMs + 30 * DAY, { epochMs }).fluxFactor).toBe(0.9);
  });

  it('takes the run-wide rate over the plan rate (compressed demo time)', () => {
    const plan: FaultPlan = { kind: 'demagnetisation', onsetDays: 0, pctPerDay: 1, floorFraction: 0.5 };
    expect(faultEffects([plan], epochMs + DAY / 4, { epochMs, demagPctPerDay: 20 }).fluxFactor).toBeCloseTo(0.95, 12);
  });

  it('grows a shorted turn in its own phase over the develop time', () => {
    const plan: FaultPlan = { kind: 'shorted-turn', onsetDays: 2, phase: 'c', emfLossPct: 8, developHours: 6, extraHeatingK: 6 };
    expect(faultEffects([plan], epochMs + 2 * DAY - 1, { epochMs }).phaseEmfFactors).toEqual([1, 1, 1]);
    const half = faultEffects([plan], epochMs + 2 * DAY + 3 * 3_600_000, { epochMs });
    expect(half.phaseEmfFactors[2]).toBeCloseTo(0.96, 12);
    expect(half.extraHeatingKAtRated).toBeCloseTo(3, 12);
    const grown = faultEffects([plan], epochMs + 3 * DAY, { epochMs });
    expect(grown.phaseEmfFactors).toEqual([1, 1, 0.92]);
  });

  it('reads speed low from the onset only', () => {
    const plan: FaultPlan = { kind: 'speed-sensor-low', onsetDays: 5, readsLowPct: 5 };
    expect(faultEffects([plan], epochMs + 4.9 * DAY, { epochMs }).speedReadingFactor).toBe(1);
    expect(faultEffects([plan], epochMs + 5 * DAY, { epochMs }).speedReadingFactor).toBeCloseTo(0.95, 12);
  });

  it('blows overspeed gusts for their duration at each period', () => {
    const plan: FaultPlan = { kind: 'overspeed', everyS: 1800, durationS: 30, gustOverRatedWind: 1.45 };
    expect(faultEffects([plan], epochMs + 10_000, { epochMs }).overspeedGust).toBe(1.45);
    expect(faultEffects([plan], epochMs + 31_000, { epochMs }).overspeedGust).toBeUndefined();
    expect(faultEffects([plan], epochMs + 1_800_000 * 7 + 29_000, { epochMs }).overspeedGust).toBe(1.45);
    expect(faultEffects([plan], epochMs + 600_000 + 5_000, { epochMs, overspeedEveryS: 600 }).overspeedGust).toBe(1.45);
  });

  it('marks the history gap of an offline unit', () => {
    const plan: FaultPlan = { kind: 'offline', afterS: 240, forS: 1200, gapStartDays: 1, gapHours: 2 };
    expect(faultEffects([plan], epochMs + DAY - 1, { epochMs }).inHistoryGap).toBe(false);
    expect(faultEffects([plan], epochMs + DAY + 3_600_000, { epochMs }).inHistoryGap).toBe(true);
    expect(faultEffects([plan], epochMs + DAY + 2 * 3_600_000, { epochMs }).inHistoryGap).toBe(false);
  });
});

describe('liveOutage', () => {
  const plan: FaultPlan = { kind: 'offline', afterS: 240, forS: 1200, gapStartDays: 1, gapHours: 2 };
  it('comes from the plan unless the settings say otherwise', () => {
    expect(liveOutage([plan], { epochMs })).toEqual({ afterS: 240, forS: 1200 });
    expect(liveOutage([plan], { epochMs, offlineAfterS: 1, offlineForS: null })).toEqual({ afterS: 1, forS: null });
    expect(liveOutage([], { epochMs })).toBeUndefined();
  });
});

describe('validateFaultPlan', () => {
  it('names the number out of range', () => {
    expect(() => validateFaultPlan({ kind: 'demagnetisation', onsetDays: 0, pctPerDay: -1, floorFraction: 0.8 })).toThrow(/pctPerDay.*-1/);
    expect(() => validateFaultPlan({ kind: 'shorted-turn', onsetDays: 0, phase: 'a', emfLossPct: 60, developHours: 1, extraHeatingK: 1 })).toThrow(
      /emfLossPct.*60/,
    );
    expect(() => validateFaultPlan({ kind: 'overspeed', everyS: 10, durationS: 30, gustOverRatedWind: 1.4 })).toThrow(/everyS.*10/);
  });
});
