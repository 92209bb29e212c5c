import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  CUT_IN_HYSTERESIS_MS,
  HYDRO_START_FRACTION,
  HYDRO_STOP_FRACTION,
  RESTART_MARGIN_MS,
  RESTART_MS,
  RUNNER_SPEED_LOSS_K,
  SCAN_EVERY_S,
  SCAN_S,
  freeRotorRpm,
  hydroEfficiency,
  hydroRunsAfter,
  scanDepthAt,
  windProtection,
} from './controls';

const running = { stoppedUntilMs: -Infinity, connected: true };
const idle = { stoppedUntilMs: -Infinity, connected: false };
const turbine = { cutInMs: 3, cutOutMs: 25 };

describe('windProtection', () => {
  it('connects at cut-in and lets go only below the hysteresis band', () => {
    expect(windProtection(idle, { tMs: 0, rotorWindMs: 3, ...turbine })).toEqual({ stoppedUntilMs: -Infinity, connected: true, stopped: false });
    expect(windProtection(idle, { tMs: 0, rotorWindMs: 2.9, ...turbine }).connected).toBe(false);
    // Inside the band the unit keeps what it was doing.
    expect(windProtection(running, { tMs: 0, rotorWindMs: 3 - CUT_IN_HYSTERESIS_MS / 2, ...turbine }).connected).toBe(true);
    expect(windProtection(idle, { tMs: 0, rotorWindMs: 3 - CUT_IN_HYSTERESIS_MS / 2, ...turbine }).connected).toBe(false);
    expect(windProtection(running, { tMs: 0, rotorWindMs: 3 - CUT_IN_HYSTERESIS_MS - 0.01, ...turbine }).connected).toBe(false);
  });

  it('stops at cut-out, disconnected, for RESTART_MS', () => {
    const cut = windProtection(running, { tMs: 1000, rotorWindMs: 25, ...turbine });
    expect(cut).toEqual({ stoppedUntilMs: 1000 + RESTART_MS, connected: false, stopped: true });
    // The wind falls well below cut-out: the hold runs out, then the unit connects again.
    const calm = { rotorWindMs: 25 - RESTART_MARGIN_MS - 1, ...turbine };
    expect(windProtection(cut, { tMs: 1000 + RESTART_MS - 1, ...calm }).stopped).toBe(true);
    expect(windProtection(cut, { tMs: 1000 + RESTART_MS, ...calm })).toEqual({ stoppedUntilMs: 1000 + RESTART_MS, connected: true, stopped: false });
  });

  it('renews the hold while the wind stays within the restart margin of cut-out', () => {
    const cut = windProtection(running, { tMs: 0, rotorWindMs: 26, ...turbine });
    const near = windProtection(cut, { tMs: 5 * 60_000, rotorWindMs: 25 - RESTART_MARGIN_MS + 0.5, ...turbine });
    expect(near.stoppedUntilMs).toBe(5 * 60_000 + RESTART_MS);
    // Not renewed by a strong wind once the unit runs again: that takes cut-out itself.
    expect(windProtection(running, { tMs: 0, rotorWindMs: 24, ...turbine }).stopped).toBe(false);
  });

  it('is never connected while stopped', () => {
    fc.assert(
      fc.property(fc.boolean(), fc.double({ min: 0, max: 40, noNaN: true }), fc.integer({ min: 0, max: 2 * RESTART_MS }), (connected, rotorWindMs, tMs) => {
        const after = windProtection({ stoppedUntilMs: RESTART_MS, connected }, { tMs, rotorWindMs, ...turbine });
        return !(after.stopped && after.connected) && after.stopped === tMs < after.stoppedUntilMs;
      }),
    );
  });
});

describe('freeRotorRpm', () => {
  it('turns the tip-speed ratio into rotor speed: n = λ·v / r · 60 / 2π', () => {
    expect(freeRotorRpm(6, 10, 4)).toBeCloseTo((6 * 10 * 60) / (2 * 2 * Math.PI), 12);
    expect(freeRotorRpm(6, 0, 4)).toBe(0);
  });
});

describe('hydroRunsAfter', () => {
  it('stops below the stop fraction and starts only above the start fraction', () => {
    expect(hydroRunsAfter(true, HYDRO_STOP_FRACTION - 0.001)).toBe(false);
    expect(hydroRunsAfter(true, HYDRO_STOP_FRACTION)).toBe(true);
    expect(hydroRunsAfter(false, HYDRO_START_FRACTION)).toBe(false);
    expect(hydroRunsAfter(false, HYDRO_START_FRACTION + 0.001)).toBe(true);
  });

  it('keeps its state inside the band', () => {
    fc.assert(
      fc.property(fc.boolean(), fc.double({ min: HYDRO_STOP_FRACTION, max: HYDRO_START_FRACTION, noNaN: true }), (state, q) => hydroRunsAfter(state, q) === state),
    );
  });
});

describe('scanDepthAt', () => {
  const everyMs = SCAN_EVERY_S * 1000;
  const scanMs = SCAN_S * 1000;

  it('rises to 1 mid-scan, is 0 outside scans, and repeats every SCAN_EVERY_S from the unit phase', () => {
    const phase = 7 * 60_000;
    expect(scanDepthAt(phase, phase)).toBe(0);
    expect(scanDepthAt(phase + scanMs / 4, phase)).toBeCloseTo(0.5, 12);
    expect(scanDepthAt(phase + scanMs / 2, phase)).toBe(1);
    expect(scanDepthAt(phase + scanMs, phase)).toBe(0);
    expect(scanDepthAt(phase + everyMs / 2, phase)).toBe(0);
    expect(scanDepthAt(phase + 3 * everyMs + scanMs / 2, phase)).toBe(1);
    // Before the phase too (times earlier than the unit's first scan).
    expect(scanDepthAt(phase - everyMs + scanMs / 2, phase)).toBe(1);
  });

  it('stays within 0 and 1', () => {
    fc.assert(
      fc.property(fc.double({ min: -1e13, max: 1e13, noNaN: true }), fc.integer({ min: 0, max: everyMs }), (t, phase) => {
        const d = scanDepthAt(t, phase);
        return d >= 0 && d <= 1;
      }),
    );
  });
});

describe('hydroEfficiency', () => {
  it('is the best efficiency at design flow and best speed, and falls off either way', () => {
    expect(hydroEfficiency(0.8, 1, 1)).toBe(0.8);
    // Flow above design counts as design flow (the rest spills).
    expect(hydroEfficiency(0.8, 1.2, 1)).toBe(0.8);
    expect(hydroEfficiency(0.8, 0.5, 1)).toBeCloseTo(0.8 * (1 - 0.25 * 0.25), 12);
    expect(hydroEfficiency(0.8, 1, 0.9)).toBeCloseTo(0.8 * (1 - RUNNER_SPEED_LOSS_K * 0.01), 12);
  });

  it('never exceeds the best efficiency', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1.5, noNaN: true }), fc.double({ min: 0.8, max: 1.2, noNaN: true }), (q, n) => hydroEfficiency(0.8, q, n) <= 0.8),
    );
  });
});
