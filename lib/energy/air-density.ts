/**
 * Normalising a measured wind speed to the reference air density of a power
 * curve, as IEC 61400-12-1 does for turbines with active power control:
 * V_n = V · (ρ / ρ₀)^(1/3). The kinetic power of the wind is ½·ρ·A·V³, so this
 * is the speed that carries the same power in air of density ρ₀.
 */

/**
 * Reference air density of a power curve, kg/m³: the ISO 2533 standard
 * atmosphere at sea level and 15 °C, the reference IEC 61400-12-1 reports
 * power curves at (contract, section 2).
 */
export const REFERENCE_AIR_DENSITY_KG_M3 = 1.225;

/**
 * Wind speed normalised to `referenceKgM3`, m/s, from the measured speed (m/s) and air density (kg/m³).
 * @example normaliseWindSpeedMs(8, 1.0) // 7.4767 (8 · (1.0 / 1.225)^(1/3) = 7.47672): thin air carries less power at the same speed
 */
export function normaliseWindSpeedMs(
  windMs: number,
  airKgM3: number,
  referenceKgM3: number = REFERENCE_AIR_DENSITY_KG_M3,
): number {
  if (!(windMs >= 0) || !Number.isFinite(windMs)) throw new RangeError(`windMs must be 0 m/s or more, got ${windMs}`);
  if (!(airKgM3 > 0) || !Number.isFinite(airKgM3)) throw new RangeError(`airKgM3 must be above 0 kg/m³, got ${airKgM3}`);
  if (!(referenceKgM3 > 0) || !Number.isFinite(referenceKgM3)) {
    throw new RangeError(`referenceKgM3 must be above 0 kg/m³, got ${referenceKgM3}`);
  }
  return windMs * Math.cbrt(airKgM3 / referenceKgM3);
}
