import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { sortUniqueRefs } from './writer';

describe('sortUniqueRefs', () => {
  it('orders rows by unit, then time, keeping the first arrival of each (unit, time) (property)', () => {
    // Reference: Array.prototype.sort (stable since ES2019) by (unit, time, arrival), then the first of each run.
    const rows = fc.array(fc.tuple(fc.integer({ min: 1, max: 6 }), fc.integer({ min: 0, max: 12 })), { maxLength: 200 });
    fc.assert(
      fc.property(rows, fc.boolean(), (list, timeOrdered) => {
        if (timeOrdered) list.sort((a, b) => a[1] - b[1]);
        const units = list.map((r) => r[0]);
        const times = list.map((r) => r[1] * 1000 + 1_767_225_600_000);
        const refs = list.map((_, i) => 7 * i + 3);
        const want = list
          .map((r, i) => ({ unit: r[0], ts: times[i]!, ref: refs[i]!, i }))
          .sort((a, b) => a.unit - b.unit || a.ts - b.ts || a.i - b.i)
          .filter((r, k, all) => k === 0 || r.unit !== all[k - 1]!.unit || r.ts !== all[k - 1]!.ts)
          .map((r) => r.ref);
        const dropped = sortUniqueRefs(refs, units, times);
        expect(refs).toEqual(want);
        expect(dropped).toBe(list.length - want.length);
      }),
      { numRuns: 500 },
    );
  });
});
