/**
 * Open-circuit EMF behind the terminal voltage of a loaded generator phase
 * (star equivalent): E = V + I·(R + jX), V the reference phasor and the
 * current lagging V by φ. Textbook per-phase equivalent circuit of a
 * synchronous generator (e.g. Chapman, Electric Machinery Fundamentals,
 * chapter on synchronous generators; from memory).
 */
import { abs, add, complex, mul } from './complex';

/** √3: ratio of line-to-line to line-to-neutral voltage in a balanced star. */
export const SQRT3 = Math.sqrt(3);

/** Inputs of one phase of the equivalent circuit. */
export interface PhaseCircuit {
  /** Terminal phase (line-to-neutral) RMS voltage, V. */
  readonly phaseVolts: number;
  /** Phase RMS current, A (0 = open circuit). */
  readonly currentA: number;
  /** Phase resistance at winding temperature, Ω. */
  readonly ohmPerPhase: number;
  /** Synchronous reactance at the working frequency, Ω. */
  readonly reactanceOhm: number;
  /** cos φ of the current against the terminal voltage (lagging), −1..1. */
  readonly powerFactor: number;
}

function checkCircuit(p: PhaseCircuit): void {
  if (!(p.phaseVolts >= 0) || !Number.isFinite(p.phaseVolts)) throw new RangeError(`phaseVolts must be 0 V or more, got ${p.phaseVolts}`);
  if (!(p.currentA >= 0) || !Number.isFinite(p.currentA)) throw new RangeError(`currentA must be 0 A or more, got ${p.currentA}`);
  if (!(p.ohmPerPhase >= 0) || !Number.isFinite(p.ohmPerPhase)) throw new RangeError(`ohmPerPhase must be 0 Ω or more, got ${p.ohmPerPhase}`);
  if (!(p.reactanceOhm >= 0) || !Number.isFinite(p.reactanceOhm)) {
    throw new RangeError(`reactanceOhm must be 0 Ω or more, got ${p.reactanceOhm}`);
  }
  if (!(p.powerFactor >= -1 && p.powerFactor <= 1)) throw new RangeError(`powerFactor must be within −1..1, got ${p.powerFactor}`);
}

/**
 * Phase EMF in V (RMS, line-to-neutral) behind the terminal voltage: |V + I·(R + jX)|.
 * @example recoverPhaseEmf({ phaseVolts: 230, currentA: 10, ohmPerPhase: 0.5, reactanceOhm: 2, powerFactor: 1 }) // 235.85 (|230 + 10·(0.5 + 2j)|)
 */
export function recoverPhaseEmf(p: PhaseCircuit): number {
  checkCircuit(p);
  if (p.currentA === 0) return p.phaseVolts;
  const sinPhi = Math.sqrt(Math.max(0, 1 - p.powerFactor * p.powerFactor));
  // Current lags the terminal voltage (reference at angle 0) by φ.
  const current = complex(p.currentA * p.powerFactor, -p.currentA * sinPhi);
  return abs(add(complex(p.phaseVolts), mul(current, complex(p.ohmPerPhase, p.reactanceOhm))));
}

/**
 * Same as {@link recoverPhaseEmf} with plain arithmetic, for hot loops over millions of samples.
 * @example recoverPhaseEmfFast(230, 10, 0.5, 2, 1) // 235.85
 */
export function recoverPhaseEmfFast(phaseVolts: number, currentA: number, ohmPerPhase: number, reactanceOhm: number, powerFactor: number): number {
  if (currentA === 0) return phaseVolts;
  const sinPhi = Math.sqrt(Math.max(0, 1 - powerFactor * powerFactor));
  const re = phaseVolts + currentA * (ohmPerPhase * powerFactor + reactanceOhm * sinPhi);
  const im = currentA * (reactanceOhm * powerFactor - ohmPerPhase * sinPhi);
  return Math.sqrt(re * re + im * im);
}

/**
 * Open-circuit line EMF behind line terminals in V: √3 · |V/√3 + I·(R + jX)|,
 * the star-equivalent phase of {@link recoverPhaseEmfFast} scaled back to line
 * values, for loops over every sample diagnosed.
 * @example lineEmfBehindTerminals(400, 0, 0.35, 3.0, 1) // 400 (open circuit)
 */
export function lineEmfBehindTerminals(voltsLl: number, currentA: number, ohmPerPhase: number, reactanceOhm: number, powerFactor: number): number {
  return SQRT3 * recoverPhaseEmfFast(voltsLl / SQRT3, currentA, ohmPerPhase, reactanceOhm, powerFactor);
}

/**
 * Terminal phase voltage in V for a phase EMF `emfPhaseV` V carrying `currentA` A at `powerFactor`
 * (the inverse of {@link recoverPhaseEmf}); undefined when the EMF cannot drive that current.
 * @example terminalPhaseVolts({ emfPhaseV: 235.85, currentA: 10, ohmPerPhase: 0.5, reactanceOhm: 2, powerFactor: 1 }) // ≈ 230
 */
export function terminalPhaseVolts(p: {
  readonly emfPhaseV: number;
  readonly currentA: number;
  readonly ohmPerPhase: number;
  readonly reactanceOhm: number;
  readonly powerFactor: number;
}): number | undefined {
  if (!(p.emfPhaseV >= 0) || !Number.isFinite(p.emfPhaseV)) throw new RangeError(`emfPhaseV must be 0 V or more, got ${p.emfPhaseV}`);
  checkCircuit({ ...p, phaseVolts: 0 });
  if (p.currentA === 0) return p.emfPhaseV;
  const sinPhi = Math.sqrt(Math.max(0, 1 - p.powerFactor * p.powerFactor));
  // |E|² = (V + a)² + b², a and b the in-phase and quadrature drops.
  const a = p.currentA * (p.ohmPerPhase * p.powerFactor + p.reactanceOhm * sinPhi);
  const b = p.currentA * (p.reactanceOhm * p.powerFactor - p.ohmPerPhase * sinPhi);
  const inPhase2 = p.emfPhaseV * p.emfPhaseV - b * b;
  if (inPhase2 < 0) return undefined;
  const v = Math.sqrt(inPhase2) - a;
  return v > 0 ? v : undefined;
}
