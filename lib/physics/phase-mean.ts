/**
 * The mean of a three-phase reading (three line voltages, or three phase
 * currents) over the phases a device reported.
 */

/**
 * Mean of the values among three that are not NaN (NaN stands for a phase
 * not reported); NaN when none is. Three arguments, no array: it runs for
 * every sample stored and every sample diagnosed.
 * @example meanOfPhases(230, 232, Number.NaN) // 231
 */
export function meanOfPhases(a: number, b: number, c: number): number {
  let sum = 0;
  let n = 0;
  if (a === a) {
    sum += a;
    n++;
  }
  if (b === b) {
    sum += b;
    n++;
  }
  if (c === c) {
    sum += c;
    n++;
  }
  return n === 0 ? Number.NaN : sum / n;
}
