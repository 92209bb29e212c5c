/**
 * Line-voltage unbalance as NEMA MG 1 defines it (part 14.35, "percent
 * unbalance"): 100 × maximum deviation of the line voltages from their
 * average, over the average.
 */

/**
 * NEMA MG 1 line-voltage unbalance in % of the three line-to-line voltages in V.
 * @example lineVoltageUnbalancePct(460, 467, 450) // 1.96 (max deviation 9 V from a 459 V mean)
 */
export function lineVoltageUnbalancePct(vab: number, vbc: number, vca: number): number | undefined {
  for (const [name, v] of [['vab', vab], ['vbc', vbc], ['vca', vca]] as const) {
    if (!Number.isFinite(v) || v < 0) throw new RangeError(`${name} must be 0 V or more, got ${v}`);
  }
  const mean = (vab + vbc + vca) / 3;
  if (mean === 0) return undefined;
  const deviation = Math.max(Math.abs(vab - mean), Math.abs(vbc - mean), Math.abs(vca - mean));
  return (100 * deviation) / mean;
}
