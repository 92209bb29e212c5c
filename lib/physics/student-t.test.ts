import { describe, expect, it } from 'vitest';
import { studentTCdf, studentTQuantile } from './student-t';

describe('student t', () => {
  it('has the closed forms of 1 and 2 degrees of freedom', () => {
    // df = 1 is the Cauchy distribution: F(t) = 1/2 + atan(t)/π.
    for (const t of [-3, -0.5, 0, 0.7, 4]) expect(studentTCdf(t, 1)).toBeCloseTo(0.5 + Math.atan(t) / Math.PI, 12);
    // df = 2: F(t) = 1/2 + t / (2·√(2 + t²)).
    for (const t of [-2, 0.3, 5]) expect(studentTCdf(t, 2)).toBeCloseTo(0.5 + t / (2 * Math.sqrt(2 + t * t)), 12);
  });

  it('inverts its own CDF and is symmetric', () => {
    for (const df of [1, 3, 17, 250]) {
      for (const p of [0.6, 0.9, 0.975, 0.999]) {
        expect(studentTCdf(studentTQuantile(p, df), df)).toBeCloseTo(p, 10);
        expect(studentTQuantile(1 - p, df)).toBeCloseTo(-studentTQuantile(p, df), 10);
      }
    }
  });

  it('names a bad value', () => {
    expect(() => studentTQuantile(1, 5)).toThrow(/p.*1/);
    expect(() => studentTCdf(1, 0)).toThrow(/df.*0/);
  });
});
