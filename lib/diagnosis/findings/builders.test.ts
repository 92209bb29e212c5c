/**
 * The finding builders on judged facts made by hand (no samples): each
 * applies exactly where the diagnosis reports it, says the figures it is
 * given, and ends with the safety caution when it sends someone to the
 * machine. The thresholds are the contract's defaults (section 5); the
 * cautions are common practice, no single published source.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Judgement } from '@/lib/diagnosis/judge';
import { DEFAULT_LIMITS } from '@/lib/diagnosis/limits';
import { TEST_NAMEPLATE } from '@/test/support/synthetic-unit';
import {
  FINDING_BUILDERS,
  SAFETY_CAUTION,
  correctionsFinding,
  demagnetisedFinding,
  findingsOf,
  insufficientDataFinding,
  keAboveNameplateFinding,
  keLowFinding,
  keNormalFinding,
  magnetsWithFrequencySpeedFinding,
  noFrequencyFinding,
  noTemperatureFinding,
  noUnbalanceFinding,
  noVoltageAtSpeedFinding,
  overspeedFinding,
  samplesFilteredFinding,
  shortedTurnsFinding,
  speedSensorFaultFinding,
  splitFindingMessage,
  unbalanceNormalFinding,
} from './index';

/** A healthy unit's judgement (TEST_NAMEPLATE: 300 rpm rated, 420 rpm limit, Ke 1400 V per 1000 rpm at 20 °C). */
const HEALTHY: Judgement = {
  nameplate: TEST_NAMEPLATE,
  limits: DEFAULT_LIMITS,
  samplesTotal: 720,
  track: { source: 'rpm', count: 720, belowSpeed: 0, inTransient: 0, withoutVoltage: 0, missing: 0, minRpm: 75, maxRpm: 330 },
  speedRatio: 1.0001,
  sensorFault: false,
  insufficient: false,
  speedSpanRpm: 255,
  fit: {
    ke: { slope: 0.998, low: 0.996, high: 1 },
    naive: 0.998,
    unbalancePct: 0.19,
    negativeSequencePct: 0.2,
    phaseKe: { a: 0.998, b: 0.998, c: 0.999 },
    loadedSharePct: 0,
    magnetMeanC: 20,
    magnetTempSource: 'statorC',
    coeffPctPerC: -0.12,
  },
  weakestPhase: undefined,
  overspeed: undefined,
  usedFromTs: '2026-03-01T00:00:00.000Z',
  usedToTs: '2026-03-01T01:59:50.000Z',
  verdict: 'healthy',
};

const withKe = (slope: number, changes: Partial<Judgement> = {}): Judgement => ({
  ...HEALTHY,
  ...changes,
  fit: { ...HEALTHY.fit, ke: { slope, low: slope - 0.002, high: slope + 0.002 } },
});
const codesOf = (j: Judgement) => findingsOf(j).map((f) => f.code);

describe('a healthy judgement', () => {
  it('reads as normal Ke and normal unbalance, in that order, with the figures', () => {
    const findings = findingsOf(HEALTHY);
    expect(findings.map((f) => f.code)).toEqual(['ke-normal', 'unbalance-normal']);
    // 0.998 × 1400 = 1397.2 V per 1000 rpm (arithmetic by hand).
    expect(findings[0]!.message).toBe(
      'Ke corrected for load and magnet temperature is 0.998 (95 % interval 0.996 to 1.000) of nameplate (1,397.2 V per 1000 rpm against 1,400.0 on the nameplate at 20 °C).',
    );
    expect(findings[1]!.message).toBe('Line-voltage unbalance is 0.19 % (median), within the 2.0 % line. Ke ratio by phase: a 0.998, b 0.998, c 0.999.');
  });
});

