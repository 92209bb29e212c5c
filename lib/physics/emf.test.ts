import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { SQRT3, lineEmfBehindTerminals, recoverPhaseEmf, recoverPhaseEmfFast, terminalPhaseVolts } from './emf';

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

describe('lineEmfBehindTerminals (the per-sample correction of the diagnosis and the chart)', () => {
  it('recovers E from the generator phasor equation E = V + I·(R + jX) with a lagging current', () => {
    // The synchronous generator's phasor equation E_A = V_φ + R_A·I_A + jX_S·I_A (any machines
    // textbook, e.g. Chapman, Electric Machinery Fundamentals, ch. 4; the equation from memory),
    // worked by hand: V_φ = 400/√3 = 230.940 V, I = 10 A at cos φ 0.8 lagging (sin φ 0.6),
    // R = 0.5 Ω, X = 3 Ω: E = 230.940 + 10·(0.5·0.8 + 3·0.6) + j·10·(3·0.8 − 0.5·0.6)
    //   = 252.940 + j21.000, |E| = 253.810 V, E_LL = √3 · 253.810 = 439.612 V.
    expect(lineEmfBehindTerminals(400, 10, 0.5, 3, 0.8)).toBeCloseTo(439.612, 2);
  });

  it('is the terminal voltage at open circuit, whatever R and X', () => {
    expect(lineEmfBehindTerminals(400, 0, 0.5, 3, 0.8)).toBeCloseTo(400, 9);
  });

  it('is √3 times the phasor form on the star-equivalent phase', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 50, max: 1500, noNaN: true }),
        fc.double({ min: 0, max: 50, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: 0, max: 5, noNaN: true }),
        fc.double({ min: -1, max: 1, noNaN: true }),
        (v, i, r, x, pf) => {
          const phase = recoverPhaseEmf({ phaseVolts: v / SQRT3, currentA: i, ohmPerPhase: r, reactanceOhm: x, powerFactor: pf });
          expect(lineEmfBehindTerminals(v, i, r, x, pf)).toBeCloseTo(SQRT3 * phase, 9);
        },
      ),
    );
  });
});
