import { describe, expect, it } from 'vitest';
import { fleetSchema } from '../contract/nameplate';
import { parseTelemetrySample } from '../contract/telemetry';
import { hydroPowerKw } from '../energy/hydro-power';
import { REFERENCE_AIR_DENSITY_KG_M3 } from '../energy/air-density';
import { lineVoltageUnbalancePct } from '../physics/unbalance';
import { DEMO_FAULT_LEAD_DAYS, demoClimates, demoFleet, demoUnitScenarios } from './demo-fleet';
import { buildFleetModels } from './fleet-models';
import { LOAD_POWER_FACTOR, ratedWindMs } from './machine';
import { generatorTerminals } from '../physics/generator-model';

const fleet = fleetSchema.parse(demoFleet);

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
    const day = buildFleetModels(fleet, { seed: 3 }, endMs);
    const stats = new Map<string, { unb: number[]; ratio: number[]; overspeed: number }>();
    for (const u of day.units) {
      const s = { unb: [] as number[], ratio: [] as number[], overspeed: 0 };
      for (let t = endMs - 86_400_000; t <= endMs; t += 20_000) {
        const { sample, truth } = u.model.step(t);
        if (truth.rpm < 0.3 * u.nameplate.ratedRpm) continue;
        if (sample.vbc !== undefined) s.unb.push(lineVoltageUnbalancePct(sample.vab!, sample.vbc, sample.vca!)!);
        if (sample.hz !== undefined) s.ratio.push(sample.hz / ((u.nameplate.poles * sample.rpm) / 120));
        if (sample.rpm > u.nameplate.maxRpm) s.overspeed++;
      }
      stats.set(u.nameplate.id, s);
    }
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
    for (const [id, s] of stats) {
      if (s.unb.length > 0) {
        if (id === 'mg-02') expect(median(s.unb), id).toBeGreaterThan(2);
        else expect(median(s.unb), id).toBeLessThan(0.5);
      }
      if (s.ratio.length > 0) {
        if (id === 'ks-02') expect(median(s.ratio), id).toBeCloseTo(1 / 0.95, 2);
        else expect(Math.abs(median(s.ratio) - 1), id).toBeLessThan(0.005);
      }
      if (id === 'rv-04') expect(s.overspeed, id).toBeGreaterThan(10);
      else expect(s.overspeed, id).toBe(0);
    }
  });
});
