/**
 * One simulated generating unit: the resource (wind or water), the prime
 * mover's speed control, the generator's electrical and thermal state, the
 * faults, and the sensors that report it all as a telemetry sample.
 *
 * Electrical model: lib/physics/generator-model (E = V + I·(R + jX) per
 * phase, E from the machine's true Ke at magnet temperature — the
 * nameplate's times a per-unit as-built factor, see asBuiltKeFactor — R copper at winding temperature,
 * X = 2π·f·L, f = poles·rpm/120). The load is chosen per unit
 * (`UnitScenario.load`):
 * - `rectifier`: a rectifier and grid-tie inverter; the generator sees a
 *   rectifier-like load of displacement power factor 0.95 lagging and the
 *   speed is free: wind units hold a tip-speed ratio up to rated speed,
 *   hydro units sit at the runner's best speed and the inverter's maximum
 *   power point tracker sweeps it down and back every 20 minutes;
 * - `resistive`: a resistive load under an electronic load controller
 *   (ballast heaters take what the consumers do not), power factor 1, the
 *   speed governed constant (such a unit never shows the speed spread the
 *   Ke fit needs, and diagnoses as insufficient-data).
 * Thermal model: one thermal mass, the stator winding, heated by I² and
 * relaxing to its coolant with a time constant; the magnets sit at the
 * stator temperature.
 */
import type { Nameplate } from '@/lib/contract/nameplate';
import { TELEMETRY_FIELDS } from '@/lib/contract/telemetry';
import { SQRT3 } from '@/lib/physics/emf';
import { generatorTerminals, type GeneratorSpec, type TerminalReadings } from '@/lib/physics/generator-model';
import { copperOhmAt } from '@/lib/physics/winding-resistance';
import { reactanceOhm } from '@/lib/physics/reactance';
import { powerCurveLookup } from '@/lib/energy/power-curve';
import { normaliseWindSpeedMs } from '@/lib/energy/air-density';
import { hydroPowerKw } from '@/lib/energy/hydro-power';
import { SCAN_DEPTH, SCAN_EVERY_S, freeRotorRpm, hydroEfficiency, hydroRunsAfter, scanDepthAt, windProtection } from './controls';
import { faultEffects, validateFaultPlan, type FaultEffects, type FaultPlan, type FaultSettings } from './faults';
import { Ar1, gaussian, mulberry32, seedFor } from './random';
import { zoneOffsetMinutes, type WeatherSource } from './weather';

/** Displacement power factor of a rectifier-like load (common practice, no published source). */
export const RECTIFIER_POWER_FACTOR = 0.95;
/** Power factor of a resistive load under an electronic load controller. */
export const RESISTIVE_POWER_FACTOR = 1;
/** Load power factor of each load kind. */
export const LOAD_POWER_FACTOR = { rectifier: RECTIFIER_POWER_FACTOR, resistive: RESISTIVE_POWER_FACTOR } as const;
/** Winding temperature rise over coolant at rated current, K (class F insulation run at class B rise, common practice). */
export const RATED_RISE_K = { wind: 60, hydro: 55 } as const;
/** Thermal time constant of the stator winding, s (small machines: tens of minutes, common practice). */
export const THERMAL_TAU_S = { wind: 25 * 60, hydro: 40 * 60 } as const;
/** Integral time scale of the turbulence at hub height, s (a few seconds at small hub heights, common practice). */
export const TURBULENCE_TAU_S = 6;
/** Winding temperature at which the rated current is worked out, °C. */
const RATED_WINDING_C = 80;

/**
 * Spread of the machines' true Ke about their nameplate: a real machine
 * reads a percent or two off its plate (magnet grade, air gap and winding
 * tolerances; common practice, no published source). Each unit's factor lies
 * in [AS_BUILT_KE_MIN, AS_BUILT_KE_MAX).
 */
export const AS_BUILT_KE_MIN = 0.99;
export const AS_BUILT_KE_MAX = 1.015;

