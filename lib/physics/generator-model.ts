/**
 * Forward model of a three-phase permanent-magnet generator: from speed,
 * load and temperatures to the terminal readings a device would report
 * (line voltages, phase currents, frequency, power). It is the exact inverse
 * of the load correction the diagnosis applies, so telemetry made with it
 * diagnoses as the machine it describes.
 *
 * Per phase (star equivalent): E = V + I·(R + jX), E ∝ speed (Faraday,
 * E = k·N·Φ·ω), R copper at winding temperature, X = 2π·f·L, the load
 * drawing the same current in each phase at the given power factor.
 */
import { abs, arg, polar, sub, type Complex } from './complex';
import { SQRT3, terminalPhaseVolts } from './emf';
import { keAtMagnetC, remanenceCoeffPctPerC } from './magnet-temperature';
import { reactanceOhm } from './reactance';
import { electricalHz } from './synchronous-speed';
import { COPPER_REF_C, copperOhmAt } from './winding-resistance';
import type { MagnetMaterial } from '@/lib/contract/nameplate';

/** The nameplate fields the model needs (a validated Nameplate fits). */
export interface GeneratorSpec {
  /** Open-circuit line-to-line RMS volts per 1000 rpm at `keRefC`. */
  readonly keVPerKrpm: number;
  /** Reference magnet temperature of `keVPerKrpm`, °C. */
  readonly keRefC: number;
  readonly magnet: MagnetMaterial;
  /** Override of the remanence coefficient, % per °C. */
  readonly magnetTempCoeffPctPerC?: number | undefined;
  readonly poles: number;
  /** Phase resistance (star equivalent) at 20 °C, Ω. */
  readonly phaseOhm: number;
  /** Synchronous inductance per phase, mH. */
  readonly phaseMh: number;
}

/** Where the machine runs. */
export interface OperatingPoint {
  /** Shaft speed, rev/min (≥ 0). */
  readonly rpm: number;
  /** Active power the load asks for at the terminals, kW (≥ 0; 0 = open circuit). */
  readonly kw: number;
  /** Load power factor cos φ, lagging, 0 < pf ≤ 1; default 1. */
  readonly powerFactor?: number;
  /** Magnet temperature, °C; default the spec's `keRefC`. */
  readonly magnetC?: number;
  /** Winding temperature, °C; default 20. */
  readonly windingC?: number;
  /** Whole-machine flux factor (1 = as new; 0.9 = magnets lost 10 %); default 1. */
  readonly fluxFactor?: number;
  /** Per-phase EMF factor a, b, c (a shorted turn lowers one phase); default [1, 1, 1]. */
  readonly phaseEmfFactors?: readonly [number, number, number];
}

/** Terminal readings, named as in the telemetry contract. */
export interface TerminalReadings {
  /** Electrical frequency, Hz. */
  readonly hz: number;
  /** Mean open-circuit line-to-line EMF, V. */
  readonly emfLlV: number;
  /** Line-to-line RMS voltages, V. */
  readonly vab: number;
  readonly vbc: number;
  readonly vca: number;
  /** Phase RMS currents, A. */
  readonly ia: number;
  readonly ib: number;
  readonly ic: number;
  /** Active power delivered at the terminals, kW. */
  readonly kw: number;
  /** Load power factor used. */
  readonly powerFactor: number;
}

/**
 * Open-circuit line-to-line EMF in V of `spec` at `rpm` rev/min with magnets at `magnetC` °C.
 * @example emfLineVolts({ keVPerKrpm: 400, keRefC: 20, magnet: 'ndfeb', poles: 24, phaseOhm: 0.3, phaseMh: 2 }, 300, 20) // 120
 */
export function emfLineVolts(spec: GeneratorSpec, rpm: number, magnetC: number = spec.keRefC): number {
  if (!(rpm >= 0) || !Number.isFinite(rpm)) throw new RangeError(`rpm must be 0 rev/min or more, got ${rpm}`);
  const coeff = remanenceCoeffPctPerC(spec.magnet, spec.magnetTempCoeffPctPerC);
  return (keAtMagnetC({ keVPerKrpm: spec.keVPerKrpm, refC: spec.keRefC, magnetC, coeffPctPerC: coeff }) * rpm) / 1000;
}

/**
 * Phase current in A at which one phase of EMF `emfPhaseV` V delivers `wattsPerPhase` W; undefined
 * when that is beyond the phase's maximum power at this EMF.
 * @example currentForPower({ emfPhaseV: 230, wattsPerPhase: 2000, ohmPerPhase: 0.5, reactanceOhm: 2, powerFactor: 1 }) // ≈ 8.9
 */
