/**
 * Resistance of a copper winding at its working temperature.
 */

/**
 * Temperature coefficient of resistance of annealed copper at 20 °C, per °C:
 * 0.00393 (IEC 60028, international standard of resistance for copper).
 */
export const COPPER_TEMP_COEFF_PER_C = 0.00393;

/** Reference temperature of nameplate winding resistance, °C (IEC 60028). */
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
  return ohmAt20 * (1 + COPPER_TEMP_COEFF_PER_C * (windingC - COPPER_REF_C));
}