describe('the Ke findings', () => {
  it('demagnetised below the alarm line, ke-low below the warning line, above nameplate past 1.05, normal between', () => {
    expect(codesOf(withKe(0.9))).toContain('demagnetised');
    expect(codesOf(withKe(0.96))).toContain('ke-low');
    expect(codesOf(withKe(1.06))).toContain('ke-above-nameplate');
    expect(codesOf(withKe(1.0))).toContain('ke-normal');
    // The demagnetised alarm says how far below nameplate: 0.9 is −10.0 %.
    expect(demagnetisedFinding(withKe(0.9))!.message).toContain('−10.0 % on all phases alike');
  });

  it('apply one at a time, as the else-if chain of the diagnosis had them', () => {
    const oracle = (slope: number, sensorFault: boolean): string[] => {
      const { keAlarmRatio, keWarnRatio } = DEFAULT_LIMITS;
      const out: string[] = [];
      if (sensorFault) out.push('magnets-with-frequency-speed');
      if (slope < keAlarmRatio) {
        if (!sensorFault) out.push('demagnetised');
      } else if (slope < keWarnRatio) out.push('ke-low');
      else if (slope > 2 - keAlarmRatio) out.push('ke-above-nameplate');
      else if (!sensorFault) out.push('ke-normal');
      return out;
    };
    const keBuilders = [magnetsWithFrequencySpeedFinding, demagnetisedFinding, keLowFinding, keAboveNameplateFinding, keNormalFinding];
    fc.assert(
      fc.property(fc.double({ min: 0.5, max: 1.5, noNaN: true }), fc.boolean(), (slope, sensorFault) => {
        const j = withKe(slope, { sensorFault });
        expect(keBuilders.map((b) => b(j)?.code).filter((c) => c !== undefined)).toEqual(oracle(slope, sensorFault));
      }),
    );
  });

  it('say nothing without a verdict or without a fit', () => {
    for (const b of [magnetsWithFrequencySpeedFinding, demagnetisedFinding, keLowFinding, keAboveNameplateFinding, keNormalFinding]) {
      expect(b(withKe(0.9, { insufficient: true, sensorFault: true }))).toBeUndefined();
      expect(b({ ...HEALTHY, sensorFault: true, fit: { ...HEALTHY.fit, ke: undefined } })).toBeUndefined();
    }
  });

  it('with speed from the frequency, grades the magnets by the same lines', () => {
    expect(magnetsWithFrequencySpeedFinding(withKe(0.9, { sensorFault: true }))!.severity).toBe('alarm');
    expect(magnetsWithFrequencySpeedFinding(withKe(0.96, { sensorFault: true }))!.severity).toBe('warning');
    expect(magnetsWithFrequencySpeedFinding(withKe(1, { sensorFault: true }))!.message).toContain('magnets look healthy.');
  });
});

describe('the unbalance findings', () => {
  const unbalanced = (pct: number | undefined, changes: Partial<Judgement> = {}): Judgement => ({
    ...HEALTHY,
    ...changes,
    fit: { ...HEALTHY.fit, unbalancePct: pct, phaseKe: { a: 1, b: 0.94, c: 1 } },
    weakestPhase: 'b',
  });

  it('shorted turns above the 2 % line, an alarm with that verdict and a warning under another, naming the weakest phase', () => {
    const alarm = shortedTurnsFinding(unbalanced(3.1, { verdict: 'shorted-turns' }))!;
    expect(alarm.severity).toBe('alarm');
    expect(alarm.message).toContain('Line-voltage unbalance is 3.10 % (median, NEMA MG 1 definition), above the 2.0 % line; negative-sequence unbalance 0.20 %.');
    expect(alarm.message).toContain('phase b is the weakest.');
    expect(shortedTurnsFinding(unbalanced(3.1, { verdict: 'speed-sensor-fault' }))!.severity).toBe('warning');
  });

  it('one of no-unbalance, shorted-turns and unbalance-normal, and none but no-unbalance without a verdict', () => {
    fc.assert(
      fc.property(fc.option(fc.double({ min: 0, max: 10, noNaN: true }), { nil: undefined }), fc.boolean(), (pct, insufficient) => {
        const j = unbalanced(pct, { insufficient });
        const codes = [noUnbalanceFinding(j), shortedTurnsFinding(j), unbalanceNormalFinding(j)].flatMap((f) => (f === undefined ? [] : [f.code]));
        if (pct === undefined) expect(codes).toEqual(['no-unbalance']);
        else if (insufficient) expect(codes).toEqual([]);
        else expect(codes).toEqual([pct > 2 ? 'shorted-turns' : 'unbalance-normal']);
      }),
    );
  });
});

describe('the speed findings', () => {
  it('a sensor at fault states the ratio and what the frequency says at rated speed', () => {
    const f = speedSensorFaultFinding({ ...HEALTHY, sensorFault: true, speedRatio: 0.926, verdict: 'speed-sensor-fault' })!;
    expect(f.severity).toBe('alarm');
    // 0.926 × 300 = 277.8, shown as 278 rpm.
    expect(f.message).toContain('is 0.926 (median), beyond the ±2.0 % tolerance; when the sensor reads 300 rpm the frequency says 278 rpm.');
    expect(f.message).not.toContain('The sensor reads low');
  });

  it('a dead or low-reading sensor puts the overspeed protection in doubt; a warning only without a verdict', () => {
    const dead = speedSensorFaultFinding({ ...HEALTHY, sensorFault: true, speedRatio: undefined, verdict: 'insufficient-data' })!;
    expect(dead.severity).toBe('warning');
    expect(dead.message).toContain('The speed sensor reads 0 rpm while the terminal frequency shows the machine turning (up to 330 rpm by frequency)');
    expect(splitFindingMessage(dead.message).nextSteps).toMatch(/^Treat the overspeed protection as unproven/);
    expect(speedSensorFaultFinding({ ...HEALTHY, sensorFault: true, speedRatio: 1.1 })!.message).toContain('The sensor reads low');
  });

  it('no frequency: the sensor unchecked; nothing when the sensor is at fault or the ratio is known', () => {
    expect(noFrequencyFinding({ ...HEALTHY, speedRatio: undefined })?.code).toBe('no-frequency');
    expect(noFrequencyFinding(HEALTHY)).toBeUndefined();
    expect(noFrequencyFinding({ ...HEALTHY, sensorFault: true, speedRatio: undefined })).toBeUndefined();
  });

  it('overspeed states the count, the peak against the limit and the time above', () => {
    const f = overspeedFinding({
      ...HEALTHY,
      overspeed: { samples: 3, peakRpm: 450, peakTs: '2026-03-01 00:16:50 UTC', seconds: 30, firstTs: '2026-03-01 00:16:40 UTC', lastTs: '2026-03-01 00:17:00 UTC' },
    })!;
    // 450 / 420 = 1.0714: +7.1 % against the limit.
    expect(splitFindingMessage(f.message).observation).toBe(
      '3 samples above the 420 rpm overspeed limit; highest 450 rpm (+7.1 % against the limit) at 2026-03-01 00:16:50 UTC; ' +
        'about 30 s above the limit in all, between 2026-03-01 00:16:40 UTC and 2026-03-01 00:17:00 UTC.',
    );
    expect(overspeedFinding(HEALTHY)).toBeUndefined();
  });
});

