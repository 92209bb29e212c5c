/**
 * Negative-sequence voltage unbalance from the three line-voltage magnitudes
 * alone, as IEC 61000-4-30 (power quality measurement methods, supply
 * voltage unbalance) gives it:
 *   u2 = √((1 − √(3 − 6β)) / (1 + √(3 − 6β))),
 *   β = (Uab⁴ + Ubc⁴ + Uca⁴) / (Uab² + Ubc² + Uca²)².
 * Line voltages carry no zero sequence, so their magnitudes fix |V2|/|V1|.
 */

/**
 * IEC 61000-4-30 negative-sequence unbalance u2 in % of line voltages `uab`, `ubc`, `uca` in V;
 * undefined when the three cannot close a triangle (inconsistent readings) or are all zero.
 * @example negativeSequenceUnbalancePct(460, 467, 450) // ≈ 2.15
 */
export function negativeSequenceUnbalancePct(uab: number, ubc: number, uca: number): number | undefined {
  for (const [name, v] of [['uab', uab], ['ubc', ubc], ['uca', uca]] as const) {
    if (!Number.isFinite(v) || v < 0) throw new RangeError(`${name} must be 0 V or more, got ${v}`);
  }
  const s2 = uab * uab + ubc * ubc + uca * uca;
  if (s2 === 0) return undefined;
  const beta = (uab ** 4 + ubc ** 4 + uca ** 4) / (s2 * s2);
  const root2 = 3 - 6 * beta;
  // β is 1/3 for a balanced set and 1/2 for a degenerate (flat) triangle.
  if (root2 < -1e-12) return undefined;
  // Rounding can put a balanced set a hair past β = 1/3; clamp to the balanced value.
  const root = Math.sqrt(Math.min(1, Math.max(0, root2)));
  return 100 * Math.sqrt((1 - root) / (1 + root));
}