/**
 * The true Ke of unit `unitId` over its nameplate Ke, drawn from the unit id
 * alone: the same machine whatever the run's seed, and different machines
 * differ.
 * @example asBuiltKeFactor('qv-01') === asBuiltKeFactor('qv-01') // true, a number in [0.99, 1.015)
 */
export function asBuiltKeFactor(unitId: string): number {
  const u = mulberry32(seedFor(0, `as-built-ke/${unitId}`))();
  return AS_BUILT_KE_MIN + (AS_BUILT_KE_MAX - AS_BUILT_KE_MIN) * u;
}

/** How a unit's logger writes `ts`. */
export type TimestampFormat = 'epoch-ms' | 'iso-utc' | 'iso-local';

/** What a unit's logger reports beyond `ts`, `rpm`, `vab`, `ia`, `kw`. */
export interface UnitChannels {
  /** Terminal frequency. */
  readonly hz: boolean;
  /** All three line voltages and phase currents (else `vab` and `ia` only). */
  readonly threePhase: boolean;
  /** Air density from the logger's own pressure and temperature sensors (wind). */
  readonly airDensity: boolean;
}

/** What the generator feeds (see the module comment). */
export type LoadKind = 'rectifier' | 'resistive';

/** What the scenario says about one unit beyond its nameplate. */
export interface UnitScenario {
  readonly tsFormat: TimestampFormat;
  readonly load: LoadKind;
  readonly channels: UnitChannels;
  /** Resource at this unit over the site's (wind: speed-up of its spot; hydro: share of the intake). */
  readonly exposure: number;
  readonly faults: readonly FaultPlan[];
  /** The machine's true Ke over its nameplate Ke (0.8–1.2); default {@link asBuiltKeFactor} of the unit id. */
  readonly keAsBuilt?: number | undefined;
}

/** Scenario of a unit the demo does not describe: healthy, every channel, UTC ISO times. */
export const DEFAULT_UNIT_SCENARIO: UnitScenario = {
  tsFormat: 'iso-utc',
  load: 'rectifier',
  channels: { hz: true, threePhase: true, airDensity: false },
  exposure: 1,
  faults: [],
};

/** A sample as published: contract field names, `ts` as the unit writes it. */
export type PublishedSample = { ts: number | string; rpm: number } & Partial<Record<Exclude<(typeof TELEMETRY_FIELDS)[number], 'ts' | 'rpm'>, number>>;

/** What really happened at a step, for tests and the run's state. */
export interface UnitTruth {
  readonly tMs: number;
  readonly mode: 'generating' | 'idling' | 'stopped';
  readonly rpm: number;
  readonly hz: number;
  /** Mean open-circuit line EMF behind the terminals, V. */
  readonly emfLlV: number;
  /** Ke at this moment (flux loss and magnet temperature included), V per 1000 rpm. */
  readonly keNowVPerKrpm: number;
  readonly magnetC: number;
  readonly statorC: number;
  readonly ohmPerPhase: number;
  readonly reactanceOhm: number;
  readonly powerFactor: number;
  readonly terminals: TerminalReadings;
  readonly effects: FaultEffects;
  readonly coolantC: number;
  readonly windMs?: number;
  /** Wind the rotor follows (the hub wind through the rotor's inertia), m/s. */
  readonly rotorWindMs?: number;
  readonly airKgM3?: number;
  readonly flowM3s?: number;
  readonly headM?: number;
  readonly overspeed: boolean;
}

/** The clock of one step: whether it is the unit's first, seconds since the last, and how far a lag of time constant `tauS` catches up. */
interface StepClock {
  readonly tMs: number;
  readonly first: boolean;
  readonly dtS: number;
  readonly lag: (tauS: number) => number;
}

