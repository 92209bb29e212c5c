import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { lineVoltageUnbalancePct } from './unbalance';

describe('lineVoltageUnbalancePct', () => {
  it('is zero when balanced and scale-free', () => {
    expect(lineVoltageUnbalancePct(400, 400, 400)).toBe(0);
    fc.assert(
      fc.property(
        fc.double({ min: 100, max: 500, noNaN: true }),
        fc.double({ min: 100, max: 500, noNaN: true }),
        fc.double({ min: 100, max: 500, noNaN: true }),
        fc.double({ min: 0.01, max: 20, noNaN: true }),
        (a, b, c, k) => {
          expect(lineVoltageUnbalancePct(a * k, b * k, c * k)).toBeCloseTo(lineVoltageUnbalancePct(a, b, c)!, 9);
          expect(lineVoltageUnbalancePct(b, c, a)).toBeCloseTo(lineVoltageUnbalancePct(a, b, c)!, 12);
        },
      ),
    );
  });

  it('is undefined for a dead machine and names a bad value', () => {
    expect(lineVoltageUnbalancePct(0, 0, 0)).toBeUndefined();
    expect(() => lineVoltageUnbalancePct(400, -1, 400)).toThrow(/vbc.*-1/);
  });
});
