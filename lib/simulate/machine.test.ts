import { describe, expect, it } from 'vitest';
import { fleetSchema, type Nameplate } from '@/lib/contract/nameplate';
import { SQRT3, recoverPhaseEmf } from '@/lib/physics/emf';
import { keAtMagnetC, remanenceCoeffPctPerC } from '@/lib/physics/magnet-temperature';
import { reactanceOhm } from '@/lib/physics/reactance';
import { lineVoltageUnbalancePct } from '@/lib/physics/unbalance';
import { copperOhmAt } from '@/lib/physics/winding-resistance';
import { powerCurveLookup } from '@/lib/energy/power-curve';
import { normaliseWindSpeedMs } from '@/lib/energy/air-density';
import { hydroPowerKw } from '@/lib/energy/hydro-power';
import { demoFleet, demoUnitScenarios } from './demo-fleet';
import { SCAN_DEPTH, SCAN_EVERY_S } from './controls';
import type { FaultPlan } from './faults';
import {
  AS_BUILT_KE_MAX,
  AS_BUILT_KE_MIN,
  DEFAULT_UNIT_SCENARIO,
  asBuiltKeFactor,
  RATED_RISE_K,
  THERMAL_TAU_S,
  UnitModel,
  LOAD_POWER_FACTOR,
  isoWithOffset,
  type UnitScenario,
} from './machine';
import type { SiteClimate, WeatherSource } from './weather';

const fleet = fleetSchema.parse(demoFleet);
const unit = (id: string): Nameplate => fleet.units.find((u) => u.id === id)!;
const T0 = Date.UTC(2026, 2, 1);
const MIN = 60_000;
const DAY = 86_400_000;

/** Weather held still (or following given functions), without turbulence. */
function stillWeather(p: { windMs?: (t: number) => number; airC?: number; airKgM3?: number; waterC?: number; flow?: number; ti?: number } = {}): WeatherSource {
  const climate: SiteClimate = { altitudeM: 0, airMeanC: p.airC ?? 15, airSeasonalC: 0, airDiurnalC: 0, turbulenceIntensity: p.ti ?? 0 };
  return {
    timeZone: 'UTC',
    climate,
    airC: () => p.airC ?? 15,
    airDensityKgM3: () => p.airKgM3 ?? 1.225,
    windMeanMs: p.windMs ?? (() => 8),
    waterC: () => p.waterC ?? 8,
    availableFlowFraction: () => p.flow ?? 0.8,
  };
}

function model(id: string, weather: WeatherSource, opts: { faults?: readonly FaultPlan[]; scenario?: Partial<UnitScenario>; noise?: number; demag?: number } = {}) {
  const scenario: UnitScenario = { ...DEFAULT_UNIT_SCENARIO, ...opts.scenario, faults: opts.faults ?? [] };
  return new UnitModel(unit(id), weather, scenario, { seed: 7, faults: { epochMs: T0, demagPctPerDay: opts.demag }, noiseScale: opts.noise ?? 0 });
}

/** Steps a model from `from` for `minutes` at `stepS` and returns every result. */
function run(m: UnitModel, from: number, minutes: number, stepS = 1) {
  const out = [];
  for (let t = from; t <= from + minutes * MIN; t += stepS * 1000) out.push(m.step(t));
  return out;
}

/** EMF recovered from a published sample the way the contract's diagnosis does it (section 5). */
function recoveredEmfLl(np: Nameplate, s: Record<string, unknown>, knownPf?: number): number {
  const vs = [s.vab, s.vbc, s.vca].filter((v): v is number => typeof v === 'number');
  const is = [s.ia, s.ib, s.ic].filter((v): v is number => typeof v === 'number');
  const vLl = vs.reduce((a, b) => a + b, 0) / vs.length;
  const i = is.reduce((a, b) => a + b, 0) / is.length;
  const hz = typeof s.hz === 'number' ? s.hz : (np.poles * (s.rpm as number)) / 120;
  const pf = knownPf ?? (i === 0 ? 1 : Math.min(1, ((s.kw as number) * 1000) / (SQRT3 * vLl * i)));
  return (
    recoverPhaseEmf({
      phaseVolts: vLl / SQRT3,
      currentA: i,
      ohmPerPhase: copperOhmAt(np.phaseOhm, s.statorC as number),
      reactanceOhm: reactanceOhm(hz, np.phaseMh),
      powerFactor: pf,
    }) * SQRT3
  );
}

