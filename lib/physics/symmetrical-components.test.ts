import { describe, expect, it } from 'vitest';
import { abs, polar } from './complex';
import { negativeSequencePctOfPhasors, sequenceComponents } from './symmetrical-components';

const deg = (d: number) => (d * Math.PI) / 180;

describe('sequenceComponents', () => {
  it('finds only positive sequence in a balanced a-b-c set', () => {
    const s = sequenceComponents(polar(230, 0), polar(230, deg(-120)), polar(230, deg(120)));
    expect(abs(s.positive)).toBeCloseTo(230, 9);
    expect(abs(s.negative)).toBeCloseTo(0, 9);
    expect(abs(s.zero)).toBeCloseTo(0, 9);
  });

  it('finds only negative sequence in an a-c-b set and only zero sequence in equal phasors', () => {
    const neg = sequenceComponents(polar(100, 0), polar(100, deg(120)), polar(100, deg(-120)));
    expect(abs(neg.negative)).toBeCloseTo(100, 9);
    expect(abs(neg.positive)).toBeCloseTo(0, 9);
    const zero = sequenceComponents(polar(50, 1), polar(50, 1), polar(50, 1));
    expect(abs(zero.zero)).toBeCloseTo(50, 9);
    expect(negativeSequencePctOfPhasors(polar(50, 1), polar(50, 1), polar(50, 1))).toBeUndefined();
  });
});