/** What the prime mover and its surroundings give the generator at one step. */
interface Drive {
  /** Power the prime mover offers, kW (the terminals may carry less). */
  kwAsked: number;
  mode: UnitTruth['mode'];
  ambientC: number;
  /** Temperature of the air that cools the winding, °C. */
  coolantC: number;
  /** An overspeed gust is blowing. */
  overspeed: boolean;
  wind?: { readonly windMs: number; readonly airKgM3: number };
  water?: { readonly flowM3s: number; readonly headM: number };
}

/** Options of a unit model. */
export interface UnitModelOptions {
  readonly seed: number;
  readonly faults: FaultSettings;
  /** Multiplies every sensor's noise; 0 reports the truth (rounded as a logger would). */
  readonly noiseScale?: number;
}

const round = (v: number, step: number) => Math.round(v / step) * step;
const fix = (v: number, digits: number) => Number(v.toFixed(digits));

/** Formats `tMs` with the UTC offset of `timeZone`, e.g. 2026-03-01T13:00:00.500+01:00. */
export function isoWithOffset(tMs: number, offsetMinutes: number): string {
  const local = new Date(tMs + offsetMinutes * 60_000).toISOString().slice(0, -1);
  const sign = offsetMinutes < 0 ? '-' : '+';
  const abs = Math.abs(offsetMinutes);
  return `${local}${sign}${String(Math.floor(abs / 60)).padStart(2, '0')}:${String(abs % 60).padStart(2, '0')}`;
}


/** Wind speed, m/s, at which a power curve first reaches (99 % of) rated power. */
export function ratedWindMs(np: Nameplate): number {
  const curve = np.powerCurve ?? [];
  for (let i = 0; i < curve.length; i++) {
    const p = curve[i]!;
    if (p.kw >= 0.99 * np.ratedKw) {
      const before = curve[i - 1];
      if (before === undefined || p.kw === before.kw) return p.ms;
      const target = 0.99 * np.ratedKw;
      return before.ms + ((p.ms - before.ms) * (target - before.kw)) / (p.kw - before.kw);
    }
  }
  const last = curve[curve.length - 1];
  if (last === undefined) throw new RangeError(`unit ${np.id}: powerCurve is required for a wind unit`);
  return last.ms;
}

/**
 * The simulated unit. `step(tMs)` advances it to `tMs` (epoch ms, rising)
 * and returns the published sample with the truth behind it.
 */
export class UnitModel {
  /** The machine as built: its true Ke is the nameplate's times {@link keAsBuilt}; the rest as the nameplate says. */
  readonly spec: GeneratorSpec;
  /** True Ke over nameplate Ke. */
  readonly keAsBuilt: number;
  readonly powerFactor: number;
  /** Phase current at rated power and speed, A. */
  readonly ratedCurrentA: number;
  /** Tip-speed ratio the speed control holds below rated wind. */
  readonly tipSpeedRatio: number;
  readonly ratedWindMs: number;
  private readonly kwAt: (windMs: number) => number;
  private readonly normal: () => number;
  private readonly turbulence: Ar1;
  private readonly governor: Ar1;
  private readonly converter: Ar1;
  private readonly flowRipple: Ar1;
  private readonly levelRipple: Ar1;
  private readonly noise: number;
  private readonly rotorTauS: number;
  private readonly speedTauS: number;
  private readonly scanPhaseMs: number;
  private lastMs: number | undefined;
  private statorC = 20;
  private rotorWindMs = 0;
  private rpm = 0;
  private stoppedUntilMs = -Infinity;
  private connected = false;
  private hydroRunning = true;