describe('UnitModel electrical physics', () => {
  it('reads Ke·rpm/1000 at the terminals on open circuit at the reference temperature (definition of Ke, contract section 2)', () => {
    // Below cut-in the turbine idles unloaded; 20 °C air and no current keep the magnets at keRefC.
    const np = unit('qv-01');
    const m = model('qv-01', stillWeather({ windMs: () => 2.5, airC: 20 }));
    const { sample, truth } = run(m, T0, 2).at(-1)!;
    expect(truth.mode).toBe('idling');
    expect(sample.ia).toBe(0);
    expect(truth.statorC).toBeCloseTo(20, 9);
    // The machine's own Ke: the nameplate's times its as-built factor.
    const expected = (np.keVPerKrpm * m.keAsBuilt * truth.rpm) / 1000;
    for (const v of [sample.vab, sample.vbc, sample.vca]) expect(v!).toBeCloseTo(expected, 1);
  });

  it('scales the open-circuit EMF with the magnet temperature by the reversible coefficient (ferrite −0.20 %/°C, materials handbooks, from memory)', () => {
    const np = unit('qv-03');
    const m = model('qv-03', stillWeather({ windMs: () => 2.5, airC: -10 }));
    const cold = run(m, T0, 2).at(-1)!;
    const ke = (cold.sample.vab! * 1000) / cold.truth.rpm;
    expect(ke).toBeCloseTo(np.keVPerKrpm * m.keAsBuilt * (1 + (-0.2 / 100) * (-10 - 20)), 0);
  });

  it('delivers kW = √3·V_LL·I·cos φ with the documented load power factors (three-phase power, any power-systems textbook)', () => {
    for (const [id, load] of [['qv-01', 'rectifier'], ['vo-02', 'rectifier'], ['vo-01', 'resistive']] as const) {
      const pf = LOAD_POWER_FACTOR[load];
      expect(pf).toBe(load === 'rectifier' ? 0.95 : 1);
      const results = run(model(id, stillWeather({ windMs: () => 9 }), { scenario: { load } }), T0, 5);
      for (const { sample } of results.slice(-20)) {
        const vLl = (sample.vab! + sample.vbc! + sample.vca!) / 3;
        const i = (sample.ia! + sample.ib! + sample.ic!) / 3;
        expect(i).toBeGreaterThan(1);
        // Rounding of the readings (0.1 V, 0.01 A, 1 W) is the only difference.
        expect(sample.kw!).toBeCloseTo((SQRT3 * vLl * i * pf) / 1000, 1);
        expect(Math.abs(sample.kw! / ((SQRT3 * vLl * i * pf) / 1000) - 1)).toBeLessThan(0.002);
      }
    }
  });

  it('reports f = poles·rpm/120 (synchronous speed relation, any electrical-machines textbook)', () => {
    for (const np of fleet.units.filter((u) => demoUnitScenarios[u.id]!.channels.hz)) {
      const results = run(model(np.id, stillWeather({ windMs: () => 9 })), T0, 1);
      for (const { sample } of results.slice(-5)) {
        expect(sample.hz!).toBeCloseTo((np.poles * sample.rpm) / 120, 1);
      }
    }
  });

  it("recovers the simulated EMF from a loaded sample with E = V + I·(R + jX) (contract section 5; Chapman's per-phase circuit, from memory)", () => {
    for (const [id, load] of [['qv-04', 'rectifier'], ['pd-03', 'rectifier'], ['sd-03', 'rectifier'], ['vo-01', 'resistive']] as const) {
      const np = unit(id);
      const m = model(id, stillWeather({ windMs: () => 10 }), { scenario: { load } });
      const results = run(m, T0, 10);
      const { sample, truth } = results.at(-1)!;
      expect(truth.terminals.ia).toBeGreaterThan(0.3 * model(id, stillWeather()).ratedCurrentA);
      // With the load's own power factor (0.95 rectifier, 1 resistive) the recovery is exact to the logger's digits.
      const pf = LOAD_POWER_FACTOR[load];
      expect(Math.abs(recoveredEmfLl(np, sample, pf) / truth.emfLlV - 1)).toBeLessThan(0.0002);
      // With cos φ estimated from the readings (as the diagnosis must), rounding near unity moves sin φ: within 0.2 %.
      expect(Math.abs(recoveredEmfLl(np, sample) / truth.emfLlV - 1)).toBeLessThan(0.002);
      // And that EMF is the machine's Ke (nameplate times as-built) at the magnet (= stator) temperature.
      const keNow = keAtMagnetC({
        keVPerKrpm: np.keVPerKrpm * m.keAsBuilt,
        refC: np.keRefC,
        magnetC: truth.statorC,
        coeffPctPerC: remanenceCoeffPctPerC(np.magnet, np.magnetTempCoeffPctPerC),
      });
      expect(truth.emfLlV).toBeCloseTo((keNow * truth.rpm) / 1000, 6);
    }
  });

  it('keeps published samples near the truth with sensor noise on', () => {
    // At unity power factor (hydro) the recovered EMF is biased up a little: noise
    // takes kW/(√3·V·I) below 1 half the time, and sin φ = √(1 − cos² φ) is steep
    // there; at 0.95 (wind) the noise averages out.
    for (const [id, bias] of [['qv-01', 0.002], ['sd-01', 0.01]] as const) {
      const np = unit(id);
      const results = run(model(id, stillWeather({ windMs: () => 9 }), { noise: 1 }), T0, 10);
      const errors = results.map(({ sample, truth }) => recoveredEmfLl(np, sample) / truth.emfLlV - 1);
      const mean = errors.reduce((a, b) => a + b, 0) / errors.length;
      expect(Math.abs(mean)).toBeLessThan(bias);
      expect(new Set(results.map((r) => r.sample.vab)).size).toBeGreaterThan(300);
    }
  });
});

