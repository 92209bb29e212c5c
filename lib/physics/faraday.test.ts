import { describe, expect, it } from 'vitest';
import { keFromWinding, phaseEmfRms, rotatingCoilPeakEmf } from './faraday';

describe('faraday', () => {
  it('is proportional to speed', () => {
    const at = (rpm: number) => rotatingCoilPeakEmf({ turns: 10, areaM2: 0.02, tesla: 0.8, rpm });
    expect(at(600) / at(300)).toBeCloseTo(2, 12);
    expect(at(0)).toBe(0);
  });

  it('Ke of a winding is √3 times the phase EMF at 1000 rpm', () => {
    const ke = keFromWinding({ poles: 24, turns: 60, fluxWb: 0.004, windingFactor: 0.95 });
    expect(ke).toBeCloseTo(Math.sqrt(3) * phaseEmfRms({ hz: 200, turns: 60, fluxWb: 0.004, windingFactor: 0.95 }), 9);
  });

  it('names a bad value', () => {
    expect(() => rotatingCoilPeakEmf({ turns: 0, areaM2: 1, tesla: 1, rpm: 1 })).toThrow(/turns.*0/);
    expect(() => phaseEmfRms({ hz: 50, turns: 1, fluxWb: 1, windingFactor: 1.5 })).toThrow(/windingFactor.*1.5/);
    expect(() => keFromWinding({ poles: 3, turns: 1, fluxWb: 1 })).toThrow(/poles.*3/);
  });
});
