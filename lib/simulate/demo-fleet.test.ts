import { beforeAll, describe, expect, it } from 'vitest';
import { fleetSchema } from '@/lib/contract/nameplate';
import { parseTelemetrySample, type TelemetrySample } from '@/lib/contract/telemetry';
import { diagnoseSamples, type DiagnosisResult } from '@/lib/diagnosis/diagnose';
import { hydroPowerKw } from '@/lib/energy/hydro-power';
import { REFERENCE_AIR_DENSITY_KG_M3 } from '@/lib/energy/air-density';
import { lineVoltageUnbalancePct } from '@/lib/physics/unbalance';
import { DEMO_FAULT_LEAD_DAYS, demoClimates, demoFleet, demoUnitScenarios } from './demo-fleet';
import type { FaultKind } from './faults';
import { buildFleetModels, type SimulatedUnit } from './fleet-models';
import { LOAD_POWER_FACTOR, ratedWindMs } from './machine';
import { generatorTerminals } from '@/lib/physics/generator-model';

const fleet = fleetSchema.parse(demoFleet);

/** Median of a non-empty list (the middle value; the upper one of two). */
function median(xs: readonly number[]): number {
  if (xs.length === 0) throw new RangeError('median of no values');
  return [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
}

/** Betz limit of the power coefficient, 16/27 (Betz 1920, any wind-energy text). */
const BETZ = 16 / 27;

describe('demo fleet', () => {
  it('passes the fleet schema', () => {
    const parsed = fleetSchema.safeParse(demoFleet);
    expect(parsed.success).toBe(true);
  });

  it('has 3–4 sites with IANA zones, 12–16 units, wind and hydro, every magnet kind', () => {
    expect(fleet.sites.length).toBeGreaterThanOrEqual(3);
    expect(fleet.sites.length).toBeLessThanOrEqual(4);
    expect(fleet.units.length).toBeGreaterThanOrEqual(12);
    expect(fleet.units.length).toBeLessThanOrEqual(16);
    expect(new Set(fleet.units.map((u) => u.kind))).toEqual(new Set(['wind', 'hydro']));
    expect(new Set(fleet.units.map((u) => u.magnet))).toEqual(new Set(['ndfeb', 'ferrite', 'smco']));
    for (const u of fleet.units) {
      expect(fleet.sites.some((s) => s.id === u.siteId)).toBe(true);
      expect(demoUnitScenarios[u.id]).toBeDefined();
      expect(demoClimates[u.siteId]).toBeDefined();
      expect(u.ratedKw).toBeGreaterThanOrEqual(1);
      expect(u.ratedKw).toBeLessThanOrEqual(50);
      expect(u.poles).toBeGreaterThanOrEqual(8);
      expect(u.poles).toBeLessThanOrEqual(24);
    }
  });

  it('has every fault kind on some unit, and healthy units to compare with', () => {
    const kinds = Object.values(demoUnitScenarios).flatMap((s) => s.faults.map((f) => f.kind));
    expect(new Set(kinds)).toEqual(new Set(['demagnetisation', 'shorted-turn', 'speed-sensor-low', 'offline', 'overspeed']));
    expect(Object.values(demoUnitScenarios).filter((s) => s.faults.length === 0).length).toBeGreaterThanOrEqual(6);
  });

  it('gives each unit its rated line voltage (200–690 V) at rated speed and load, with margin to deliver more', () => {
    for (const u of fleet.units) {
      const pf = LOAD_POWER_FACTOR[demoUnitScenarios[u.id]!.load];
      // A hot machine at rated: winding and magnets at 80 °C.
      const at = (kw: number) => generatorTerminals(u, { rpm: u.ratedRpm, kw, powerFactor: pf, magnetC: 80, windingC: 80 });
      const rated = at(u.ratedKw);
      expect(rated, u.id).toBeDefined();
      expect(rated!.vab, u.id).toBeGreaterThan(200);
      expect(rated!.vab, u.id).toBeLessThan(700);
      // Copper loss at rated between 2 and 10 % of rating (small machines, common practice).
      const copperKw = (3 * rated!.ia ** 2 * u.phaseOhm * (1 + 0.00393 * 60)) / 1000;
      expect(copperKw / u.ratedKw, u.id).toBeGreaterThan(0.02);
      expect(copperKw / u.ratedKw, u.id).toBeLessThan(0.1);
      expect(at(1.3 * u.ratedKw), u.id).toBeDefined();
      // Electrical frequency at rated speed 20–100 Hz.
      expect(rated!.hz, u.id).toBeGreaterThan(20);
      expect(rated!.hz, u.id).toBeLessThan(100);
    }
  });

  it('keeps every power-curve point under a power coefficient of 0.45 at 1.225 kg/m³, far under the Betz limit', () => {
    for (const u of fleet.units.filter((x) => x.kind === 'wind')) {
      const area = (Math.PI * u.rotorDiameterM! ** 2) / 4;
      for (const p of u.powerCurve!) {
        if (p.ms === 0) continue;
        const cp = (p.kw * 1000) / (0.5 * REFERENCE_AIR_DENSITY_KG_M3 * area * p.ms ** 3);
        expect(cp, `${u.id} at ${p.ms} m/s`).toBeLessThanOrEqual(0.45);
        expect(cp).toBeLessThan(BETZ);
      }
      expect(Math.max(...u.powerCurve!.map((p) => p.kw))).toBeCloseTo(u.ratedKw, 6);
      // Tip-speed ratio at rated wind 6–8, usual for small three-bladed rotors (common practice).
      const tsr = ((u.ratedRpm * 2 * Math.PI) / 60) * (u.rotorDiameterM! / 2) / ratedWindMs(u);
      expect(tsr, u.id).toBeGreaterThan(6);
      expect(tsr, u.id).toBeLessThan(8);
      expect(u.maxRpm / u.ratedRpm).toBeGreaterThan(1.2);
    }
  });

  it('rates each hydro unit at ρ·g·Q·H·η of its design flow and head, within 2 %', () => {
    for (const u of fleet.units.filter((x) => x.kind === 'hydro')) {
      const kw = hydroPowerKw(u.designFlowM3s!, u.designHeadM!, u.efficiency!);
      expect(Math.abs(kw / u.ratedKw - 1), u.id).toBeLessThan(0.02);
    }
  });
});

describe('demo fleet samples', () => {
  const endMs = Date.now();
  const { units, faults } = buildFleetModels(fleet, {}, endMs);

  it('puts the fault epoch seven days back by default', () => {
    expect((endMs - faults.epochMs) / 86_400_000).toBeGreaterThan(DEMO_FAULT_LEAD_DAYS);
    expect((endMs - faults.epochMs) / 86_400_000).toBeLessThan(DEMO_FAULT_LEAD_DAYS + 1 / 24);
  });

  it('pass the telemetry contract, with both timestamp forms across the fleet', () => {
    const forms = new Set<string>();
    for (const u of units) {
      for (let k = 0; k < 200; k++) {
        const { sample } = u.model.step(endMs - (200 - k) * 30_000);
        const parsed = parseTelemetrySample(sample);
        expect(parsed.ok ? [] : parsed.problems, u.nameplate.id).toEqual([]);
        if (parsed.ok) expect(parsed.unknownFields).toEqual([]);
        forms.add(typeof sample.ts === 'number' ? 'epoch' : sample.ts.endsWith('Z') ? 'utc' : 'offset');
      }
    }
    expect(forms).toEqual(new Set(['epoch', 'utc', 'offset']));
  });

  it('show each fault on its unit over the last day, and no false signs on the healthy ones', () => {
    // A fixed day, so that every unit turns and every check below has samples to judge.
    const dayEndMs = Date.UTC(2026, 2, 10, 12);
    const day = buildFleetModels(fleet, { seed: 3 }, dayEndMs);
    const faultsSeen = new Set<string>();
    for (const u of day.units) {
      const id = u.nameplate.id;
      const kinds = new Set(u.scenario.faults.map((f) => f.kind));
      const s = { atSpeed: 0, unb: [] as number[], ratio: [] as number[], overspeed: 0 };
      for (let t = dayEndMs - 86_400_000; t <= dayEndMs; t += 20_000) {
        const { sample, truth } = u.model.step(t);
        if (sample.rpm > u.nameplate.maxRpm) s.overspeed++;
        if (truth.rpm < 0.3 * u.nameplate.ratedRpm) continue;
        s.atSpeed++;
        if (sample.vbc !== undefined) s.unb.push(lineVoltageUnbalancePct(sample.vab!, sample.vbc, sample.vca!)!);
        if (sample.hz !== undefined) s.ratio.push(sample.hz / ((u.nameplate.poles * sample.rpm) / 120));
      }
      expect(s.atSpeed, `${id}: samples at speed`).toBeGreaterThan(500);
      // Three line voltages exactly when the logger has them; then the unbalance is judged.
      expect(s.unb.length, `${id}: unbalance readings`).toBe(u.scenario.channels.threePhase ? s.atSpeed : 0);
      if (kinds.has('shorted-turn')) {
        expect(median(s.unb), id).toBeGreaterThan(2);
        faultsSeen.add('shorted-turn');
      } else if (s.unb.length > 0) expect(median(s.unb), id).toBeLessThan(0.5);
      // Frequency exactly when the logger has it; then the speed reading is judged.
      expect(s.ratio.length, `${id}: speed ratios`).toBe(u.scenario.channels.hz ? s.atSpeed : 0);
      if (kinds.has('speed-sensor-low')) {
        expect(median(s.ratio), id).toBeCloseTo(1 / 0.95, 2);
        faultsSeen.add('speed-sensor-low');
      } else if (s.ratio.length > 0) expect(Math.abs(median(s.ratio) - 1), id).toBeLessThan(0.005);
      if (kinds.has('overspeed')) {
        expect(s.overspeed, id).toBeGreaterThan(10);
        faultsSeen.add('overspeed');
      } else expect(s.overspeed, id).toBe(0);
    }
    expect(faultsSeen).toEqual(new Set(['shorted-turn', 'speed-sensor-low', 'overspeed']));
  });
});

describe('demo fleet diagnosed', () => {
  /**
   * The last DIAGNOSIS_WINDOW_HOURS (6, the live default) of each unit at
   * the history's 10 s, through the contract's sample schema and the
   * diagnosis the product runs; two fixed ends, winter and summer.
   */
  const ends = [Date.UTC(2026, 0, 15, 12), Date.UTC(2026, 6, 15, 3)];
  let runs: { unit: SimulatedUnit; samples: TelemetrySample[]; result: DiagnosisResult }[][] = [];
  beforeAll(() => {
    runs = ends.map((endMs) => {
      const { units } = buildFleetModels(fleet, {}, endMs);
      return units.map((u) => {
        const samples: TelemetrySample[] = [];
        for (let t = endMs - 6 * 3_600_000; t <= endMs; t += 10_000) {
          const parsed = parseTelemetrySample(u.model.step(t).sample);
          if (!parsed.ok) throw new Error(`${u.nameplate.id}: ${parsed.problems.join('; ')}`);
          samples.push(parsed.sample);
        }
        return { unit: u, samples, result: diagnoseSamples({ nameplate: u.nameplate, samples }) };
      });
    });
  });
  /** The runs, never none (a loop over nothing would check nothing). */
  const allRuns = () => {
    expect(runs).toHaveLength(ends.length);
    return runs;
  };
  const faultKinds = (u: SimulatedUnit) => new Set<FaultKind>(u.scenario.faults.map((f) => f.kind));
  const MACHINE_FAULTS: readonly FaultKind[] = ['demagnetisation', 'shorted-turn', 'speed-sensor-low'];
  /** Machines with nothing wrong with them: no machine or sensor fault, and a free speed to fit Ke over. */
  const healthyMachine = (u: SimulatedUnit) => u.scenario.load === 'rectifier' && !MACHINE_FAULTS.some((k) => faultKinds(u).has(k));

  it('reads every healthy unit a little off its nameplate, 0.985–1.02, not all alike', () => {
    for (const run of allRuns()) {
      const healthy = run.filter((r) => healthyMachine(r.unit));
      expect(healthy.length).toBeGreaterThanOrEqual(8);
      for (const { unit, result } of healthy) {
        expect(result.verdict, unit.nameplate.id).toBe('healthy');
        expect(result.keRatio, unit.nameplate.id).not.toBeNull();
        expect(result.keRatio!, unit.nameplate.id).toBeGreaterThanOrEqual(0.985);
        expect(result.keRatio!, unit.nameplate.id).toBeLessThanOrEqual(1.02);
        // The diagnosis finds the machine as built.
        expect(Math.abs(result.keRatio! - unit.model.keAsBuilt), unit.nameplate.id).toBeLessThan(0.004);
      }
      const ratios = healthy.map((r) => r.result.keRatio!);
      expect(Math.max(...ratios) - Math.min(...ratios)).toBeGreaterThanOrEqual(0.01);
    }
  });

  it('reads each faulty unit as its fault', () => {
    const seen = new Set<string>();
    for (const run of allRuns()) {
      for (const { unit, result } of run) {
        const id = unit.nameplate.id;
        const kinds = faultKinds(unit);
        if (kinds.has('demagnetisation')) {
          // Seven days at 1 % a day: clearly under the 0.95 line, the whole interval too.
          expect(result.verdict, id).toBe('demagnetised');
          expect(result.keRatio!, id).toBeLessThan(0.945);
          expect(result.keRatioHigh!, id).toBeLessThan(0.95);
          seen.add('demagnetisation');
        }
        if (kinds.has('shorted-turn')) {
          expect(result.verdict, id).toBe('shorted-turns');
          expect(result.unbalancePct!, id).toBeGreaterThan(2);
          seen.add('shorted-turn');
        }
        if (kinds.has('speed-sensor-low')) {
          expect(result.verdict, id).toBe('speed-sensor-fault');
          expect(Math.abs(result.speedRatio! - 1), id).toBeGreaterThan(0.02);
          seen.add('speed-sensor-low');
        }
      }
    }
    expect(seen).toEqual(new Set(['demagnetisation', 'shorted-turn', 'speed-sensor-low']));
  });

  it('runs the overspeed unit above its nameplate maxRpm in the samples it sends, and the diagnosis raises the alarm', () => {
    const overspeedFindings = (result: DiagnosisResult) => result.findings.filter((f) => f.code === 'overspeed');
    for (const run of allRuns()) {
      const over = run.filter((r) => faultKinds(r.unit).has('overspeed'));
      expect(over.length).toBeGreaterThanOrEqual(1);
      for (const { unit, samples, result } of over) {
        const above = samples.filter((s) => s.rpm > unit.nameplate.maxRpm);
        expect(above.length, unit.nameplate.id).toBeGreaterThanOrEqual(5);
        expect(overspeedFindings(result).map((f) => f.severity), unit.nameplate.id).toEqual(['alarm']);
        // It does not change the verdict (contract, section 5).
        expect(result.verdict, unit.nameplate.id).toBe('healthy');
      }
      for (const { unit, samples, result } of run.filter((r) => !faultKinds(r.unit).has('overspeed'))) {
        expect(samples.filter((s) => s.rpm > unit.nameplate.maxRpm), unit.nameplate.id).toEqual([]);
        expect(overspeedFindings(result), unit.nameplate.id).toEqual([]);
      }
    }
  });

  it('cannot judge the hydro set held at one speed by its load controller, and says so', () => {
    for (const run of allRuns()) {
      const governed = run.filter((r) => r.unit.nameplate.kind === 'hydro' && r.unit.scenario.load === 'resistive');
      expect(governed.length).toBe(1);
      for (const { unit, result } of governed) {
        expect(result.verdict, unit.nameplate.id).toBe('insufficient-data');
        expect(result.findings.map((f) => f.code), unit.nameplate.id).toContain('insufficient-data');
        // Why: its speed never spreads over the 10 % of rated the Ke fit needs.
        expect(result.details.speedMaxRpm! - result.details.speedMinRpm!).toBeLessThan(0.1 * unit.nameplate.ratedRpm);
      }
    }
  });
});
