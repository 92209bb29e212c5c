/**
 * Speed and electrical frequency of a synchronous (permanent-magnet) machine:
 * f = p · n / 120 with p poles and n in rev/min. A permanent-magnet machine
 * has no slip, so the terminal frequency is an exact speed measurement.
 */

/** Minutes-to-seconds factor and pole pairs folded together: f = p·n/120 (any electrical-machines textbook). */
export const POLE_RPM_PER_HZ = 120;

function checkPoles(poles: number): void {
  if (!Number.isInteger(poles) || poles < 2 || poles % 2 !== 0) {
    throw new RangeError(`poles must be an even whole number of at least 2, got ${poles}`);
  }
}

/**
 * Electrical frequency in Hz of a machine with `poles` poles turning at `rpm` rev/min.
 * @example electricalHz(4, 1500) // 50
 */
export function electricalHz(poles: number, rpm: number): number {
  checkPoles(poles);
  if (!Number.isFinite(rpm)) throw new RangeError(`rpm must be a finite number, got ${rpm}`);
  return electricalHzFast(poles, rpm);
}

/**
 * {@link electricalHz} without the checks, for loops over every sample diagnosed (the caller's poles are valid).
 * @example electricalHzFast(4, 1500) // 50
 */
export function electricalHzFast(poles: number, rpm: number): number {
  return (poles * rpm) / POLE_RPM_PER_HZ;
}

/**
 * Shaft speed in rev/min that produces `hz` Hz on a machine with `poles` poles.
 * @example rpmFromHz(24, 60) // 300
 */
export function rpmFromHz(poles: number, hz: number): number {
  checkPoles(poles);
  if (!Number.isFinite(hz)) throw new RangeError(`hz must be a finite number, got ${hz}`);
  return (POLE_RPM_PER_HZ * hz) / poles;
}
