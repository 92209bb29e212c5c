/**
 * Symmetrical components of a three-phase set of phasors (Fortescue, 1918):
 * V0 = (Va + Vb + Vc)/3, V1 = (Va + a·Vb + a²·Vc)/3, V2 = (Va + a²·Vb + a·Vc)/3
 * with a = 1∠120° and phase sequence a-b-c.
 */
import { abs, add, mul, scale, ROTATE_120, type Complex } from './complex';

const ROTATE_240 = mul(ROTATE_120, ROTATE_120);

/** Zero-, positive- and negative-sequence phasors, same unit as the input. */
export interface SequenceComponents {
  readonly zero: Complex;
  readonly positive: Complex;
  readonly negative: Complex;
}

/**
 * Zero-, positive- and negative-sequence components of the phasors `a`, `b`, `c` (V or A).
 * @example sequenceComponents(polar(230, 0), polar(230, -2.0944), polar(230, 2.0944)).positive // ≈ { re: 230, im: 0 }
 */
export function sequenceComponents(a: Complex, b: Complex, c: Complex): SequenceComponents {
  return {
    zero: scale(add(add(a, b), c), 1 / 3),
    positive: scale(add(add(a, mul(ROTATE_120, b)), mul(ROTATE_240, c)), 1 / 3),
    negative: scale(add(add(a, mul(ROTATE_240, b)), mul(ROTATE_120, c)), 1 / 3),
  };
}

/**
 * Negative-sequence unbalance |V2|/|V1| in % of the phasors `a`, `b`, `c`; undefined when |V1| is 0.
 * @example negativeSequencePctOfPhasors(polar(230, 0), polar(230, -2.0944), polar(230, 2.0944)) // ≈ 0
 */
export function negativeSequencePctOfPhasors(a: Complex, b: Complex, c: Complex): number | undefined {
  const s = sequenceComponents(a, b, c);
  const positive = abs(s.positive);
  // A positive sequence at rounding level of the inputs is no positive sequence.
  if (positive <= 1e-12 * (abs(a) + abs(b) + abs(c))) return undefined;
  return (100 * abs(s.negative)) / positive;
}
