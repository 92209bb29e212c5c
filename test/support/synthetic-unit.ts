/**
 * Synthetic telemetry of one invented unit, made with the forward generator
 * model (lib/physics/generator-model) so that its readings are physically
 * consistent: speed that wanders like a wind rotor, a load that follows
 * speed, temperatures, measurement noise, and optional faults. Seeded, so
 * every test sees the same numbers on every run.
 */
import { nameplateSchema, type Nameplate } from '@/lib/contract/nameplate';
import type { TelemetrySample } from '@/lib/contract/telemetry';
import { generatorTerminals } from '@/lib/physics/generator-model';

/** An invented 10 kW wind unit: 24 poles, 60 Hz at a rated 300 rpm, NdFeB magnets. */
export const TEST_NAMEPLATE: Nameplate = nameplateSchema.parse({
  id: 'test-unit-1',
  siteId: 'test-ridge',
  kind: 'wind',
  ratedKw: 10,
  ratedRpm: 300,
  maxRpm: 420,
  poles: 24,
  keVPerKrpm: 1400,
  keRefC: 20,
  magnet: 'ndfeb',
  phaseOhm: 0.35,
  phaseMh: 8,
  powerCurve: [
    { ms: 3, kw: 0.2 },
    { ms: 11, kw: 10 },
  ],
  cutInMs: 3,
  cutOutMs: 25,
  rotorDiameterM: 7,
});

/** Builds a nameplate from the test one with some fields changed (validated). */
export function testNameplate(changes: Partial<Record<keyof Nameplate, unknown>> = {}): Nameplate {
  return nameplateSchema.parse({ ...TEST_NAMEPLATE, ...changes });
}

export interface SyntheticOptions {
  readonly nameplate?: Nameplate;
  /** Number of samples; default 720 (2 h at 10 s). */
  readonly count?: number;
  /** First sample time, epoch ms; default 2026-03-01T00:00:00Z. */
  readonly startMs?: number;
  /** Seconds between samples; default 10. */
  readonly stepS?: number;
  /** Speed range as shares of ratedRpm; default 0.25 to 1.1. */
  readonly speedRange?: readonly [number, number];
  /**
   * Speed of sample i as a share of ratedRpm, in place of the random walk
   * (for logs that must sit exactly at a limit); `speedRange` is then unused.
   */
  readonly speedShare?: (i: number) => number;
  /** Load: kW at rated speed, following speed cubed, capped at ratedKw; 0 = open circuit. Default 0. */
  readonly ratedLoadKw?: number;
  /** Load power factor; default 0.95 lagging. */
  readonly powerFactor?: number;
  /** Stator (and magnet) temperature, °C; default 20. A function of the sample index for drifts. */
  readonly statorC?: number | ((i: number) => number);
  /** Ambient temperature, °C; default 10. */
  readonly ambientC?: number;
  /** Whole-machine flux factor (demagnetisation); default 1. */
  readonly fluxFactor?: number;
  /** Per-phase EMF factors (shorted turns); default [1, 1, 1]. */
  readonly phaseEmfFactors?: readonly [number, number, number];
  /** The speed sensor reads true rpm times this; default 1. */
  readonly speedSensorFactor?: number;
  /** Relative noise (1 σ) of voltages, currents, kW, rpm and hz; default 0.002. */
  readonly noise?: number;
  /** Fields left out of every sample. */
  readonly omit?: readonly (keyof TelemetrySample)[];
  readonly seed?: number;
}

/** Deterministic uniform numbers in [0, 1) (mulberry32, a small public-domain generator). */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal numbers from a uniform source (Box–Muller). */
export function seededNormal(random: () => number): () => number {
  return () => {
    const u = Math.max(random(), 1e-12);
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random());
  };
}

