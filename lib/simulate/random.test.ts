import { describe, expect, it } from 'vitest';
import { Ar1, gaussian, mulberry32, seedFor, smoothNoise } from './random';

const mean = (xs: readonly number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
const variance = (xs: readonly number[]) => {
  const m = mean(xs);
  return xs.reduce((a, b) => a + (b - m) ** 2, 0) / (xs.length - 1);
};

describe('mulberry32', () => {
  it('repeats itself for a seed and differs between seeds', () => {
    const a = mulberry32(42);
    const b = mulberry32(42);
    const c = mulberry32(43);
    const xs = Array.from({ length: 5 }, () => a());
    expect(Array.from({ length: 5 }, () => b())).toEqual(xs);
    expect(Array.from({ length: 5 }, () => c())).not.toEqual(xs);
  });

  it('is uniform on [0, 1): mean 1/2 and variance 1/12 (uniform distribution, any statistics text)', () => {
    const u = mulberry32(7);
    const xs = Array.from({ length: 200_000 }, () => u());
    expect(xs.every((x) => x >= 0 && x < 1)).toBe(true);
    // Standard error of the mean is sqrt(1/12/n) ≈ 0.00065, well inside the 0.005 of toBeCloseTo(…, 2).
    expect(mean(xs)).toBeCloseTo(0.5, 2);
    expect(variance(xs)).toBeCloseTo(1 / 12, 3);
  });

  it('names a seed that is not a whole number', () => {
    expect(() => mulberry32(1.5)).toThrow(/seed.*1\.5/);
  });
});

describe('seedFor', () => {
  it('gives each name its own stream', () => {
    expect(seedFor(1, 'qv-01')).toBe(seedFor(1, 'qv-01'));
    expect(seedFor(1, 'qv-01')).not.toBe(seedFor(1, 'qv-02'));
    expect(seedFor(1, 'qv-01')).not.toBe(seedFor(2, 'qv-01'));
  });
});

describe('gaussian', () => {
  it('has mean 0, variance 1 and about 68.3 % within one sd (normal distribution table)', () => {
    const n = gaussian(mulberry32(11));
    const xs = Array.from({ length: 200_000 }, () => n());
    expect(mean(xs)).toBeCloseTo(0, 2);
    expect(variance(xs)).toBeCloseTo(1, 1);
    const within = xs.filter((x) => Math.abs(x) < 1).length / xs.length;
    expect(within).toBeCloseTo(0.6827, 2);
  });
});

describe('Ar1', () => {
  it('keeps its standard deviation and has lag-one correlation exp(−Δt/τ) (first-order autoregressive process, by definition)', () => {
    const tau = 6;
    const dt = 2;
    const ar = new Ar1(tau, 3, mulberry32(5));
    const xs = Array.from({ length: 100_000 }, () => ar.step(dt));
    expect(Math.sqrt(variance(xs))).toBeCloseTo(3, 1);
    const m = mean(xs);
    let num = 0;
    let den = 0;
    for (let i = 1; i < xs.length; i++) num += (xs[i]! - m) * (xs[i - 1]! - m);
    for (const x of xs) den += (x - m) ** 2;
    expect(num / den).toBeCloseTo(Math.exp(-dt / tau), 2);
  });

  it('names a bad time constant', () => {
    expect(() => new Ar1(0, 1, mulberry32(1))).toThrow(/tauS.*0/);
  });
});

describe('smoothNoise', () => {
  it('is a pure function of time with unit variance over a long span', () => {
    const f = smoothNoise(mulberry32(3), 3600, 4 * 86_400);
    const g = smoothNoise(mulberry32(3), 3600, 4 * 86_400);
    const t0 = Date.UTC(2026, 0, 1);
    expect(f(t0 + 12_345)).toBe(g(t0 + 12_345));
    const xs = Array.from({ length: 20_000 }, (_, i) => f(t0 + i * 600_000));
    expect(variance(xs)).toBeGreaterThan(0.6);
    expect(variance(xs)).toBeLessThan(1.4);
  });

  it('changes little within a minute (it is the slow part)', () => {
    const f = smoothNoise(mulberry32(9), 3 * 3600, 5 * 86_400);
    const t0 = Date.UTC(2026, 5, 1);
    expect(Math.abs(f(t0 + 60_000) - f(t0))).toBeLessThan(0.05);
  });
});
