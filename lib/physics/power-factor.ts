/**
 * Displacement power factor of a three-phase terminal from measured power,
 * line voltage and current: cos φ = P / (√3 · V_LL · I).
 */
import { SQRT3 } from './emf';

/**
 * cos φ from `kw` kW, `voltsLl` V line-to-line and `currentA` A per phase, capped at ±1;
 * undefined when voltage or current is zero (nothing to divide by).
 * @example powerFactorFromPower({ kw: 10, voltsLl: 400, currentA: 16 }) // 0.902 (10000 / (√3·400·16))
 */
export function powerFactorFromPower(p: { readonly kw: number; readonly voltsLl: number; readonly currentA: number }): number | undefined {
  if (!Number.isFinite(p.kw)) throw new RangeError(`kw must be a finite number, got ${p.kw}`);
  if (!(p.voltsLl >= 0)) throw new RangeError(`voltsLl must be 0 V or more, got ${p.voltsLl}`);
  if (!(p.currentA >= 0)) throw new RangeError(`currentA must be 0 A or more, got ${p.currentA}`);
  const apparentW = SQRT3 * p.voltsLl * p.currentA;
  if (apparentW === 0 || !Number.isFinite(apparentW)) return undefined;
  return powerFactorOfLoad(p.kw, p.voltsLl, p.currentA);
}

/**
 * cos φ of the electrical load, kW / (√3·V_LL·I) capped at ±1, for loops over
 * every sample diagnosed: unity without `kw` (NaN), voltage or current, as
 * the contract takes it (section 5). {@link powerFactorFromPower} is this with
 * the checks.
 * @example powerFactorOfLoad(10, 400, 16) // 0.902
 */
export function powerFactorOfLoad(kw: number, voltsLl: number, currentA: number): number {
  if (!(currentA > 0) || kw !== kw || !(voltsLl > 0)) return 1;
  // Measurement noise can push the ratio past 1; the contract caps it (section 5).
  return Math.max(-1, Math.min(1, (kw * 1000) / (SQRT3 * voltsLl * currentA)));
}
