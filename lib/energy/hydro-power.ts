/**
 * Electrical power of a hydro unit from its water: P = ρ · g · Q · H · η
 * (hydraulic power of a flow Q falling through net head H, times the
 * water-to-wire efficiency; contract, section 5).
 */

/** Density of water, kg/m³, as the contract fixes it (fresh water is 999.97 at 4 °C, 998.2 at 20 °C). */
export const WATER_DENSITY_KG_M3 = 1000;

/** Standard acceleration of gravity, m/s²: the conventional value of the 3rd CGPM (1901), kept in ISO 80000-3. */
export const STANDARD_GRAVITY_M_S2 = 9.80665;

/**
 * Electrical power, kW, of `flowM3s` m³/s through `headM` m net head at water-to-wire `efficiency` (0..1).
 * @example hydroPowerKw(1, 10, 0.8) // 78.4532
 */
export function hydroPowerKw(flowM3s: number, headM: number, efficiency: number): number {
  if (!(flowM3s >= 0) || !Number.isFinite(flowM3s)) throw new RangeError(`flowM3s must be 0 m³/s or more, got ${flowM3s}`);
  if (!(headM >= 0) || !Number.isFinite(headM)) throw new RangeError(`headM must be 0 m or more, got ${headM}`);
  if (!(efficiency >= 0 && efficiency <= 1)) throw new RangeError(`efficiency must be within 0..1, got ${efficiency}`);
  return (WATER_DENSITY_KG_M3 * STANDARD_GRAVITY_M_S2 * flowM3s * headM * efficiency) / 1000;
}
