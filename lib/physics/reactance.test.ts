import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { reactanceOhm, reactanceOhmFast } from './reactance';

describe('reactanceOhm', () => {
  it('is 2πfL', () => {
    // 1 H at 50 Hz: 314.16 Ω (textbook inductive reactance, X = ωL).
    expect(reactanceOhm(50, 1000)).toBeCloseTo(314.159265, 5);
    expect(reactanceOhm(0, 10)).toBe(0);
    expect(reactanceOhm(60, 0)).toBe(0);
  });

  it('names a bad value', () => {
    expect(() => reactanceOhm(-1, 1)).toThrow(/hz.*-1/);
    expect(() => reactanceOhm(50, -2)).toThrow(/mh.*-2/);
  });
});

describe('reactanceOhmFast', () => {
  it('is reactanceOhm without the checks', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 500, noNaN: true }), fc.double({ min: 0, max: 100, noNaN: true }), (hz, mh) => {
        expect(reactanceOhmFast(hz, mh)).toBe(reactanceOhm(hz, mh));
      }),
    );
  });
});
