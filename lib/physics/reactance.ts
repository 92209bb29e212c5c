/**
 * Synchronous reactance of a stator phase.
 */

/**
 * Reactance X = 2π·f·L in Ω of `mh` millihenry at `hz` Hz.
 * @example reactanceOhm(50, 10) // 3.141592653589793
 */
export function reactanceOhm(hz: number, mh: number): number {
  if (!(hz >= 0) || !Number.isFinite(hz)) throw new RangeError(`hz must be 0 Hz or more, got ${hz}`);
  if (!(mh >= 0) || !Number.isFinite(mh)) throw new RangeError(`mh must be 0 mH or more, got ${mh}`);
  return reactanceOhmFast(hz, mh);
}

/**
 * {@link reactanceOhm} without the checks, for loops over every sample diagnosed (the caller's values are finite).
 * @example reactanceOhmFast(50, 10) // 3.141592653589793
 */
export function reactanceOhmFast(hz: number, mh: number): number {
  return 2 * Math.PI * hz * (mh / 1000);
}