  constructor(
    readonly nameplate: Nameplate,
    readonly weather: WeatherSource,
    readonly scenario: UnitScenario,
    readonly options: UnitModelOptions,
  ) {
    scenario.faults.forEach(validateFaultPlan);
    const np = nameplate;
    this.keAsBuilt = scenario.keAsBuilt ?? asBuiltKeFactor(np.id);
    if (!(this.keAsBuilt >= 0.8 && this.keAsBuilt <= 1.2)) throw new RangeError(`unit ${np.id}: keAsBuilt must be from 0.8 to 1.2, got ${this.keAsBuilt}`);
    this.spec = {
      keVPerKrpm: np.keVPerKrpm * this.keAsBuilt,
      keRefC: np.keRefC,
      magnet: np.magnet,
      magnetTempCoeffPctPerC: np.magnetTempCoeffPctPerC,
      poles: np.poles,
      phaseOhm: np.phaseOhm,
      phaseMh: np.phaseMh,
    };
    this.powerFactor = LOAD_POWER_FACTOR[scenario.load];
    const rated = generatorTerminals(this.spec, {
      rpm: np.ratedRpm,
      kw: np.ratedKw,
      powerFactor: this.powerFactor,
      magnetC: RATED_WINDING_C,
      windingC: RATED_WINDING_C,
    });
    this.ratedCurrentA = rated?.ia ?? (np.ratedKw * 1000) / (SQRT3 * ((this.spec.keVPerKrpm * np.ratedRpm) / 1000) * this.powerFactor);
    const u = (what: string) => mulberry32(seedFor(options.seed, `${np.siteId}/${np.id}/${what}`));
    this.normal = gaussian(u('sensors'));
    // Units scan at their own moments, not in step.
    this.scanPhaseMs = Math.floor(u('scan')() * SCAN_EVERY_S) * 1000;
    this.turbulence = new Ar1(TURBULENCE_TAU_S, 1, u('turbulence'));
    this.governor = new Ar1(5, 1, u('governor'));
    this.converter = new Ar1(30, 1, u('converter'));
    this.flowRipple = new Ar1(60, 1, u('flow'));
    this.levelRipple = new Ar1(600, 1, u('level'));
    this.noise = options.noiseScale ?? 1;
    if (!(this.noise >= 0)) throw new RangeError(`noiseScale must be 0 or more, got ${this.noise}`);
    if (np.kind === 'wind') {
      if (np.powerCurve === undefined || np.cutInMs === undefined || np.cutOutMs === undefined || np.rotorDiameterM === undefined) {
        throw new RangeError(`unit ${np.id}: powerCurve, cutInMs, cutOutMs and rotorDiameterM are required for a wind unit`);
      }
      this.kwAt = powerCurveLookup({ points: np.powerCurve, cutInMs: np.cutInMs, cutOutMs: np.cutOutMs });
      this.ratedWindMs = ratedWindMs(np);
      this.tipSpeedRatio = ((np.ratedRpm * 2 * Math.PI) / 60) * (np.rotorDiameterM / 2) / this.ratedWindMs;
      // Bigger rotors are slower to follow the wind (inertia grows faster than torque).
      this.rotorTauS = 2 + 0.3 * np.rotorDiameterM;
      this.speedTauS = 0.6 * this.rotorTauS;
    } else {
      if (np.designFlowM3s === undefined || np.designHeadM === undefined || np.efficiency === undefined) {
        throw new RangeError(`unit ${np.id}: designHeadM, designFlowM3s and efficiency are required for a hydro unit`);
      }
      this.kwAt = () => 0;
      this.ratedWindMs = 0;
      this.tipSpeedRatio = 0;
      this.rotorTauS = 3;
      this.speedTauS = 3;
    }
  }

  /** Sensor noise: a standard normal draw times the unit's noise scale. */
  private n(): number {
    return this.noise === 0 ? 0 : this.noise * this.normal();
  }