describe('the data findings', () => {
  it('insufficient data: too few samples, or one steady speed, with the figures needed', () => {
    const few = insufficientDataFinding({ ...HEALTHY, insufficient: true, track: { ...HEALTHY.track, count: 12 } })!;
    // Floor 15 % of 300 = 45 rpm; span 10 % of 300 = 30 rpm.
    expect(few.message).toMatch(/^Only 12 samples were usable; the diagnosis needs at least 30 with the speed above 45 rpm \(15 % of rated\), spread over at least 30 rpm\./);
    const steady = insufficientDataFinding({ ...HEALTHY, insufficient: true, track: { ...HEALTHY.track, minRpm: 179, maxRpm: 181 }, speedSpanRpm: 2 })!;
    expect(steady.message).toContain('the 720 usable samples lie between 179 and 181 rpm, a range of 2 rpm, and the diagnosis needs at least 30 rpm (10 % of rated)');
    expect(insufficientDataFinding(HEALTHY)).toBeUndefined();
  });

  it('samples filtered: says why samples were left out, only when some were', () => {
    const track = { ...HEALTHY.track, count: 690, belowSpeed: 20, inTransient: 6, missing: 4 };
    // Transient rate 2 % of 300 rpm = 6.0 rpm a second.
    expect(samplesFilteredFinding({ ...HEALTHY, track })!.message).toBe(
      '690 of 720 samples used; not used: 20 below 45 rpm, 6 while the speed changed quickly (faster than 6.0 rpm a second), 4 without a speed reading.',
    );
    expect(samplesFilteredFinding(HEALTHY)).toBeUndefined();
    // Samples left out only for want of voltage have a finding of their own.
    expect(samplesFilteredFinding({ ...HEALTHY, track: { ...HEALTHY.track, withoutVoltage: 3 } })).toBeUndefined();
    expect(noVoltageAtSpeedFinding({ ...HEALTHY, track: { ...HEALTHY.track, withoutVoltage: 3 } })!.message).toMatch(/^3 samples read 0 V on every line while turning above 45 rpm/);
  });

  it('no temperature: says the material and its coefficient; corrections: the size of the load correction', () => {
    const noTemp = noTemperatureFinding({ ...HEALTHY, fit: { ...HEALTHY.fit, magnetTempSource: 'keRefC' } })!;
    expect(noTemp.message).toContain("taken as the nameplate's reference, 20 °C). NdFeB magnets change Ke by 0.120 % per °C.");
    expect(noTemperatureFinding(HEALTHY)).toBeUndefined();
    const loaded = { ...HEALTHY, fit: { ...HEALTHY.fit, loadedSharePct: 80, loadCorrectionPct: 4.26, naive: 0.955 } };
    expect(correctionsFinding(loaded)!.message).toBe(
      '80 % of used samples were under load; the EMF behind the terminals was on average 4.3 % above the terminal voltage. ' +
        'Uncorrected terminal volts per rpm give 0.955 of nameplate, corrected 0.998.',
    );
    expect(correctionsFinding(HEALTHY)).toBeUndefined();
  });
});

describe('every builder', () => {
  it('ends with the safety caution exactly when its next steps take someone to the machine', () => {
    const onSite = new Set(['no-voltage-at-speed', 'overspeed', 'speed-sensor-fault', 'demagnetised', 'ke-above-nameplate', 'shorted-turns']);
    const judgements: Judgement[] = [
      { ...withKe(0.9), track: { ...HEALTHY.track, withoutVoltage: 2 }, overspeed: { samples: 1, peakRpm: 430, peakTs: 't', seconds: 10, firstTs: 't', lastTs: 't' } },
      { ...withKe(1.06, { sensorFault: true, speedRatio: 0.9 }), fit: { ...withKe(1.06).fit, unbalancePct: 3 } },
    ];
    let seen = 0;
    for (const j of judgements) {
      for (const build of FINDING_BUILDERS) {
        const f = build(j);
        if (f === undefined) continue;
        seen++;
        expect(f.message.endsWith(SAFETY_CAUTION), f.code).toBe(onSite.has(f.code));
      }
    }
    expect(seen).toBeGreaterThanOrEqual(8);
  });
});
