import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { powerFactorFromPower, powerFactorOfLoad } from './power-factor';

describe('powerFactorFromPower', () => {
  it('is P over √3·V·I', () => {
    expect(powerFactorFromPower({ kw: 10, voltsLl: 400, currentA: 16 })).toBeCloseTo(10000 / (Math.sqrt(3) * 400 * 16), 12);
  });

  it('caps noise past unity and reports nothing to divide by as undefined', () => {
    expect(powerFactorFromPower({ kw: 12, voltsLl: 400, currentA: 16 })).toBe(1);
    expect(powerFactorFromPower({ kw: -12, voltsLl: 400, currentA: 16 })).toBe(-1);
    expect(powerFactorFromPower({ kw: 1, voltsLl: 400, currentA: 0 })).toBeUndefined();
  });

  it('names a bad value', () => {
    expect(() => powerFactorFromPower({ kw: 1, voltsLl: -4, currentA: 1 })).toThrow(/voltsLl.*-4/);
  });
});

describe('powerFactorOfLoad (the per-sample correction of the diagnosis and the chart)', () => {
  it('takes cos φ from kW, V and I, capped at 1, unity without kW or current', () => {
    // 10 kW at 400 V and 16 A: 10000 / (√3·400·16) = 0.90211 (worked by hand).
    expect(powerFactorOfLoad(10, 400, 16)).toBeCloseTo(0.90211, 5);
    expect(powerFactorOfLoad(20, 400, 16)).toBe(1);
    expect(powerFactorOfLoad(Number.NaN, 400, 16)).toBe(1);
    expect(powerFactorOfLoad(10, 400, 0)).toBe(1);
  });

  it('is powerFactorFromPower wherever that one has an answer', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -200, max: 200, noNaN: true }),
        fc.double({ min: 0, max: 2000, noNaN: true }),
        fc.double({ min: 0, max: 100, noNaN: true }),
        (kw, voltsLl, currentA) => {
          const checked = powerFactorFromPower({ kw, voltsLl, currentA });
          if (checked !== undefined) expect(powerFactorOfLoad(kw, voltsLl, currentA)).toBe(checked);
          else if (voltsLl === 0 || currentA === 0) expect(powerFactorOfLoad(kw, voltsLl, currentA)).toBe(1);
        },
      ),
    );
  });
});