  /** Advances the unit to `tMs` and returns what its logger reports, and the truth. */
  step(tMs: number): { sample: PublishedSample; truth: UnitTruth } {
    const clock = this.advanceClock(tMs);
    const effects = faultEffects(this.scenario.faults, tMs, this.options.faults);
    const drive = this.nameplate.kind === 'wind' ? this.driveWind(clock, effects) : this.driveHydro(clock);
    if (this.rpm < 0.5 || drive.mode === 'idling') drive.kwAsked = 0;
    if (this.rpm < 1e-3) this.rpm = 0;
    const terminals = this.terminalsOfStep(clock, drive, effects);
    const truth = this.truthOf(tMs, drive, terminals, effects);
    const sample = this.report(truth, drive.ambientC, effects);
    // Heat for the next step from this step's current.
    const steady = this.steadyStatorC(drive.coolantC, terminals.ia, effects);
    this.statorC = steady + (this.statorC - steady) * Math.exp(-clock.dtS / THERMAL_TAU_S[this.nameplate.kind]);
    return { sample, truth };
  }

  /** Moves the unit's clock to `tMs` (rising); a gap counts as at most an hour. */
  private advanceClock(tMs: number): StepClock {
    if (!Number.isFinite(tMs)) throw new RangeError(`tMs must be a finite epoch ms, got ${tMs}`);
    const last = this.lastMs;
    if (last !== undefined && tMs < last) throw new RangeError(`tMs must not go back: ${tMs} after ${last}`);
    const first = last === undefined;
    const dtS = first ? 0 : Math.min(3600, (tMs - last) / 1000);
    this.lastMs = tMs;
    // The first step starts settled: every lag has caught up.
    return { tMs, first, dtS, lag: (tauS) => (first ? 1 : 1 - Math.exp(-dtS / tauS)) };
  }

  /** The wind and the rotor: speed control, protection, and the power the rotor offers. */
  private driveWind({ tMs, dtS, lag }: StepClock, effects: FaultEffects): Drive {
    const np = this.nameplate;
    const meanMs = this.weather.windMeanMs(tMs) * this.scenario.exposure;
    const ti = this.weather.climate.turbulenceIntensity ?? 0.12;
    let windMs = Math.max(0, meanMs * (1 + ti * this.turbulence.step(dtS)));
    let overspeed = false;
    if (effects.overspeedGust !== undefined) {
      windMs = Math.max(windMs, effects.overspeedGust * this.ratedWindMs);
      overspeed = true;
    }
    const ambientC = this.weather.airC(tMs);
    const airKgM3 = this.weather.airDensityKgM3(tMs);
    this.rotorWindMs += (windMs - this.rotorWindMs) * lag(this.rotorTauS);
    const cutOutMs = np.cutOutMs!;
    const protection = windProtection({ stoppedUntilMs: this.stoppedUntilMs, connected: this.connected }, { tMs, rotorWindMs: this.rotorWindMs, cutInMs: np.cutInMs!, cutOutMs });
    this.stoppedUntilMs = protection.stoppedUntilMs;
    this.connected = protection.connected;
    const drive: Drive = { kwAsked: 0, mode: 'generating', ambientC, coolantC: ambientC, overspeed, wind: { windMs, airKgM3 } };
    let targetRpm: number;
    if (protection.stopped) {
      drive.mode = 'stopped';
      targetRpm = 0;
    } else {
      // Speed regulation holds rated speed above rated wind, except while it lags a gust.
      // In a late-regulated gust the rotor runs free up to the gust's own speed, then the furl catches it.
      const freeRpm = freeRotorRpm(this.tipSpeedRatio, this.rotorWindMs, np.rotorDiameterM!);
      targetRpm = Math.min(freeRpm, overspeed ? effects.overspeedGust! * np.ratedRpm : np.ratedRpm);
      targetRpm *= 1 + 0.004 * this.governor.step(dtS);
      if (this.connected) {
        const vn = normaliseWindSpeedMs(this.rotorWindMs, airKgM3);
        drive.kwAsked = Math.max(0, this.kwAt(Math.min(vn, cutOutMs - 1e-9)) * (1 + 0.01 * this.converter.step(dtS)));
      } else drive.mode = 'idling';
    }
    this.rpm += (Math.max(0, targetRpm) - this.rpm) * lag(this.speedTauS);
    return drive;
  }

