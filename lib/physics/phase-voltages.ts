/**
 * Phase (line-to-neutral) voltage magnitudes from the three line-voltage
 * magnitudes. Line voltages fix the triangle of the three phase terminals but
 * not where the star point sits; we take the triangle's centroid, which is
 * the star point without zero-sequence voltage (line voltages cannot show
 * zero sequence). The distance from a vertex to the centroid is 2/3 of its
 * median: |Va| = √(2·Uab² + 2·Uca² − Ubc²) / 3.
 */

/**
 * Phase voltages [Va, Vb, Vc] in V from line voltages `uab`, `ubc`, `uca` in V;
 * undefined when the three readings cannot close a triangle.
 * @example phaseVoltsFromLines(400, 400, 400) // [230.94, 230.94, 230.94]
 */
export function phaseVoltsFromLines(uab: number, ubc: number, uca: number): [number, number, number] | undefined {
  for (const [name, v] of [['uab', uab], ['ubc', ubc], ['uca', uca]] as const) {
    if (!Number.isFinite(v) || v < 0) throw new RangeError(`${name} must be 0 V or more, got ${v}`);
  }
  if (uab > ubc + uca || ubc > uab + uca || uca > uab + ubc) return undefined;
  const ab2 = uab * uab;
  const bc2 = ubc * ubc;
  const ca2 = uca * uca;
  return [
    Math.sqrt(Math.max(0, 2 * ab2 + 2 * ca2 - bc2)) / 3,
    Math.sqrt(Math.max(0, 2 * ab2 + 2 * bc2 - ca2)) / 3,
    Math.sqrt(Math.max(0, 2 * bc2 + 2 * ca2 - ab2)) / 3,
  ];
}
