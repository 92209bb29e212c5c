import { describe, expect, it } from 'vitest';
import { emfBins } from './emf-bins';

describe('emfBins', () => {
  const point = (rpm: number, terminalV: number, correctedV?: number) => ({ ts: rpm, rpm, terminalV, correctedV });

  it('cuts the speeds from lowest to highest into 8 equal bins, the last one closed, and leaves empty bins out', () => {
    const bins = emfBins([point(100, 90, 100), point(109.9, 92, 110), point(110, 95), point(180, 170, 180)], 1000);
    // Bins of (180 − 100) / 8 = 10 rpm: 100 ≤ rpm < 110, 110 ≤ rpm < 120, …, 170 ≤ rpm ≤ 180.
    expect(bins.map((b) => [b.from, b.to, b.n])).toEqual([
      [100, 110, 2],
      [110, 120, 1],
      [170, 180, 1],
    ]);
  });

  it('gives the mean terminal voltage, the mean corrected EMF of the points that have one, and the nameplate line at the middle speed', () => {
    const [first, second] = emfBins([point(100, 90, 100), point(109.9, 92, 110), point(110, 95), point(180, 170, 180)], 1000);
    expect(first).toMatchObject({ terminalV: 91, correctedV: 105 });
    // Contract, section 5 (`keRatio`): the nameplate line is Ke (V per 1000 rpm, here 1000) times speed: 105 rpm → 105 V.
    expect(first!.nameplateV).toBeCloseTo(105, 9);
    expect(second).toMatchObject({ n: 1, terminalV: 95, correctedV: null });
  });

  it('has no bins without points, and one speed puts every point in the last bin', () => {
    expect(emfBins([], 1000)).toEqual([]);
    expect(emfBins([point(50, 40, 50), point(50, 41, 51)], 1000).map((b) => b.n)).toEqual([2]);
  });
});
