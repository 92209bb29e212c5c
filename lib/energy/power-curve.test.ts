import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { powerCurveKw, powerCurveLookup } from './power-curve';

const curve = {
  points: [
    { ms: 3, kw: 0.2 },
    { ms: 5, kw: 1.5 },
    { ms: 8, kw: 6 },
    { ms: 11, kw: 10 },
    { ms: 14, kw: 10.4 },
  ],
  cutInMs: 3,
  cutOutMs: 25,
};

describe('powerCurveLookup', () => {
  const kwAt = powerCurveLookup(curve);

  it('reads the points and the straight lines between them', () => {
    expect(kwAt(5)).toBe(1.5);
    expect(kwAt(6.5)).toBeCloseTo(3.75, 12);
    expect(kwAt(9.5)).toBeCloseTo(8, 12);
  });

  it('gives nothing below cut-in and from cut-out on', () => {
    expect(kwAt(2.99)).toBe(0);
    expect(kwAt(3)).toBe(0.2);
    expect(kwAt(24.99)).toBe(10.4);
    expect(kwAt(25)).toBe(0);
    expect(kwAt(40)).toBe(0);
  });

  it('holds the end points inside cut-in..cut-out', () => {
    const late = powerCurveLookup({ ...curve, cutInMs: 2 });
    expect(late(2.5)).toBe(0.2);
  });

  it('stays between the neighbouring points of the curve', () => {
    fc.assert(
      fc.property(fc.double({ min: 3, max: 14, noNaN: true }), (v) => {
        const p = kwAt(v);
        const i = curve.points.findIndex((pt) => pt.ms >= v);
        const hi = curve.points[i];
        const lo = curve.points[Math.max(0, i - 1)];
        if (hi === undefined || lo === undefined) throw new Error('curve covers 3..14');
        expect(p).toBeGreaterThanOrEqual(Math.min(lo.kw, hi.kw) - 1e-12);
        expect(p).toBeLessThanOrEqual(Math.max(lo.kw, hi.kw) + 1e-12);
      }),
    );
  });

  it('throws RangeError for a bad curve or speed', () => {
    expect(() => powerCurveLookup({ ...curve, points: [] })).toThrow(/at least one/);
    expect(() => powerCurveLookup({ ...curve, cutOutMs: 3 })).toThrow(/cutOutMs/);
    expect(() => powerCurveLookup({ ...curve, points: [{ ms: 5, kw: 1 }, { ms: 5, kw: 2 }] })).toThrow(/points\[1\]\.ms/);
    expect(() => powerCurveLookup({ ...curve, points: [{ ms: 5, kw: -1 }] })).toThrow(/points\[0\]\.kw/);
    expect(() => kwAt(Number.NaN)).toThrow(/windMs/);
  });

  it('has a one-shot form', () => {
    expect(powerCurveKw(curve, 8)).toBe(6);
  });
});
