/**
 * f = p·n/120 against the synchronous speed tables printed in electrical
 * handbooks for 50 and 60 Hz, 2 to 24 poles (e.g. Fink & Beaty, Standard
 * Handbook for Electrical Engineers; from memory, arithmetic checked).
 */
import { describe, expect, it } from 'vitest';
import { electricalHz, rpmFromHz } from '@/lib/physics/synchronous-speed';

const TABLE: ReadonlyArray<readonly [poles: number, rpm60: number, rpm50: number]> = [
  [2, 3600, 3000],
  [4, 1800, 1500],
  [6, 1200, 1000],
  [8, 900, 750],
  [10, 720, 600],
  [12, 600, 500],
  [14, 514.3, 428.6],
  [16, 450, 375],
  [18, 400, 333.3],
  [20, 360, 300],
  [22, 327.3, 272.7],
  [24, 300, 250],
];

describe('synchronous speed table', () => {
  for (const [poles, rpm60, rpm50] of TABLE) {
    it(`${poles} poles: ${rpm60} rpm at 60 Hz, ${rpm50} rpm at 50 Hz`, () => {
      expect(rpmFromHz(poles, 60)).toBeCloseTo(rpm60, 1);
      expect(rpmFromHz(poles, 50)).toBeCloseTo(rpm50, 1);
      expect(electricalHz(poles, rpmFromHz(poles, 60))).toBeCloseTo(60, 12);
    });
  }
});
