/**
 * The load and temperature correction of one sample (contract, section 5),
 * in one place for the diagnosis's Ke fit and the voltage-against-speed chart,
 * so that the chart shows exactly the EMF the verdict rests on. Readings are
 * plain numbers with NaN for an absent value, as the column store keeps them.
 */
import { SQRT3, recoverPhaseEmfFast } from '@/lib/physics/emf';
import { COPPER_REF_C, COPPER_TEMP_COEFF_PER_C } from '@/lib/physics/winding-resistance';

/**
 * Winding temperature of a sample, °C: stator, else ambient, else 20 °C.
 * @example windingTempC(NaN, 12) // 12
 */
export function windingTempC(statorC: number, ambientC: number): number {
  return statorC === statorC ? statorC : ambientC === ambientC ? ambientC : COPPER_REF_C;
}

/**
 * Magnet temperature of a sample, °C: stator, else ambient, else the nameplate's reference.
 * @example magnetTempC(NaN, NaN, 20) // 20
 */
export function magnetTempC(statorC: number, ambientC: number, keRefC: number): number {
  return statorC === statorC ? statorC : ambientC === ambientC ? ambientC : keRefC;
}

/**
 * Phase resistance at the winding temperature, Ω (copper, +0.393 % per °C from 20 °C).
 * @example windingOhm(0.35, 120) // 0.4876
 */
export function windingOhm(phaseOhmAt20: number, windingC: number): number {
  return phaseOhmAt20 * (1 + COPPER_TEMP_COEFF_PER_C * (windingC - COPPER_REF_C));
}

/**
 * cos φ of the load, kW / (√3·V_LL·I) capped at ±1; unity without `kw` (NaN) or current.
 * @example loadPowerFactor(10, 400, 16) // 0.902
 */
export function loadPowerFactor(kw: number, voltsLl: number, amps: number): number {
  if (!(amps > 0) || kw !== kw || !(voltsLl > 0)) return 1;
  return Math.max(-1, Math.min(1, (kw * 1000) / (SQRT3 * voltsLl * amps)));
}

/**
 * Open-circuit line EMF behind the terminals, V: E = V + I·(R + jX) per phase,
 * the current lagging V by φ (`pf` = cos φ).
 * @example lineEmfBehindTerminals(400, 0, 0.35, 3.0, 1) // 400 (open circuit)
 */
export function lineEmfBehindTerminals(voltsLl: number, amps: number, ohm: number, xOhm: number, pf: number): number {
  return SQRT3 * recoverPhaseEmfFast(voltsLl / SQRT3, amps, ohm, xOhm, pf);
}
