import { describe, expect, it } from 'vitest';
import { magnetTempC, windingTempC } from './sample-emf';

describe('the temperatures of the per-sample correction shared by the diagnosis and the chart', () => {
  it('takes temperatures from the stator, else the ambient, else the default', () => {
    expect(windingTempC(60, 10)).toBe(60);
    expect(windingTempC(Number.NaN, 10)).toBe(10);
    expect(windingTempC(Number.NaN, Number.NaN)).toBe(20);
    expect(magnetTempC(Number.NaN, Number.NaN, 25)).toBe(25);
    expect(magnetTempC(Number.NaN, 5, 25)).toBe(5);
  });
});
