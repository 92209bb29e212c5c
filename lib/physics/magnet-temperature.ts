/**
 * Temperature dependence of a permanent magnet's flux, and with it of the
 * EMF constant Ke: Ke(T) = Ke(Tref) · (1 + α/100 · (T − Tref)). The
 * coefficient α is the reversible temperature coefficient of remanence Br.
 */
import type { MagnetMaterial } from '@/lib/contract/nameplate';

/**
 * Reversible temperature coefficients of remanence, % per °C. Typical values
 * of materials handbooks (from memory): sintered NdFeB −0.12, SmCo −0.035,
 * hard ferrite −0.20.
 */
export const REMANENCE_COEFF_PCT_PER_C: Readonly<Record<MagnetMaterial, number>> = {
  ndfeb: -0.12,
  smco: -0.035,
  ferrite: -0.2,
};

/**
 * Reversible coefficient of remanence in % per °C for `material`, or `overridePctPerC` when given.
 * @example remanenceCoeffPctPerC('ndfeb') // -0.12
 */
export function remanenceCoeffPctPerC(material: MagnetMaterial, overridePctPerC?: number): number {
  if (overridePctPerC !== undefined) {
    if (!Number.isFinite(overridePctPerC) || overridePctPerC >= 0) {
      throw new RangeError(`overridePctPerC must be a negative % per °C, got ${overridePctPerC}`);
    }
    return overridePctPerC;
  }
  const coeff = REMANENCE_COEFF_PCT_PER_C[material];
  if (coeff === undefined) throw new RangeError(`material must be ndfeb, smco or ferrite, got ${String(material)}`);
  return coeff;
}

/**
 * Factor by which Ke (and remanence) changes from `refC` °C to `magnetC` °C with `coeffPctPerC` % per °C.
 * @example keTemperatureFactor(-0.12, 20, 70) // 0.94 (NdFeB 50 °C above its reference)
 */
export function keTemperatureFactor(coeffPctPerC: number, refC: number, magnetC: number): number {
  if (!Number.isFinite(coeffPctPerC)) throw new RangeError(`coeffPctPerC must be a finite % per °C, got ${coeffPctPerC}`);
  if (!Number.isFinite(refC)) throw new RangeError(`refC must be a finite °C, got ${refC}`);
  if (!Number.isFinite(magnetC)) throw new RangeError(`magnetC must be a finite °C, got ${magnetC}`);
  const factor = keTemperatureFactorFast(coeffPctPerC, refC, magnetC);
  if (!(factor > 0)) {
    throw new RangeError(`magnetC ${magnetC} °C is outside the linear range of the coefficient ${coeffPctPerC} %/°C`);
  }
  return factor;
}

/**
 * {@link keTemperatureFactor} without the checks, for loops over every sample
 * diagnosed: 0 or below past the coefficient's linear range, where the checked
 * form throws; the caller decides what that means.
 * @example keTemperatureFactorFast(-0.12, 20, 70) // 0.94
 */
export function keTemperatureFactorFast(coeffPctPerC: number, refC: number, magnetC: number): number {
  return 1 + (coeffPctPerC / 100) * (magnetC - refC);
}

/**
 * Ke in V per 1000 rpm at `magnetC` °C, from `keVPerKrpm` at `refC` °C.
 * @example keAtMagnetC({ keVPerKrpm: 400, refC: 20, magnetC: -20, coeffPctPerC: -0.12 }) // 419.2
 */
export function keAtMagnetC(p: {
  readonly keVPerKrpm: number;
  readonly refC: number;
  readonly magnetC: number;
  readonly coeffPctPerC: number;
}): number {
  if (!(p.keVPerKrpm > 0) || !Number.isFinite(p.keVPerKrpm)) {
    throw new RangeError(`keVPerKrpm must be above 0 V per 1000 rpm, got ${p.keVPerKrpm}`);
  }
  return p.keVPerKrpm * keTemperatureFactor(p.coeffPctPerC, p.refC, p.magnetC);
}