/** Samples of one synthetic unit. */
export function syntheticSamples(options: SyntheticOptions = {}): TelemetrySample[] {
  const nameplate = options.nameplate ?? TEST_NAMEPLATE;
  const count = options.count ?? 720;
  const startMs = options.startMs ?? Date.UTC(2026, 2, 1);
  const stepS = options.stepS ?? 10;
  const [lowShare, highShare] = options.speedRange ?? [0.25, 1.1];
  const noise = options.noise ?? 0.002;
  const random = seededRandom(options.seed ?? 1);
  const normal = seededNormal(random);
  const jitter = (v: number) => v * (1 + noise * normal());
  const omit = new Set(options.omit ?? []);
  const samples: TelemetrySample[] = [];
  // A slow bounded random walk of speed, steps well under the transient limit.
  let share = (lowShare + highShare) / 2;
  for (let i = 0; i < count; i++) {
    share += (highShare - lowShare) * 0.04 * normal();
    if (share < lowShare) share = 2 * lowShare - share;
    if (share > highShare) share = 2 * highShare - share;
    share = Math.min(highShare, Math.max(lowShare, share));
    if (options.speedShare !== undefined) share = options.speedShare(i);
    const rpm = nameplate.ratedRpm * share;
    const statorC = typeof options.statorC === 'function' ? options.statorC(i) : (options.statorC ?? 20);
    const ratedLoad = options.ratedLoadKw ?? 0;
    const kw = Math.min(nameplate.ratedKw, ratedLoad * share ** 3);
    const r = generatorTerminals(nameplate, {
      rpm,
      kw,
      powerFactor: options.powerFactor ?? 0.95,
      magnetC: statorC,
      windingC: statorC,
      fluxFactor: options.fluxFactor ?? 1,
      phaseEmfFactors: options.phaseEmfFactors ?? [1, 1, 1],
    });
    if (r === undefined) throw new RangeError(`synthetic load ${kw} kW cannot be carried at ${rpm} rpm; lower ratedLoadKw`);
    const sample: Record<string, number> = {
      ts: startMs + i * stepS * 1000,
      rpm: jitter(rpm * (options.speedSensorFactor ?? 1)),
      hz: jitter(r.hz),
      vab: jitter(r.vab),
      vbc: jitter(r.vbc),
      vca: jitter(r.vca),
      statorC,
      ambientC: options.ambientC ?? 10,
    };
    if (r.ia > 0) {
      sample.ia = jitter(r.ia);
      sample.ib = jitter(r.ib);
      sample.ic = jitter(r.ic);
      sample.kw = jitter(r.kw);
    } else {
      sample.ia = 0;
      sample.ib = 0;
      sample.ic = 0;
      sample.kw = 0;
    }
    for (const field of omit) delete sample[field];
    samples.push(sample as unknown as TelemetrySample);
  }
  return samples;
}

/**
 * Speed shares of `count` samples rising evenly from `from` to `to` (shares of ratedRpm).
 * @example linearShares(3, 0.5, 0.6)(2) // 0.6
 */
export function linearShares(count: number, from: number, to: number): (i: number) => number {
  return (i) => (count < 2 ? from : from + ((to - from) * i) / (count - 1));
}

/**
 * EMF factor of phase b (a and c at 1) that gives a line-voltage unbalance of
 * `pct` % by the maximum-deviation-from-mean definition, open circuit.
 * Worked out here, not with lib/physics/unbalance: phase EMFs 1, k, 1 at
 * 120° give |Vab| = |Vbc| = √(1 + k + k²) = s and |Vca| = √3 (law of
 * cosines), so the largest deviation is Vca's, 2(√3 − s)/3, over the mean
 * (2s + √3)/3: pct = 200(√3 − s)/(2s + √3), that is
 * s = √3(200 − pct)/(200 + 2·pct) and k = (√(4s² − 3) − 1)/2.
 * @example phaseFactorForUnbalancePct(2) // ≈ 0.9409
 */
export function phaseFactorForUnbalancePct(pct: number): number {
  if (!(pct >= 0 && pct < 50)) throw new RangeError(`pct must be within 0..50, got ${pct}`);
  const s = (Math.sqrt(3) * (200 - pct)) / (200 + 2 * pct);
  return (Math.sqrt(4 * s * s - 3) - 1) / 2;
}