describe('UnitModel as built', () => {
  it('draws each unit a true Ke a percent or so off its nameplate, from the unit id alone', () => {
    const factors = fleet.units.map((u) => asBuiltKeFactor(u.id));
    for (const f of factors) {
      expect(f).toBeGreaterThanOrEqual(AS_BUILT_KE_MIN);
      expect(f).toBeLessThan(AS_BUILT_KE_MAX);
    }
    expect(Math.max(...factors) - Math.min(...factors)).toBeGreaterThan(0.01);
    expect(asBuiltKeFactor('qv-01')).toBe(asBuiltKeFactor('qv-01'));
    expect(asBuiltKeFactor('qv-01')).not.toBe(asBuiltKeFactor('qv-02'));
  });

  it('builds the machine with that Ke whatever the seed, and leaves the nameplate alone', () => {
    const np = unit('pd-01');
    const keOnPlate = np.keVPerKrpm;
    for (const seed of [1, 2]) {
      const m = new UnitModel(np, stillWeather(), DEFAULT_UNIT_SCENARIO, { seed, faults: { epochMs: T0 }, noiseScale: 0 });
      expect(m.keAsBuilt).toBe(asBuiltKeFactor('pd-01'));
      expect(m.spec.keVPerKrpm).toBeCloseTo(keOnPlate * asBuiltKeFactor('pd-01'), 9);
    }
    expect(np.keVPerKrpm).toBe(keOnPlate);
    expect(Math.abs(asBuiltKeFactor('pd-01') - 1)).toBeGreaterThan(0.001);
  });

  it('takes a scenario that pins the factor, and names a factor out of range', () => {
    expect(model('qv-01', stillWeather(), { scenario: { keAsBuilt: 1 } }).spec.keVPerKrpm).toBe(unit('qv-01').keVPerKrpm);
    expect(() => model('qv-01', stillWeather(), { scenario: { keAsBuilt: 1.5 } })).toThrow(/keAsBuilt must be from 0.8 to 1.2, got 1.5/);
  });
});

