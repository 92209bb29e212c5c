/**
 * The controls of a simulated unit's prime mover, one step at a time: the
 * wind unit's protection and grid connection, the hydro unit's run/stop on
 * the flow, the hydro inverter's maximum power point scans and the turbine's
 * efficiency off its best point. Pure functions of their arguments, so that
 * the machine model (machine.ts) reads as the sequence of a step and each
 * rule can be checked alone.
 */

/** Maximum power point scans of hydro inverters: every SCAN_EVERY_S, SCAN_S long, down to 1 − SCAN_DEPTH of rated speed. */
export const SCAN_EVERY_S = 20 * 60;
export const SCAN_S = 120;
export const SCAN_DEPTH = 0.14;
/**
 * Loss of turbine efficiency off its best runner speed: η·(1 − k·(n/n₀ − 1)²),
 * the parabola impulse turbines follow near their best point (common practice, no published source).
 */
export const RUNNER_SPEED_LOSS_K = 1.5;
/** Hydro units stop below this fraction of design flow and start again above START. */
export const HYDRO_STOP_FRACTION = 0.12;
export const HYDRO_START_FRACTION = 0.18;
/** A wind unit restarts after cut-out once the wind has stayed this far below cut-out (m/s) for RESTART_MS. */
export const RESTART_MARGIN_MS = 4;
export const RESTART_MS = 10 * 60_000;
/** A wind unit lets go of the grid this far below cut-in, m/s (hysteresis). */
export const CUT_IN_HYSTERESIS_MS = 0.5;

/** A wind unit's protection state between steps. */
export interface WindProtection {
  /** Epoch ms until which the unit stays stopped after a cut-out (−Infinity: not stopped). */
  readonly stoppedUntilMs: number;
  /** Whether the generator is connected to its load. */
  readonly connected: boolean;
}

/**
 * The protection of a wind unit after a step: a rotor wind at or above
 * cut-out stops it for RESTART_MS, and the hold is renewed while the wind
 * stays within RESTART_MARGIN_MS of cut-out; outside a stop it connects at
 * cut-in and lets go CUT_IN_HYSTERESIS_MS lower.
 * @example windProtection({ stoppedUntilMs: -Infinity, connected: false }, { tMs: 0, rotorWindMs: 4, cutInMs: 3, cutOutMs: 25 }) // { stoppedUntilMs: -Infinity, connected: true, stopped: false }
 */
export function windProtection(
  before: WindProtection,
  at: { readonly tMs: number; readonly rotorWindMs: number; readonly cutInMs: number; readonly cutOutMs: number },
): WindProtection & { readonly stopped: boolean } {
  const { tMs, rotorWindMs, cutInMs, cutOutMs } = at;
  let { stoppedUntilMs, connected } = before;
  if (rotorWindMs >= cutOutMs) stoppedUntilMs = tMs + RESTART_MS;
  else if (tMs < stoppedUntilMs && rotorWindMs > cutOutMs - RESTART_MARGIN_MS) stoppedUntilMs = tMs + RESTART_MS;
  const stopped = tMs < stoppedUntilMs;
  if (stopped) connected = false;
  else if (rotorWindMs >= cutInMs) connected = true;
  else if (rotorWindMs < cutInMs - CUT_IN_HYSTERESIS_MS) connected = false;
  return { stoppedUntilMs, connected, stopped };
}

/**
 * Rotor speed, rpm, of a wind rotor of `rotorDiameterM` holding `tipSpeedRatio` in `windMs`.
 * @example freeRotorRpm(6, 10, 4) // ≈ 286.5
 */
export function freeRotorRpm(tipSpeedRatio: number, windMs: number, rotorDiameterM: number): number {
  return ((tipSpeedRatio * windMs) / (rotorDiameterM / 2)) * (60 / (2 * Math.PI));
}

/**
 * Whether a hydro unit runs after a step with `availableFraction` of its
 * design flow: it stops below HYDRO_STOP_FRACTION and starts again only above
 * HYDRO_START_FRACTION, so a flow near the limit does not make it hunt.
 * @example hydroRunsAfter(true, 0.15) // true; hydroRunsAfter(false, 0.15) // false
 */
export function hydroRunsAfter(running: boolean, availableFraction: number): boolean {
  if (running && availableFraction < HYDRO_STOP_FRACTION) return false;
  if (!running && availableFraction > HYDRO_START_FRACTION) return true;
  return running;
}

/**
 * How far into its sweep a maximum power point scan is at `tMs` for a unit
 * whose scans start at `scanPhaseMs` (mod SCAN_EVERY_S): 0 outside scans,
 * rising to 1 mid-scan and back.
 * @example scanDepthAt(60_000, 0) // 1 (mid-scan); scanDepthAt(600_000, 0) // 0
 */
export function scanDepthAt(tMs: number, scanPhaseMs: number): number {
  const everyMs = SCAN_EVERY_S * 1000;
  const intoMs = (((tMs - scanPhaseMs) % everyMs) + everyMs) % everyMs;
  const scanMs = SCAN_S * 1000;
  return intoMs >= scanMs ? 0 : 1 - Math.abs((2 * intoMs) / scanMs - 1);
}

/**
 * Turbine efficiency at `flowFraction` of design flow and `speedFactor` of
 * the best runner speed, from the best-point efficiency `bestEfficiency`:
 * part flow falls off as a turbine hill chart does, and off the best speed
 * by RUNNER_SPEED_LOSS_K (common practice).
 * @example hydroEfficiency(0.8, 1, 1) // 0.8; hydroEfficiency(0.8, 0.5, 1) // 0.75
 */
export function hydroEfficiency(bestEfficiency: number, flowFraction: number, speedFactor: number): number {
  return bestEfficiency * (1 - 0.25 * (1 - Math.min(1, flowFraction)) ** 2) * (1 - RUNNER_SPEED_LOSS_K * (speedFactor - 1) ** 2);
}