export function currentForPower(p: {
  readonly emfPhaseV: number;
  readonly wattsPerPhase: number;
  readonly ohmPerPhase: number;
  readonly reactanceOhm: number;
  readonly powerFactor: number;
}): number | undefined {
  if (!(p.wattsPerPhase >= 0) || !Number.isFinite(p.wattsPerPhase)) {
    throw new RangeError(`wattsPerPhase must be 0 W or more, got ${p.wattsPerPhase}`);
  }
  if (!(p.powerFactor > 0 && p.powerFactor <= 1)) throw new RangeError(`powerFactor must be above 0 and at most 1, got ${p.powerFactor}`);
  if (!(p.emfPhaseV >= 0) || !Number.isFinite(p.emfPhaseV)) throw new RangeError(`emfPhaseV must be 0 V or more, got ${p.emfPhaseV}`);
  if (!(p.ohmPerPhase >= 0) || !(p.reactanceOhm >= 0)) {
    throw new RangeError(`ohmPerPhase and reactanceOhm must be 0 Ω or more, got ${p.ohmPerPhase} and ${p.reactanceOhm}`);
  }
  if (p.wattsPerPhase === 0) return 0;
  // With w = P/pf, a = I·α, b = I·β (α, β the in-phase and quadrature drops per ampere) and
  // |E|² = (V + a)² + b², V·I = w becomes |Z|²·u² − (E² − 2wα)·u + w² = 0 in u = I².
  // The smaller root is the working point (high voltage side of the power curve).
  const sinPhi = Math.sqrt(1 - p.powerFactor * p.powerFactor);
  const alpha = p.ohmPerPhase * p.powerFactor + p.reactanceOhm * sinPhi;
  const z2 = p.ohmPerPhase * p.ohmPerPhase + p.reactanceOhm * p.reactanceOhm;
  const w = p.wattsPerPhase / p.powerFactor;
  const b = p.emfPhaseV * p.emfPhaseV - 2 * w * alpha;
  const disc = b * b - 4 * z2 * w * w;
  if (!(b > 0) || disc < 0) return undefined;
  // 2w²/(b + √disc) is the smaller root without cancellation, and is w²/E² when |Z| = 0.
  return Math.sqrt((2 * w * w) / (b + Math.sqrt(disc)));
}

/**
 * Terminal readings of `spec` at `point`; undefined when the machine cannot deliver the asked power at that speed.
 * @example generatorTerminals(
 *   { keVPerKrpm: 400, keRefC: 20, magnet: 'ndfeb', poles: 24, phaseOhm: 0.3, phaseMh: 2 },
 *   { rpm: 1000, kw: 10 },
 * ) // { hz: 200, emfLlV: 400, vab: ≈ 386.9, ia: ≈ 14.92, kw: 10, ... }
 */
export function generatorTerminals(spec: GeneratorSpec, point: OperatingPoint): TerminalReadings | undefined {
  const powerFactor = point.powerFactor ?? 1;
  if (!(powerFactor > 0 && powerFactor <= 1)) throw new RangeError(`powerFactor must be above 0 and at most 1, got ${powerFactor}`);
  if (!(point.kw >= 0) || !Number.isFinite(point.kw)) throw new RangeError(`kw must be 0 kW or more, got ${point.kw}`);
  const fluxFactor = point.fluxFactor ?? 1;
  if (!(fluxFactor > 0) || !Number.isFinite(fluxFactor)) throw new RangeError(`fluxFactor must be above 0, got ${fluxFactor}`);
  const factors = point.phaseEmfFactors ?? [1, 1, 1];
  for (const f of factors) {
    if (!(f > 0) || !Number.isFinite(f)) throw new RangeError(`phaseEmfFactors must all be above 0, got ${factors.join(', ')}`);
  }
  const hz = electricalHz(spec.poles, point.rpm);
  const emfPhaseV = (emfLineVolts(spec, point.rpm, point.magnetC ?? spec.keRefC) * fluxFactor) / SQRT3;
  const ohmPerPhase = copperOhmAt(spec.phaseOhm, point.windingC ?? COPPER_REF_C);
  const xOhm = reactanceOhm(hz, spec.phaseMh);
  const meanFactor = (factors[0] + factors[1] + factors[2]) / 3;
  let currentA = 0;
  if (point.kw > 0) {
    if (emfPhaseV === 0) return undefined;
    const solved = currentForPower({
      emfPhaseV: emfPhaseV * meanFactor,
      wattsPerPhase: (point.kw * 1000) / 3,
      ohmPerPhase,
      reactanceOhm: xOhm,
      powerFactor,
    });
    if (solved === undefined) return undefined;
    currentA = solved;
  }
  const sinPhi = Math.sqrt(1 - powerFactor * powerFactor);
  const inPhaseDrop = currentA * (ohmPerPhase * powerFactor + xOhm * sinPhi);
  const quadratureDrop = currentA * (xOhm * powerFactor - ohmPerPhase * sinPhi);
  const terminals: Complex[] = [];
  let watts = 0;
  for (let k = 0; k < 3; k++) {
    const emf = polar(emfPhaseV * (factors[k] as number), (-2 * Math.PI * k) / 3);
    const v = terminalPhaseVolts({ emfPhaseV: abs(emf), currentA, ohmPerPhase, reactanceOhm: xOhm, powerFactor });
    if (v === undefined) return undefined;
    // E leads V by the angle of (V + a) + jb.
    terminals.push(polar(v, arg(emf) - Math.atan2(quadratureDrop, v + inPhaseDrop)));
    watts += v * currentA * powerFactor;
  }
  const [va, vb, vc] = terminals as [Complex, Complex, Complex];
  return {
    hz,
    emfLlV: emfPhaseV * meanFactor * SQRT3,
    vab: abs(sub(va, vb)),
    vbc: abs(sub(vb, vc)),
    vca: abs(sub(vc, va)),
    ia: currentA,
    ib: currentA,
    ic: currentA,
    kw: watts / 1000,
    powerFactor,
  };
}
