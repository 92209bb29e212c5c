import { describe, expect, it } from 'vitest';
import { powerFactorFromPower } from './power-factor';

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