  /** The water and the runner: run or stop on the flow, the head, the inverter's scans, and the power the water offers. */
  private driveHydro({ tMs, dtS, lag }: StepClock): Drive {
    const np = this.nameplate;
    const available = this.weather.availableFlowFraction(tMs) * this.scenario.exposure;
    this.hydroRunning = hydroRunsAfter(this.hydroRunning, available);
    // The turbine takes at most its design flow; the rest spills over the weir.
    const q = this.hydroRunning ? Math.min(1, available) * (1 + 0.01 * this.flowRipple.step(dtS)) : 0;
    const flowM3s = q * np.designFlowM3s!;
    // Penstock friction grows with the square of the flow; the forebay level wanders a little.
    const headM = np.designHeadM! * (1.03 - 0.03 * q * q) * (1 + 0.002 * this.levelRipple.step(dtS));
    // Below rated speed only while the inverter scans for its maximum power point.
    const speedFactor = this.scenario.load === 'rectifier' ? 1 - SCAN_DEPTH * scanDepthAt(tMs, this.scanPhaseMs) : 1;
    const eta = hydroEfficiency(np.efficiency!, q, speedFactor);
    const kwAsked = Math.min(np.ratedKw, hydroPowerKw(flowM3s, headM, eta));
    const ambientC = this.weather.waterC(tMs);
    const targetRpm = this.hydroRunning ? np.ratedRpm * speedFactor * (1 + 0.003 * this.governor.step(dtS)) : 0;
    this.rpm += (targetRpm - this.rpm) * lag(this.speedTauS);
    return {
      kwAsked: this.hydroRunning ? kwAsked : 0,
      mode: this.hydroRunning ? 'generating' : 'stopped',
      ambientC,
      // The powerhouse air the generator breathes runs a few kelvin above the water.
      coolantC: ambientC + 4,
      overspeed: false,
      water: { flowM3s, headM },
    };
  }

  /** Terminal readings of the step; the first step starts warm, at the steady temperature of its operating point. */
  private terminalsOfStep({ first }: StepClock, { kwAsked, coolantC }: Drive, effects: FaultEffects): TerminalReadings {
    if (!first) return this.terminals(kwAsked, effects);
    this.statorC = coolantC;
    const cold = this.terminals(kwAsked, effects);
    this.statorC = this.steadyStatorC(coolantC, cold.ia, effects);
    return this.terminals(kwAsked, effects);
  }

  /** What really happened at the step. */
  private truthOf(tMs: number, drive: Drive, terminals: TerminalReadings, effects: FaultEffects): UnitTruth {
    const np = this.nameplate;
    const { kwAsked, mode, wind, water } = drive;
    return {
      tMs,
      mode: kwAsked > 0 ? 'generating' : mode === 'generating' ? 'idling' : mode,
      rpm: this.rpm,
      hz: terminals.hz,
      emfLlV: terminals.emfLlV,
      keNowVPerKrpm: this.rpm > 0 ? (terminals.emfLlV * 1000) / this.rpm : 0,
      // The magnets sit at the stator temperature (one thermal mass).
      magnetC: this.statorC,
      statorC: this.statorC,
      ohmPerPhase: copperOhmAt(np.phaseOhm, this.statorC),
      reactanceOhm: reactanceOhm(terminals.hz, np.phaseMh),
      powerFactor: terminals.powerFactor,
      terminals,
      effects,
      coolantC: drive.coolantC,
      ...(wind !== undefined ? { windMs: wind.windMs, rotorWindMs: this.rotorWindMs, airKgM3: wind.airKgM3 } : {}),
      ...(water !== undefined ? { flowM3s: water.flowM3s, headM: water.headM } : {}),
      overspeed: drive.overspeed && this.rpm > np.maxRpm,
    };
  }

