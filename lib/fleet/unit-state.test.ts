import { describe, expect, it } from 'vitest';
import { compareStates, firstSentence, shortReason, OFFLINE_AFTER_MS, sinceText, unitStateOf, UNIT_STATES } from './unit-state';

const now = Date.parse('2026-12-02T12:00:00Z');
const fresh = now - 60_000;

describe('unitStateOf', () => {
  it('counts a unit never diagnosed as not yet judged, needing attention', () => {
    const s = unitStateOf({ health: undefined, lastSampleMs: fresh, nowMs: now });
    expect(s.state).toBe('not-judged');
    expect(s.label).toBe('Not yet judged');
    expect(s.reason).toBeDefined();
  });

  it('counts a unit with no sample for the offline time as no data, with the time since', () => {
    const s = unitStateOf({ health: { verdict: 'healthy', findings: [] }, lastSampleMs: now - 3 * 3600_000, nowMs: now });
    expect(s.state).toBe('no-data');
    expect(s.label).toBe('No data for 3 h');
    expect(s.reason).toContain('last judged: Healthy');
  });

  it('keeps a unit within the offline time as reporting', () => {
    const s = unitStateOf({ health: { verdict: 'healthy', findings: [] }, lastSampleMs: now - OFFLINE_AFTER_MS + 1000, nowMs: now });
    expect(s.state).toBe('healthy');
    expect(s.reason).toBeUndefined();
  });

  it('says "No data received" for a unit that never sent a sample', () => {
    const s = unitStateOf({ health: undefined, lastSampleMs: null, nowMs: now });
    expect(s.state).toBe('no-data');
    expect(s.label).toBe('No data received');
  });

  it('gives a fault verdict its label and the first sentence of its alarm as the reason', () => {
    const s = unitStateOf({
      health: {
        verdict: 'demagnetised',
        findings: [
          { code: 'demagnetised', severity: 'alarm', message: 'Ke is 0.91 of nameplate. Check the magnets.' },
          { code: 'corrections', severity: 'info', message: 'x' },
        ],
      },
      lastSampleMs: fresh,
      nowMs: now,
    });
    expect(s.state).toBe('fault');
    expect(s.label).toBe('Magnets weakened');
    expect(s.reason).toBe('Ke is 0.91 of nameplate.');
  });

  it('treats an alarm finding on a healthy verdict (such as overspeed) as a fault', () => {
    const s = unitStateOf({
      health: { verdict: 'healthy', findings: [{ code: 'overspeed', severity: 'alarm', message: 'Speed went above maxRpm 3 times.' }] },
      lastSampleMs: fresh,
      nowMs: now,
    });
    expect(s.state).toBe('fault');
    expect(s.label).toBe('Overspeed');
    expect(s.reason).toBe('Speed went above maxRpm 3 times.');
  });

  it('treats a warning finding as a warning, but not the "not enough data" one', () => {
    const warn = unitStateOf({
      health: { verdict: 'healthy', findings: [{ code: 'ke-low', severity: 'warning', message: 'Ke is 0.96 of nameplate, below 0.97.' }] },
      lastSampleMs: fresh,
      nowMs: now,
    });
    expect(warn.state).toBe('warning');
    expect(warn.label).toBe('Ke below the warning line');
    const notEnough = unitStateOf({
      health: { verdict: 'insufficient-data', findings: [{ code: 'insufficient-data', severity: 'warning', message: 'Only 3 samples.' }] },
      lastSampleMs: fresh,
      nowMs: now,
    });
    expect(notEnough.state).toBe('not-judged');
    expect(notEnough.label).toBe('Not enough running data');
    // The reason is the diagnosis's own first sentence, so a unit held at one speed says so.
    expect(notEnough.reason).toBe('Only 3 samples.');
    const steady = unitStateOf({
      health: {
        verdict: 'insufficient-data',
        findings: [{ code: 'insufficient-data', severity: 'warning', message: 'The unit ran at one steady speed: x. Next steps: Judge it from a log with a start-up.' }],
      },
      lastSampleMs: fresh,
      nowMs: now,
    });
    expect(steady.reason).toBe('The unit ran at one steady speed: x.');
  });

  it('sorts worst first, an offline unit last judged faulty before other offline units', () => {
    const states = [
      unitStateOf({ health: { verdict: 'healthy', findings: [] }, lastSampleMs: fresh, nowMs: now }),
      unitStateOf({ health: { verdict: 'healthy', findings: [] }, lastSampleMs: now - 86_400_000, nowMs: now }),
      unitStateOf({ health: { verdict: 'shorted-turns', findings: [] }, lastSampleMs: now - 86_400_000, nowMs: now }),
      unitStateOf({ health: { verdict: 'shorted-turns', findings: [] }, lastSampleMs: fresh, nowMs: now }),
    ].sort(compareStates);
    expect(states.map((s) => s.state)).toEqual(['fault', 'no-data', 'no-data', 'healthy']);
    expect(states[1]!.reason).toContain('Shorted turns suspected');
    expect(UNIT_STATES[0]).toBe('fault');
  });
});

describe('sinceText and firstSentence', () => {
  it('words a duration', () => {
    expect(sinceText(40_000)).toBe('40 s');
    expect(sinceText(20 * 60_000)).toBe('20 min');
    expect(sinceText(5 * 86_400_000)).toBe('5 d');
    expect(() => sinceText(Number.NaN)).toThrow(RangeError);
  });
  it('cuts a long reason at a clause boundary', () => {
    const long = `Ke corrected for load and magnet temperature is 0.929 (95 % interval 0.928 to 0.929) of nameplate (2,073.6 V per 1000 rpm against 2,233.3 on the nameplate at 20 °C), below the 0.95 alarm line. Next.`;
    const r = shortReason(long);
    expect(r.length).toBeLessThanOrEqual(162);
    expect(r.endsWith(' …')).toBe(true);
    expect(long.startsWith(r.slice(0, -2))).toBe(true);
  });
  it('keeps the first sentence of a message', () => {
    expect(firstSentence('Ke is 0.961 (95 % interval 0.95 to 0.97). Next step.')).toBe('Ke is 0.961 (95 % interval 0.95 to 0.97).');
    expect(firstSentence('no stop')).toBe('no stop');
  });
});
