/**
 * Electrical power of a wind unit read off its power curve (contract,
 * section 5): straight lines between the curve's points, nothing below the
 * cut-in speed and nothing from the cut-out speed on.
 */

/** One point of a power curve: wind speed m/s (at 1.225 kg/m³) and power kW. */
export interface PowerCurvePoint {
  readonly ms: number;
  readonly kw: number;
}

/** A power curve with its cut-in and cut-out speeds, m/s. */
export interface PowerCurveSpec {
  readonly points: readonly PowerCurvePoint[];
  readonly cutInMs: number;
  readonly cutOutMs: number;
}

/**
 * Checks a curve once and returns a fast lookup from wind speed (m/s) to power (kW).
 * Between cut-in and cut-out, a speed below the first point reads the first
 * point's power and one above the last point reads the last point's power.
 * @example
 * const kwAt = powerCurveLookup({ points: [{ ms: 3, kw: 0 }, { ms: 11, kw: 10 }], cutInMs: 3, cutOutMs: 25 });
 * kwAt(7) // 5
 */
export function powerCurveLookup(spec: PowerCurveSpec): (windMs: number) => number {
  const { points, cutInMs, cutOutMs } = spec;
  if (points.length < 1) throw new RangeError('points must hold at least one point');
  if (!(cutInMs >= 0) || !Number.isFinite(cutInMs)) throw new RangeError(`cutInMs must be 0 m/s or more, got ${cutInMs}`);
  if (!(cutOutMs > cutInMs) || !Number.isFinite(cutOutMs)) {
    throw new RangeError(`cutOutMs must be above cutInMs (${cutInMs}), got ${cutOutMs}`);
  }
  const ms = new Float64Array(points.length);
  const kw = new Float64Array(points.length);
  points.forEach((point, i) => {
    if (!(point.ms >= 0) || !Number.isFinite(point.ms)) throw new RangeError(`points[${i}].ms must be 0 m/s or more, got ${point.ms}`);
    if (!(point.kw >= 0) || !Number.isFinite(point.kw)) throw new RangeError(`points[${i}].kw must be 0 kW or more, got ${point.kw}`);
    if (i > 0 && !(point.ms > (ms[i - 1] as number))) {
      throw new RangeError(`points[${i}].ms must rise from point to point, got ${point.ms} after ${ms[i - 1]}`);
    }
    ms[i] = point.ms;
    kw[i] = point.kw;
  });
  const lastIndex = points.length - 1;
  const firstMs = ms[0] as number;
  const lastMs = ms[lastIndex] as number;

  return (windMs: number): number => {
    if (!(windMs >= 0) || !Number.isFinite(windMs)) throw new RangeError(`windMs must be 0 m/s or more, got ${windMs}`);
    if (windMs < cutInMs || windMs >= cutOutMs) return 0;
    if (windMs <= firstMs) return kw[0] as number;
    if (windMs >= lastMs) return kw[lastIndex] as number;
    // Largest i with ms[i] <= windMs.
    let lo = 0;
    let hi = lastIndex;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if ((ms[mid] as number) <= windMs) lo = mid;
      else hi = mid;
    }
    const m0 = ms[lo] as number;
    const k0 = kw[lo] as number;
    return k0 + (((kw[hi] as number) - k0) * (windMs - m0)) / ((ms[hi] as number) - m0);
  };
}

/**
 * Power in kW at `windMs` m/s on a curve; for many speeds build {@link powerCurveLookup} once.
 * @example powerCurveKw({ points: [{ ms: 3, kw: 0 }, { ms: 11, kw: 10 }], cutInMs: 3, cutOutMs: 25 }, 25) // 0 (cut out)
 */
export function powerCurveKw(spec: PowerCurveSpec, windMs: number): number {
  return powerCurveLookup(spec)(windMs);
}