describe('UnitModel faults', () => {
  it('falls in Ke at the configured rate on a demagnetising unit', () => {
    const np = unit('qv-02');
    const plan = demoUnitScenarios['qv-02']!.faults;
    const keRatioAt = (t: number, rate: number) => {
      const m = model('qv-02', stillWeather({ windMs: () => 9 }), { faults: plan, demag: rate });
      const { sample, truth } = run(m, t, 3).at(-1)!;
      // Flux lost counts from the machine as built.
      const keNominal = keAtMagnetC({ keVPerKrpm: np.keVPerKrpm * m.keAsBuilt, refC: 20, magnetC: sample.statorC!, coeffPctPerC: -0.12 });
      return recoveredEmfLl(np, sample) / ((keNominal * truth.rpm) / 1000);
    };
    // Default plan: 1 % a day from the epoch.
    expect(keRatioAt(T0 + 2 * DAY, 1)).toBeCloseTo(0.98, 2);
    expect(keRatioAt(T0 + 5 * DAY, 1)).toBeCloseTo(0.95, 2);
    // Compressed demo time: 4 % a day.
    expect(keRatioAt(T0 + 2 * DAY, 4)).toBeCloseTo(0.92, 2);
  });

  it('unbalances the line voltages by more than 2 % with a shorted turn (NEMA MG 1 unbalance definition)', () => {
    const plan = demoUnitScenarios['sd-02']!.faults;
    const before = run(model('sd-02', stillWeather(), { faults: plan, noise: 1 }), T0 + 4 * DAY, 2).at(-1)!.sample;
    const after = run(model('sd-02', stillWeather(), { faults: plan, noise: 1 }), T0 + 5 * DAY, 2).at(-1)!.sample;
    expect(lineVoltageUnbalancePct(before.vab!, before.vbc!, before.vca!)!).toBeLessThan(0.6);
    expect(lineVoltageUnbalancePct(after.vab!, after.vbc!, after.vca!)!).toBeGreaterThan(2);
  });

  it('runs the winding with a shorted turn hotter than its healthy twin', () => {
    const plan = demoUnitScenarios['sd-02']!.faults;
    const healthy = run(model('sd-01', stillWeather()), T0 + 5 * DAY, 1).at(-1)!.truth.statorC;
    const shorted = run(model('sd-02', stillWeather(), { faults: plan }), T0 + 5 * DAY, 1).at(-1)!.truth.statorC;
    expect(shorted - healthy).toBeGreaterThan(4);
  });

  it('reports rpm 5 % low with a worn speed pick-up while hz stays true: hz/(poles·rpm/120) ≈ 1/0.95', () => {
    const np = unit('pd-02');
    const plan = demoUnitScenarios['pd-02']!.faults;
    const results = run(model('pd-02', stillWeather({ windMs: () => 9 }), { faults: plan, noise: 1 }), T0 + 6 * DAY, 2);
    for (const { sample, truth } of results.slice(-10)) {
      expect(sample.hz! / ((np.poles * sample.rpm) / 120)).toBeCloseTo(1 / 0.95, 2);
      expect(sample.hz!).toBeCloseTo((np.poles * truth.rpm) / 120, 0);
    }
  });

  it('runs past maxRpm in an overspeed gust and back under it after', () => {
    const np = unit('qv-04');
    const plan = demoUnitScenarios['qv-04']!.faults;
    const m = model('qv-04', stillWeather({ windMs: () => 9 }), { faults: plan });
    // The first gust of the plan blows at the epoch + 30 min for 30 s.
    const results = run(m, T0 + 29 * MIN, 3);
    const peak = Math.max(...results.map((r) => r.truth.rpm));
    expect(peak).toBeGreaterThan(np.maxRpm);
    expect(results.some((r) => r.truth.overspeed)).toBe(true);
    expect(results.at(-1)!.truth.rpm).toBeLessThanOrEqual(np.ratedRpm * 1.02);
    expect(results[0]!.truth.rpm).toBeLessThanOrEqual(np.ratedRpm * 1.02);
  });
});

