/**
 * Seeded randomness for the demo fleet, so that a seed gives the same fleet
 * behaviour run after run (tests rely on it). Nothing here is for security.
 */

/** A source of uniform numbers in [0, 1). */
export type Uniform = () => number;

/**
 * mulberry32: a 32-bit generator with a full 2³² period, good enough for
 * simulation noise (public-domain algorithm by Tommy Ettinger, from memory).
 * @example mulberry32(1)() // 0.6270739405881613
 */
export function mulberry32(seed: number): Uniform {
  if (!Number.isInteger(seed)) throw new RangeError(`seed must be a whole number, got ${seed}`);
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * A 32-bit seed mixed from a number and a name (FNV-1a over the name, then
 * an integer finaliser), so each unit and each purpose gets its own stream.
 * @example seedFor(7, 'qv-01') === seedFor(7, 'qv-01') // true
 */
export function seedFor(seed: number, name: string): number {
  let h = (0x811c9dc5 ^ (seed >>> 0)) >>> 0;
  for (let i = 0; i < name.length; i++) {
    h ^= name.charCodeAt(i);
    h = Math.imul(h, 0x01000193) >>> 0;
  }
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b) >>> 0;
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35) >>> 0;
  h ^= h >>> 16;
  return h >>> 0;
}

/**
 * Standard normal numbers from a uniform source (Box–Muller transform).
 * @example const n = gaussian(mulberry32(1)); n() // a draw of mean 0, sd 1
 */
export function gaussian(uniform: Uniform): () => number {
  let spare: number | undefined;
  return () => {
    if (spare !== undefined) {
      const s = spare;
      spare = undefined;
      return s;
    }
    // 1 − u keeps the logarithm away from 0.
    const u = 1 - uniform();
    const v = uniform();
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  };
}

/**
 * First-order autoregressive noise of standard deviation `sd` and
 * correlation time `tauS` seconds, exact for any step length:
 * x ← ρ·x + sd·√(1−ρ²)·n with ρ = exp(−Δt/τ).
 */
export class Ar1 {
  private x: number;
  private readonly normal: () => number;

  constructor(
    private readonly tauS: number,
    private readonly sd: number,
    uniform: Uniform,
  ) {
    if (!(tauS > 0)) throw new RangeError(`tauS must be above 0 s, got ${tauS}`);
    if (!(sd >= 0)) throw new RangeError(`sd must be 0 or more, got ${sd}`);
    this.normal = gaussian(uniform);
    this.x = sd * this.normal();
  }

  /** Advances by `dtS` seconds and returns the new value. */
  step(dtS: number): number {
    const rho = Math.exp(-Math.max(0, dtS) / this.tauS);
    this.x = rho * this.x + this.sd * Math.sqrt(1 - rho * rho) * this.normal();
    return this.x;
  }
}

/**
 * A smooth random signal of unit variance as a pure function of time: a sum
 * of sinusoids with periods spread log-uniformly over [minPeriodS, maxPeriodS]
 * and amplitudes rising with period (slow swings larger than fast ones).
 * Being a function of time, separate runs (history, then live) join up.
 * @example const w = smoothNoise(mulberry32(3), 3 * 3600, 5 * 86400); w(Date.UTC(2026, 0, 1)) // about −2..2
 */
export function smoothNoise(uniform: Uniform, minPeriodS: number, maxPeriodS: number, terms = 8): (tMs: number) => number {
  if (!(minPeriodS > 0 && maxPeriodS >= minPeriodS)) {
    throw new RangeError(`periods must satisfy 0 < minPeriodS <= maxPeriodS, got ${minPeriodS} and ${maxPeriodS}`);
  }
  const parts: { omega: number; phase: number; amp: number }[] = [];
  let variance = 0;
  for (let i = 0; i < terms; i++) {
    const frac = terms === 1 ? 0.5 : (i + uniform() * 0.8) / terms;
    const periodS = minPeriodS * Math.pow(maxPeriodS / minPeriodS, Math.min(1, frac));
    const amp = Math.sqrt(periodS / minPeriodS) * (0.5 + uniform());
    parts.push({ omega: (2 * Math.PI) / (periodS * 1000), phase: 2 * Math.PI * uniform(), amp });
    variance += (amp * amp) / 2;
  }
  const norm = 1 / Math.sqrt(variance);
  return (tMs) => {
    let s = 0;
    for (const p of parts) s += p.amp * Math.sin(p.omega * tMs + p.phase);
    return s * norm;
  };
}
