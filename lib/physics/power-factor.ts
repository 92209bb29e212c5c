/**
 * Displacement power factor of a three-phase terminal from measured power,
 * line voltage and current: cos φ = P / (√3 · V_LL · I).
 */

/**
 * cos φ from `kw` kW, `voltsLl` V line-to-line and `currentA` A per phase, capped at ±1;
 * undefined when voltage or current is zero (nothing to divide by).
 * @example powerFactorFromPower({ kw: 10, voltsLl: 400, currentA: 16 }) // 0.902 (10000 / (√3·400·16))
 */
export function powerFactorFromPower(p: { readonly kw: number; readonly voltsLl: number; readonly currentA: number }): number | undefined {
  if (!Number.isFinite(p.kw)) throw new RangeError(`kw must be a finite number, got ${p.kw}`);
  if (!(p.voltsLl >= 0)) throw new RangeError(`voltsLl must be 0 V or more, got ${p.voltsLl}`);
  if (!(p.currentA >= 0)) throw new RangeError(`currentA must be 0 A or more, got ${p.currentA}`);
  const apparentW = Math.sqrt(3) * p.voltsLl * p.currentA;
  if (apparentW === 0 || !Number.isFinite(apparentW)) return undefined;
  const pf = (p.kw * 1000) / apparentW;
  // Measurement noise can push the ratio past 1; the contract caps it (section 5).
  return Math.max(-1, Math.min(1, pf));
}