describe('UnitModel wind and water', () => {
  it('holds the tip-speed ratio below rated wind and rated speed above it', () => {
    const np = unit('qv-01');
    const m8 = model('qv-01', stillWeather({ windMs: () => 8 }));
    const { truth } = run(m8, T0, 2).at(-1)!;
    const tsr = ((truth.rpm * 2 * Math.PI) / 60) * (np.rotorDiameterM! / 2) / 8;
    expect(tsr).toBeCloseTo(m8.tipSpeedRatio, 1);
    expect(m8.tipSpeedRatio).toBeGreaterThan(6);
    expect(m8.tipSpeedRatio).toBeLessThan(8);
    const high = run(model('qv-01', stillWeather({ windMs: () => 18 })), T0, 2).at(-1)!.truth;
    expect(high.rpm).toBeCloseTo(np.ratedRpm, -1);
    expect(Math.abs(high.rpm / np.ratedRpm - 1)).toBeLessThan(0.02);
  });

  it('makes power off the power curve at the density-normalised wind (IEC 61400-12-1 normalisation)', () => {
    const np = unit('vo-03');
    const kwAt = powerCurveLookup({ points: np.powerCurve!, cutInMs: np.cutInMs!, cutOutMs: np.cutOutMs! });
    for (const air of [1.225, 1.0]) {
      const results = run(model('vo-03', stillWeather({ windMs: () => 9, airKgM3: air })), T0, 5);
      const { truth } = results.at(-1)!;
      const expected = kwAt(normaliseWindSpeedMs(9, air));
      // The converter's 1 % ripple is the only difference.
      expect(Math.abs(truth.terminals.kw / expected - 1)).toBeLessThan(0.04);
    }
  });

  it('makes nothing below cut-in, and stops above cut-out until the wind has dropped', () => {
    const idle = run(model('pd-01', stillWeather({ windMs: () => 2 })), T0, 2).at(-1)!;
    expect(idle.truth.mode).toBe('idling');
    expect(idle.sample.kw).toBe(0);
    expect(idle.sample.rpm).toBeGreaterThan(0);
    let wind = 27;
    const m = model('pd-01', stillWeather({ windMs: () => wind }));
    const storm = run(m, T0, 3).at(-1)!;
    expect(storm.truth.mode).toBe('stopped');
    expect(storm.sample.kw).toBe(0);
    expect(storm.truth.rpm).toBeLessThan(1);
    wind = 12;
    const soon = run(m, T0 + 4 * MIN, 5).at(-1)!;
    expect(soon.truth.mode).toBe('stopped');
    const later = run(m, T0 + 20 * MIN, 2).at(-1)!;
    expect(later.truth.mode).toBe('generating');
  });

  it('has the turbulence intensity of its climate: 10-minute sd over mean (IEC 61400-1 definition)', () => {
    const m = model('qv-01', stillWeather({ windMs: () => 8, ti: 0.13 }));
    const winds = run(m, T0, 600, 1).map((r) => r.truth.windMs!);
    const tis: number[] = [];
    for (let k = 0; k + 600 <= winds.length; k += 600) {
      const w = winds.slice(k, k + 600);
      const mean = w.reduce((a, b) => a + b, 0) / w.length;
      const sd = Math.sqrt(w.reduce((a, b) => a + (b - mean) ** 2, 0) / (w.length - 1));
      tis.push(sd / mean);
    }
    const ti = tis.reduce((a, b) => a + b, 0) / tis.length;
    expect(ti).toBeGreaterThan(0.1);
    expect(ti).toBeLessThan(0.14);
  });

  it('makes ρ·g·Q·H·η at most, capped at rated, at governed speed (hydro on a load controller)', () => {
    const np = unit('sd-03');
    for (const flow of [0.5, 0.9, 1.4]) {
      const { sample, truth } = run(model('sd-03', stillWeather({ flow }), { scenario: { load: 'resistive' } }), T0, 3).at(-1)!;
      const ideal = hydroPowerKw(sample.flowM3s!, sample.headM!, np.efficiency!);
      expect(truth.terminals.kw).toBeLessThanOrEqual(Math.min(np.ratedKw, ideal) * 1.005);
      expect(truth.terminals.kw).toBeGreaterThan(Math.min(np.ratedKw, ideal) * 0.9);
      expect(sample.flowM3s!).toBeLessThanOrEqual(np.designFlowM3s! * 1.04);
      expect(Math.abs(sample.rpm / np.ratedRpm - 1)).toBeLessThan(0.02);
      expect(Math.abs(sample.headM! / np.designHeadM! - 1)).toBeLessThan(0.03);
    }
  });

  it('sweeps a hydro inverter unit down by the scan depth and back, over 10 % of rated speed within an hour', () => {
    const np = unit('sd-01');
    const results = run(model('sd-01', stillWeather({ flow: 0.9 })), T0, SCAN_EVERY_S / 60 + 5, 2);
    const rpms = results.map((r) => r.truth.rpm);
    const span = (Math.max(...rpms) - Math.min(...rpms)) / np.ratedRpm;
    expect(span).toBeGreaterThan(0.1);
    expect(span).toBeLessThan(SCAN_DEPTH + 0.02);
    // Most of the time at the runner's best speed.
    const atRated = rpms.filter((r) => Math.abs(r / np.ratedRpm - 1) < 0.015).length / rpms.length;
    expect(atRated).toBeGreaterThan(0.85);
    for (const { sample, truth } of results) {
      expect(truth.terminals.kw).toBeLessThanOrEqual(hydroPowerKw(sample.flowM3s!, sample.headM!, np.efficiency!) * 1.005);
    }
  });
});

