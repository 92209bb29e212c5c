/** Line-voltage unbalance against the NEMA MG 1 definition and its worked example. */
import { describe, expect, it } from 'vitest';
import { lineVoltageUnbalancePct } from '@/lib/physics/unbalance';

describe('NEMA MG 1 line-voltage unbalance', () => {
  it('460, 467, 450 V gives 1.96 %', () => {
    // NEMA MG 1, part 14.35, example of percent unbalance (from memory): average 459 V,
    // maximum deviation 9 V (450 V), 100 · 9 / 459 = 1.96 %. Arithmetic checked by hand.
    expect(lineVoltageUnbalancePct(460, 467, 450)).toBeCloseTo(1.96, 2);
    expect(lineVoltageUnbalancePct(460, 467, 450)).toBeCloseTo((100 * 9) / 459, 12);
  });

  it('a single 1 % low line of a 400 V set is 0.67 % unbalance', () => {
    // Same definition: mean (400 + 400 + 396)/3 = 398.67, deviation 2.67 V -> 0.669 %.
    expect(lineVoltageUnbalancePct(400, 400, 396)).toBeCloseTo(((1196 / 3 - 396) / (1196 / 3)) * 100, 12);
    expect(lineVoltageUnbalancePct(400, 400, 396)).toBeCloseTo(0.669, 3);
  });
});
