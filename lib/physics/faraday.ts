/**
 * Faraday's law for rotating windings, the reason Ke exists: a coil of N
 * turns turning at ω in a flux Φ has an EMF of peak N·Φ·ω, so the EMF of a
 * permanent-magnet machine is proportional to speed. For a distributed
 * winding the RMS phase EMF is E = √2·π·f·N·Φ·k_w ≈ 4.44·f·N·Φ·k_w (the EMF
 * equation of AC machines, in any electrical-machines textbook).
 */

/** √2·π, the "4.44" of the AC-machine EMF equation (RMS of a sinusoid of peak N·Φ·ω). */
export const EMF_EQUATION_FACTOR = Math.SQRT2 * Math.PI;

/**
 * Peak EMF in V of a flat coil of `turns` turns and `areaM2` m² turning at `rpm` rev/min in a uniform field of `tesla` T.
 * @example rotatingCoilPeakEmf({ turns: 8, areaM2: 0.09, tesla: 0.5, rpm: 3600 }) // 135.7 (8·0.5·0.09·377)
 */
export function rotatingCoilPeakEmf(p: { readonly turns: number; readonly areaM2: number; readonly tesla: number; readonly rpm: number }): number {
  if (!(p.turns > 0) || !Number.isFinite(p.turns)) throw new RangeError(`turns must be above 0, got ${p.turns}`);
  if (!(p.areaM2 >= 0) || !Number.isFinite(p.areaM2)) throw new RangeError(`areaM2 must be 0 m² or more, got ${p.areaM2}`);
  if (!Number.isFinite(p.tesla)) throw new RangeError(`tesla must be a finite number, got ${p.tesla}`);
  if (!(p.rpm >= 0) || !Number.isFinite(p.rpm)) throw new RangeError(`rpm must be 0 rev/min or more, got ${p.rpm}`);
  const omega = (2 * Math.PI * p.rpm) / 60;
  return p.turns * Math.abs(p.tesla) * p.areaM2 * omega;
}

/**
 * RMS phase EMF in V of `turns` series turns per phase with `fluxWb` Wb per pole at `hz` Hz and winding factor `windingFactor`.
 * @example phaseEmfRms({ hz: 50, turns: 100, fluxWb: 0.01, windingFactor: 0.95 }) // 211.0
 */
export function phaseEmfRms(p: { readonly hz: number; readonly turns: number; readonly fluxWb: number; readonly windingFactor?: number }): number {
  const kw = p.windingFactor ?? 1;
  if (!(p.hz >= 0) || !Number.isFinite(p.hz)) throw new RangeError(`hz must be 0 Hz or more, got ${p.hz}`);
  if (!(p.turns > 0) || !Number.isFinite(p.turns)) throw new RangeError(`turns must be above 0, got ${p.turns}`);
  if (!(p.fluxWb >= 0) || !Number.isFinite(p.fluxWb)) throw new RangeError(`fluxWb must be 0 Wb or more, got ${p.fluxWb}`);
  if (!(kw > 0 && kw <= 1)) throw new RangeError(`windingFactor must be above 0 and at most 1, got ${kw}`);
  return EMF_EQUATION_FACTOR * p.hz * p.turns * p.fluxWb * kw;
}

/**
 * Ke in line-to-line V per 1000 rpm of a star-connected machine with `poles` poles, `turns` series turns per phase,
 * `fluxWb` Wb per pole and winding factor `windingFactor`.
 * @example keFromWinding({ poles: 24, turns: 60, fluxWb: 0.004, windingFactor: 0.95 }) // 350.9 (√3 · 4.443 · 200 Hz · 60 · 0.004 Wb · 0.95)
 */
export function keFromWinding(p: { readonly poles: number; readonly turns: number; readonly fluxWb: number; readonly windingFactor?: number }): number {
  if (!Number.isInteger(p.poles) || p.poles < 2 || p.poles % 2 !== 0) throw new RangeError(`poles must be an even whole number of at least 2, got ${p.poles}`);
  const hzAt1000 = (p.poles * 1000) / 120;
  return Math.sqrt(3) * phaseEmfRms({ hz: hzAt1000, turns: p.turns, fluxWb: p.fluxWb, windingFactor: p.windingFactor });
}
