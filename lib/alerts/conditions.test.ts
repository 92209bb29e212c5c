/**
 * The conditions of contract section 7 read from a unit's facts, at their
 * lines and deadbands. Lines: the nameplate's own maxRpm (contract section 2),
 * the diagnosis's limits (section 5), insulation thermal class F 155 °C
 * (IEC 60085, from memory) less the documented margin; deadbands and counts
 * are common practice with no published source, as lib/alerts/limits.ts says.
 */
import { describe, expect, it } from 'vitest';
import { DEFAULT_LIMITS } from '@/lib/diagnosis/limits';
import { finding } from '@/lib/diagnosis/findings';
import type { AlertCondition } from '@/lib/contract/alerts';
import { readConditions, type UnitFacts } from './conditions';
import { DEFAULT_ALERT_LIMITS, statorLimitC } from './limits';

const NOW = Date.UTC(2026, 11, 4, 12);
const base: UnitFacts = { nowMs: NOW, maxRpm: 300, lastSampleMs: NOW - 10_000, registeredMs: NOW - 86_400_000, presence: 'online', latest: { rpmMax: 250, statorCMax: 60 }, setAsideLast10Min: 0 };
const read = (facts: Partial<UnitFacts>, was: AlertCondition[] = []) =>
  Object.fromEntries(readConditions({ ...base, ...facts }, DEFAULT_ALERT_LIMITS, DEFAULT_LIMITS, new Set(was)).map((r) => [r.condition, r]));

describe('alert conditions', () => {
  it('a healthy, reporting unit holds nothing', () => {
    expect(Object.values(read({})).filter((r) => r.holds)).toEqual([]);
  });

  it('overspeed above maxRpm, not at it; once holding it is gone only 2 % below', () => {
    expect(read({ latest: { rpmMax: 300, statorCMax: 60 } }).overspeed!.holds).toBe(false);
    const over = read({ latest: { rpmMax: 300.5, statorCMax: 60 } }).overspeed!;
    expect(over).toMatchObject({ holds: true, severity: 'alarm', value: 300.5, limit: 300 });
    expect(over.message).toBe('Speed reached 301 rpm in the last 10 minutes; the overspeed limit is 300 rpm.');
    expect(read({ latest: { rpmMax: 295, statorCMax: 60 } }, ['overspeed']).overspeed!.holds).toBe(true);
    expect(read({ latest: { rpmMax: 293.9, statorCMax: 60 } }, ['overspeed']).overspeed!.holds).toBe(false);
  });

  it('stator temperature at class F less 20 K, with a 5 K deadband', () => {
    expect(statorLimitC(DEFAULT_ALERT_LIMITS)).toBe(135);
    expect(read({ latest: { rpmMax: 200, statorCMax: 135 } })['stator-temperature']!.holds).toBe(false);
    expect(read({ latest: { rpmMax: 200, statorCMax: 136 } })['stator-temperature']!.holds).toBe(true);
    expect(read({ latest: { rpmMax: 200, statorCMax: 131 } }, ['stator-temperature'])['stator-temperature']!.holds).toBe(true);
    expect(read({ latest: { rpmMax: 200, statorCMax: 129 } }, ['stator-temperature'])['stator-temperature']!.holds).toBe(false);
  });

  it('offline after 15 minutes without a sample, when the link says so, or having sent none 15 minutes after registering', () => {
    expect(read({ lastSampleMs: NOW - 15 * 60_000 }).offline!.holds).toBe(false);
    expect(read({ lastSampleMs: NOW - 15 * 60_000 - 1 }).offline!.holds).toBe(true);
    expect(read({ presence: 'offline' }).offline!.holds).toBe(true);
    expect(read({ lastSampleMs: null }).offline).toMatchObject({ holds: true, message: 'The unit has sent no sample since it was registered 1440 minutes ago.' });
    // Just registered: not offline until the offline time has passed without a sample.
    expect(read({ lastSampleMs: null, registeredMs: NOW - 60_000 }).offline!.holds).toBe(false);
  });

  it('bad telemetry from three messages set aside in ten minutes', () => {
    expect(read({ setAsideLast10Min: 2 })['bad-telemetry']!.holds).toBe(false);
    expect(read({ setAsideLast10Min: 3 })['bad-telemetry']!).toMatchObject({ holds: true, value: 3, limit: 3 });
  });

  it('the diagnosis’s verdicts and warnings, in the findings’ own words without their next steps', () => {
    const alarm = finding('demagnetised', 'alarm', 'Ke is 7 % below nameplate.', { next: 'Plan a visit.', onSite: true });
    const demag = read({ health: { verdict: 'demagnetised', keRatio: 0.93, unbalancePct: 0.4, speedRatio: 1, findings: [alarm] } }).demagnetisation!;
    expect(demag).toMatchObject({ holds: true, severity: 'alarm', value: 0.93, limit: 0.95, message: 'Ke is 7 % below nameplate.' });
    const warn = finding('ke-low', 'warning', 'Ke is 4 % below nameplate.', { next: 'Watch the trend.' });
    expect(read({ health: { verdict: 'healthy', keRatio: 0.96, unbalancePct: 0.4, speedRatio: 1, findings: [warn] } }).demagnetisation).toMatchObject({ holds: true, severity: 'warning' });
    const shorted = read({ health: { verdict: 'shorted-turns', keRatio: 1, unbalancePct: 3.1, speedRatio: 1, findings: [] } })['shorted-turns']!;
    expect(shorted).toMatchObject({ holds: true, severity: 'alarm', value: 3.1, limit: 2 });
    expect(read({ health: { verdict: 'speed-sensor-fault', keRatio: null, unbalancePct: null, speedRatio: 0.95, findings: [] } })['speed-sensor']!.holds).toBe(true);
  });

  it('a Ke trend projected to cross within 90 days; nameplate-suspect only on that verdict', () => {
    const health = { verdict: 'healthy', keRatio: 0.97, unbalancePct: 0.3, speedRatio: 1, findings: [] };
    expect(read({ health: { ...health, crossingMs: NOW + 91 * 86_400_000 } })['ke-trend']!.holds).toBe(false);
    expect(read({ health: { ...health, crossingMs: NOW + 89 * 86_400_000 } })['ke-trend']).toMatchObject({ holds: true, value: 89, limit: 90 });
    expect(read({ health })['nameplate-suspect']!.holds).toBe(false);
    expect(read({ health: { ...health, verdict: 'nameplate-suspect' } })['nameplate-suspect']!.holds).toBe(true);
  });
});