describe('UnitModel thermal model', () => {
  it('settles at coolant + rated rise·(I/I_rated)² and moves with the thermal time constant (first-order thermal model, common practice)', () => {
    // Wind steps from 6 to 10 m/s at T0 + 10 min.
    const m = model('pd-03', stillWeather({ windMs: (t) => (t < T0 + 10 * MIN ? 6 : 10), airC: 10 }));
    const before = run(m, T0, 10, 5);
    const t0 = before.at(-1)!.truth;
    const tau = THERMAL_TAU_S.wind;
    const results = run(m, T0 + 10 * MIN + 5000, (8 * tau) / 60, 5);
    const end = results.at(-1)!.truth;
    // The converter's ripple moves the current a little: average the heating over the last minutes.
    const last = results.slice(-120);
    const heating = last.reduce((a, r) => a + (r.truth.terminals.ia / m.ratedCurrentA) ** 2, 0) / last.length;
    expect(end.statorC).toBeCloseTo(10 + RATED_RISE_K.wind * heating, 0);
    // Each step relaxes exactly: T' = T_ss + (T − T_ss)·exp(−Δt/τ), T_ss from that step's current.
    for (let k = 0; k + 1 < results.length; k += 97) {
      const a = results[k]!.truth;
      const b = results[k + 1]!.truth;
      const ss = 10 + RATED_RISE_K.wind * (a.terminals.ia / m.ratedCurrentA) ** 2;
      expect(b.statorC).toBeCloseTo(ss + (a.statorC - ss) * Math.exp(-(b.tMs - a.tMs) / 1000 / tau), 9);
    }
    // One time constant after the step: 63.2 % of the way (1 − 1/e) for a fixed heat input; a little
    // less here, since a warmer winding (more R, weaker magnets) needs more current for the same power.
    const atTau = results.find((r) => r.truth.tMs >= T0 + 10 * MIN + tau * 1000)!.truth;
    const fraction = (atTau.statorC - t0.statorC) / (end.statorC - t0.statorC);
    expect(fraction).toBeGreaterThan(0.52);
    expect(fraction).toBeLessThan(0.66);
  });
});

describe('timestamps', () => {
  it('writes ISO-8601 with the zone offset', () => {
    expect(isoWithOffset(Date.UTC(2026, 6, 1, 12, 0, 0, 500), 60)).toBe('2026-07-01T13:00:00.500+01:00');
    expect(isoWithOffset(Date.UTC(2026, 0, 1, 3), -420)).toBe('2025-12-31T20:00:00.000-07:00');
  });

  it('names a step back in time', () => {
    const m = model('qv-01', stillWeather());
    m.step(T0);
    expect(() => m.step(T0 - 1)).toThrow(/tMs must not go back/);
  });
});