  private steadyStatorC(coolantC: number, currentA: number, effects: FaultEffects): number {
    const np = this.nameplate;
    const load = currentA / this.ratedCurrentA;
    const speed = this.rpm / np.ratedRpm;
    return coolantC + RATED_RISE_K[np.kind] * load * load + effects.extraHeatingKAtRated * speed * speed;
  }

  /** Terminal readings at the current speed and temperature; a load beyond what the machine can carry is limited. */
  private terminals(kwAsked: number, effects: FaultEffects): TerminalReadings {
    const point = {
      rpm: this.rpm,
      powerFactor: this.powerFactor,
      magnetC: this.statorC,
      windingC: this.statorC,
      fluxFactor: effects.fluxFactor,
      phaseEmfFactors: effects.phaseEmfFactors,
    };
    let kw = kwAsked;
    // The converter limits its current when the machine cannot carry the asked power at this speed.
    for (let i = 0; i < 40 && kw > 0; i++) {
      const r = generatorTerminals(this.spec, { ...point, kw });
      if (r !== undefined) return r;
      kw *= 0.85;
    }
    return generatorTerminals(this.spec, { ...point, kw: 0 })!;
  }

  /** What the unit's sensors and logger report. */
  private report(truth: UnitTruth, ambientC: number, effects: FaultEffects): PublishedSample {
    const ch = this.scenario.channels;
    const t = truth.terminals;
    const pos = (v: number) => Math.max(0, v);
    // Meter classes: voltage 0.1 %, current 0.2 %, power 0.2 %, speed 0.1 %
    // (typical panel meters and pick-ups, common practice). Loggers send
    // floating-point readings; the digits kept are finer than the noise.
    const volts = (v: number) => fix(pos(v * (1 + 0.001 * this.n())), 2);
    const amps = (i: number) => (i === 0 ? 0 : fix(pos(i * (1 + 0.002 * this.n()) + 0.005 * this.n()), 3));
    const rpmRead = truth.rpm === 0 ? 0 : pos(truth.rpm * effects.speedReadingFactor * (1 + 0.001 * this.n()) + 0.05 * this.n());
    const sample: PublishedSample = { ts: this.formatTs(truth.tMs), rpm: fix(rpmRead, 2) };
    if (ch.hz) sample.hz = fix(pos(t.hz * (1 + 0.0002 * this.n())), 3);
    sample.vab = volts(t.vab);
    if (ch.threePhase) {
      sample.vbc = volts(t.vbc);
      sample.vca = volts(t.vca);
    }
    sample.ia = amps(t.ia);
    if (ch.threePhase) {
      sample.ib = amps(t.ib);
      sample.ic = amps(t.ic);
    }
    sample.kw = t.kw === 0 ? 0 : fix(pos(t.kw * (1 + 0.002 * this.n())), 4);
    sample.statorC = fix(truth.statorC + 0.2 * this.n(), 2);
    sample.ambientC = fix(ambientC + 0.1 * this.n(), 2);
    if (truth.windMs !== undefined) {
      sample.windMs = fix(pos(truth.windMs * (1 + 0.01 * this.n()) + 0.05 * this.n()), 2);
      if (ch.airDensity) sample.airKgM3 = fix(truth.airKgM3! * (1 + 0.002 * this.n()), 4);
    }
    if (truth.flowM3s !== undefined) {
      sample.flowM3s = fix(pos(truth.flowM3s * (1 + 0.01 * this.n())), 4);
      sample.headM = fix(pos(truth.headM! + 0.03 * this.n()), 2);
    }
    return sample;
  }

  private formatTs(tMs: number): number | string {
    const ms = round(tMs, 1);
    switch (this.scenario.tsFormat) {
      case 'epoch-ms':
        return ms;
      case 'iso-utc':
        return new Date(ms).toISOString();
      case 'iso-local':
        return isoWithOffset(ms, zoneOffsetMinutes(ms, this.weather.timeZone));
    }
  }
}

