/**
 * Builds the simulated units of a fleet: one weather per site, one model per
 * unit, the scenario (loggers, faults) from the demo tables or defaults.
 */
import { fleetSchema, type Fleet, type Nameplate } from '@/lib/contract/nameplate';
import { formatIssues } from '@/lib/contract/telemetry';
import { AppError } from '@/lib/errors/app-error';
import { DEMO_FAULT_LEAD_DAYS, demoClimates, demoUnitScenarios } from './demo-fleet';
import type { FaultSettings } from './faults';
import { DEFAULT_UNIT_SCENARIO, UnitModel, type UnitScenario } from './machine';
import { DEFAULT_CLIMATE, SiteWeather, type SiteClimate } from './weather';

/** Seed of a run that names none. */
export const DEFAULT_SEED = 1;

const HOUR_MS = 3_600_000;
const DAY_MS = 86_400_000;

/** Options shared by the live simulator and the backfill. */
export interface FleetModelOptions {
  /** The fleet; validated with fleetSchema. Default the demo fleet. */
  fleet?: unknown;
  seed?: number | undefined;
  /** Time the faults count from, epoch ms; default the hour before now, less seven days. */
  faultEpochMs?: number | undefined;
  /** Ke loss of demagnetising units, % per day; default each plan's (1 % a day). */
  demagPctPerDay?: number | undefined;
  /** Period of overspeed gusts, s; default each plan's (1800 s). */
  overspeedEveryS?: number | undefined;
  /** Seconds into a live run an offline unit drops; default each plan's (240 s). */
  offlineAfterS?: number | undefined;
  /** Seconds an offline unit stays away (null: for good); default each plan's (1200 s). */
  offlineForS?: number | null | undefined;
  /** Sensor noise scale (0 = exact readings). */
  noiseScale?: number | undefined;
  /** Loggers and faults by unit id; default the demo's. */
  scenarios?: Readonly<Record<string, UnitScenario>> | undefined;
  /** Climate by site id; default the demo's. */
  climates?: Readonly<Record<string, SiteClimate>> | undefined;
}

/** One simulated unit. */
export interface SimulatedUnit {
  readonly nameplate: Nameplate;
  readonly scenario: UnitScenario;
  readonly model: UnitModel;
}

/**
 * Default fault epoch at `nowMs`: the start of the hour, less seven days, so
 * a live run and a history started moments apart agree.
 * @example new Date(defaultFaultEpochMs(Date.UTC(2026, 2, 10, 12, 34))).toISOString() // '2026-03-03T12:00:00.000Z'
 */
export function defaultFaultEpochMs(nowMs: number): number {
  return Math.floor(nowMs / HOUR_MS) * HOUR_MS - DEMO_FAULT_LEAD_DAYS * DAY_MS;
}

/**
 * `value` if it is a number from `min` to `max` (a whole number if
 * `integer`), else an AppError naming the option.
 * @example checkRange('rateHz', 2, 0.01, 50) // 2
 */
export function checkRange(name: string, value: number, min: number, max: number, integer = false): number {
  if (!Number.isFinite(value) || value < min || value > max || (integer && !Number.isInteger(value))) {
    throw new AppError('bad-input', 'simulate', `${name} must be ${integer ? 'a whole number ' : ''}from ${min} to ${max}, got ${value}`);
  }
  return value;
}

/** Validates a fleet and says what is wrong with it, field by field. */
export function parseFleet(input: unknown): Fleet {
  const parsed = fleetSchema.safeParse(input);
  if (!parsed.success) {
    throw new AppError('bad-input', 'simulate', `the fleet is invalid: ${formatIssues(parsed.error.issues).join('; ')}`);
  }
  if (parsed.data.units.length === 0) throw new AppError('bad-input', 'simulate', 'the fleet has no units to simulate');
  return parsed.data;
}

/** Builds the models of `fleet`; `nowMs` fixes the default fault epoch. */
export function buildFleetModels(
  fleet: Fleet,
  options: FleetModelOptions,
  nowMs: number,
): { units: SimulatedUnit[]; faults: FaultSettings; seed: number } {
  const seed = options.seed ?? DEFAULT_SEED;
  if (!Number.isInteger(seed)) throw new AppError('bad-input', 'simulate', `seed must be a whole number, got ${seed}`);
  const faults: FaultSettings = {
    epochMs: options.faultEpochMs ?? defaultFaultEpochMs(nowMs),
    demagPctPerDay: options.demagPctPerDay,
    overspeedEveryS: options.overspeedEveryS,
    offlineAfterS: options.offlineAfterS,
    offlineForS: options.offlineForS,
  };
  const scenarios = options.scenarios ?? demoUnitScenarios;
  const climates = options.climates ?? demoClimates;
  const weathers = new Map<string, SiteWeather>();
  const units = fleet.units.map((nameplate) => {
    let weather = weathers.get(nameplate.siteId);
    if (weather === undefined) {
      const site = fleet.sites.find((s) => s.id === nameplate.siteId);
      weather = new SiteWeather(nameplate.siteId, site?.timezone ?? 'UTC', climates[nameplate.siteId] ?? DEFAULT_CLIMATE, seed);
      weathers.set(nameplate.siteId, weather);
    }
    const scenario = scenarios[nameplate.id] ?? DEFAULT_UNIT_SCENARIO;
    const model = new UnitModel(nameplate, weather, scenario, { seed, faults, noiseScale: options.noiseScale });
    return { nameplate, scenario, model };
  });
  return { units, faults, seed };
}
