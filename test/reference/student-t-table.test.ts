/** Student's t quantiles against the NIST/SEMATECH e-Handbook of Statistical Methods, table 1.3.6.7.2 (upper critical values). */
import { describe, expect, it } from 'vitest';
import { studentTQuantile } from '@/lib/physics/student-t';

const TABLE: ReadonlyArray<readonly [df: number, p95: number, p975: number, p995: number]> = [
  [1, 6.314, 12.706, 63.657],
  [2, 2.92, 4.303, 9.925],
  [5, 2.015, 2.571, 4.032],
  [10, 1.812, 2.228, 3.169],
  [29, 1.699, 2.045, 2.756],
  [30, 1.697, 2.042, 2.75],
  [100, 1.66, 1.984, 2.626],
];

describe('t critical values', () => {
  for (const [df, p95, p975, p995] of TABLE) {
    it(`df ${df}`, () => {
      expect(studentTQuantile(0.95, df)).toBeCloseTo(p95, 3);
      expect(studentTQuantile(0.975, df)).toBeCloseTo(p975, 3);
      expect(studentTQuantile(0.995, df)).toBeCloseTo(p995, 3);
    });
  }

  it('tends to the normal 1.960 for large df (normal table)', () => {
    expect(studentTQuantile(0.975, 1e7)).toBeCloseTo(1.96, 3);
  });
});
