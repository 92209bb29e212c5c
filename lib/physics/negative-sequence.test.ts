import { describe, expect, it } from 'vitest';
import { negativeSequenceUnbalancePct } from './negative-sequence';

describe('negativeSequenceUnbalancePct', () => {
  it('is zero for a balanced set', () => {
    expect(negativeSequenceUnbalancePct(400, 400, 400)).toBeCloseTo(0, 6);
  });

  it('is 100 % for a flat triangle (single-phase condition) and undefined when no triangle closes', () => {
    expect(negativeSequenceUnbalancePct(200, 200, 400)).toBeCloseTo(100, 4);
    expect(negativeSequenceUnbalancePct(100, 100, 400)).toBeUndefined();
    expect(negativeSequenceUnbalancePct(0, 0, 0)).toBeUndefined();
  });

  it('names a bad value', () => {
    expect(() => negativeSequenceUnbalancePct(Number.NaN, 1, 1)).toThrow(/uab.*NaN/);
  });
});
