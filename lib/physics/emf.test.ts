import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { recoverPhaseEmf, recoverPhaseEmfFast, terminalPhaseVolts } from './emf';

describe('recoverPhaseEmf', () => {
  it('adds the drop across R and X as phasors', () => {
    // Unity pf: E = |230 + 10·(0.5 + j2)| = |235 + j20|.
    expect(recoverPhaseEmf({ phaseVolts: 230, currentA: 10, ohmPerPhase: 0.5, reactanceOhm: 2, powerFactor: 1 })).toBeCloseTo(Math.hypot(235, 20), 12);
    // Zero pf lagging, purely reactive: the drop I·X adds in phase with V.
    expect(recoverPhaseEmf({ phaseVolts: 230, currentA: 10, ohmPerPhase: 0, reactanceOhm: 2, powerFactor: 0 })).toBeCloseTo(250, 12);
  });

  it('needs no correction on open circuit', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 9000, noNaN: true }), fc.double({ min: 0, max: 5, noNaN: true }), (v, r) => {
        expect(recoverPhaseEmf({ phaseVolts: v, currentA: 0, ohmPerPhase: r, reactanceOhm: r, powerFactor: 0.8 })).toBe(v);
      }),
    );
  });

  it('agrees with the fast form and inverts with terminalPhaseVolts', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 50, max: 1000, noNaN: true }),
        fc.double({ min: 0, max: 50, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: 0, max: 2, noNaN: true }),
        fc.double({ min: 0.3, max: 1, noNaN: true }),
        (v, i, r, x, pf) => {
          const e = recoverPhaseEmf({ phaseVolts: v, currentA: i, ohmPerPhase: r, reactanceOhm: x, powerFactor: pf });
          expect(recoverPhaseEmfFast(v, i, r, x, pf)).toBeCloseTo(e, 9);
          expect(terminalPhaseVolts({ emfPhaseV: e, currentA: i, ohmPerPhase: r, reactanceOhm: x, powerFactor: pf })).toBeCloseTo(v, 6);
        },
      ),
    );
  });

  it('says undefined when the EMF cannot drive the current', () => {
    expect(terminalPhaseVolts({ emfPhaseV: 10, currentA: 100, ohmPerPhase: 1, reactanceOhm: 1, powerFactor: 1 })).toBeUndefined();
  });

  it('names a bad value', () => {
    expect(() => recoverPhaseEmf({ phaseVolts: 230, currentA: -1, ohmPerPhase: 0.5, reactanceOhm: 2, powerFactor: 1 })).toThrow(/currentA.*-1/);
    expect(() => recoverPhaseEmf({ phaseVolts: 230, currentA: 1, ohmPerPhase: 0.5, reactanceOhm: 2, powerFactor: 1.2 })).toThrow(/powerFactor.*1.2/);
  });
});
