import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { electricalHz, electricalHzFast, rpmFromHz } from './synchronous-speed';

describe('synchronous speed', () => {
  it('inverts exactly', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 40 }), fc.double({ min: 0, max: 5000, noNaN: true }), (pairs, rpm) => {
        expect(rpmFromHz(2 * pairs, electricalHz(2 * pairs, rpm))).toBeCloseTo(rpm, 9);
      }),
    );
  });

  it('rejects odd or missing poles, naming the value', () => {
    expect(() => electricalHz(7, 100)).toThrow(/poles.*7/);
    expect(() => rpmFromHz(0, 50)).toThrow(/poles.*0/);
    expect(() => electricalHz(4, Number.NaN)).toThrow(/rpm.*NaN/);
  });
});

describe('electricalHzFast', () => {
  it('is electricalHz without the checks', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 40 }), fc.double({ min: -5000, max: 5000, noNaN: true }), (pairs, rpm) => {
        expect(electricalHzFast(2 * pairs, rpm)).toBe(electricalHz(2 * pairs, rpm));
      }),
    );
  });
});
