import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { abs, add, polar, scale, sub } from './complex';
import { phaseVoltsFromLines } from './phase-voltages';

describe('phaseVoltsFromLines', () => {
  it('gives V_LL/√3 for a balanced set', () => {
    const [a, b, c] = phaseVoltsFromLines(400, 400, 400)!;
    expect(a).toBeCloseTo(400 / Math.sqrt(3), 9);
    expect(b).toBeCloseTo(a, 12);
    expect(c).toBeCloseTo(a, 12);
  });

  it('recovers phasors referred to their centroid (no zero sequence)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 150, max: 260, noNaN: true }),
        fc.double({ min: 150, max: 260, noNaN: true }),
        fc.double({ min: 150, max: 260, noNaN: true }),
        fc.double({ min: -0.2, max: 0.2, noNaN: true }),
        (ma, mb, mc, skew) => {
          const pa = polar(ma, 0);
          const pb = polar(mb, (-2 * Math.PI) / 3 + skew);
          const pc = polar(mc, (2 * Math.PI) / 3);
          const centroid = scale(add(add(pa, pb), pc), 1 / 3);
          const got = phaseVoltsFromLines(abs(sub(pa, pb)), abs(sub(pb, pc)), abs(sub(pc, pa)))!;
          expect(got[0]).toBeCloseTo(abs(sub(pa, centroid)), 6);
          expect(got[1]).toBeCloseTo(abs(sub(pb, centroid)), 6);
          expect(got[2]).toBeCloseTo(abs(sub(pc, centroid)), 6);
        },
      ),
    );
  });

  it('is undefined when the readings cannot close a triangle', () => {
    expect(phaseVoltsFromLines(100, 100, 400)).toBeUndefined();
    expect(() => phaseVoltsFromLines(-1, 100, 100)).toThrow(/uab.*-1/);
  });
});
