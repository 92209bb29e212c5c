/**
 * Resistance of a copper winding at its working temperature.
 */

/**
 * Temperature coefficient of resistance of annealed copper at 20 °C, per °C:
 * 0.00393, from the International Annealed Copper Standard (IEC 60028, 1925,
 * International standard of resistance for copper; from memory). Its inferred
 * zero, 1/0.00393 − 20 = 234.5 °C, is the copper constant of the usual
 * winding-resistance temperature correction (IEEE Std 118 and 115; IEC 60034-1
 * rounds it to 235; from memory).
 */
export const COPPER_TEMP_COEFF_PER_C = 0.00393;

/** Reference temperature of nameplate winding resistance, °C: the 20 °C at which IEC 60028 states copper's coefficient. */
export const COPPER_REF_C = 20;

/**
 * Copper winding resistance in Ω at `windingC` °C, from `ohmAt20` Ω at 20 °C.
 * @example copperOhmAt(0.5, 75) // 0.6080750000000001 (0.5 · (1 + 0.00393 · 55))
 */
export function copperOhmAt(ohmAt20: number, windingC: number): number {
  if (!(ohmAt20 >= 0) || !Number.isFinite(ohmAt20)) throw new RangeError(`ohmAt20 must be 0 Ω or more, got ${ohmAt20}`);
  if (!Number.isFinite(windingC) || windingC < -273.15) {
    throw new RangeError(`windingC must be a temperature above absolute zero, got ${windingC}`);
  }
  return copperOhmAtFast(ohmAt20, windingC);
}

/**
 * {@link copperOhmAt} without the checks, for loops over every sample diagnosed (the caller's values are finite).
 * @example copperOhmAtFast(0.35, 120) // 0.48755 (0.35 · (1 + 0.00393 · 100))
 */
export function copperOhmAtFast(ohmAt20: number, windingC: number): number {
  return ohmAt20 * (1 + COPPER_TEMP_COEFF_PER_C * (windingC - COPPER_REF_C));
}
