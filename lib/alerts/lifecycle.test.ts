/**
 * The alert lifecycle of contract section 7, step by step, and the noise rules
 * of alarm management (ISA-18.2 / IEC 62682: chattering, stale alarms; the
 * counts are the alerts issue's: three returns in a minute, 24 hours).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { acknowledgeAlert, CHATTER_WINDOW_MS, inCrewList, isChattering, isStale, openAlert, shelveAlert, stepAlert, STALE_AFTER_MS, type AlertLife } from './lifecycle';

const HOLD_OFF = 60_000;
const step = (life: AlertLife, holds: boolean, nowMs: number) => stepAlert(life, { holds, nowMs, holdOffMs: HOLD_OFF });

describe('alert lifecycle (contract section 7)', () => {
  it('opens active, notes when the condition goes, and clears only after the hold-off', () => {
    const opened = openAlert(0);
    expect(opened.changes).toEqual([{ type: 'opened', from: null, to: 'active' }]);
    const gone = step(opened.life, false, 10_000);
    expect(gone.changes).toEqual([]);
    expect(gone.life.goneSinceMs).toBe(10_000);
    expect(step(gone.life, false, 10_000 + HOLD_OFF - 1).life.state).toBe('active');
    const cleared = step(gone.life, false, 10_000 + HOLD_OFF);
    expect(cleared.changes).toEqual([{ type: 'cleared', from: 'active', to: 'cleared' }]);
    expect(cleared.life.clearedAtMs).toBe(10_000 + HOLD_OFF);
    expect(step(cleared.life, true, 200_000).changes).toEqual([]);
  });

  it('a return within the hold-off re-opens the same alert, acknowledged staying acknowledged', () => {
    const taken = acknowledgeAlert(openAlert(0).life, 5_000);
    expect(taken.changes).toEqual([{ type: 'acknowledged', from: 'active', to: 'acknowledged' }]);
    const gone = step(taken.life, false, 10_000);
    const back = step(gone.life, true, 30_000);
    expect(back.changes).toEqual([{ type: 'reopened', from: 'acknowledged', to: 'acknowledged' }]);
    expect(back.life.goneSinceMs).toBeNull();
    expect(back.life.openedAtMs).toBe(0);
  });

  it('a flapping input gives one alert, marked chattering at the third return within a minute, and not after the minute', () => {
    let life = openAlert(0).life;
    let opened = 1;
    let reopened = 0;
    for (let t = 1_000; t <= 10_000; t += 1_000) {
      const s = step(life, t % 2_000 === 0, t);
      for (const c of s.changes) {
        if (c.type === 'opened') opened++;
        if (c.type === 'reopened') reopened++;
      }
      life = s.life;
    }
    expect(opened).toBe(1);
    expect(reopened).toBe(5);
    expect(life.clearedAtMs).toBeNull();
    expect(isChattering(life, 10_000)).toBe(true);
    expect(isChattering(life, life.flapWindowStartMs! + CHATTER_WINDOW_MS + 1)).toBe(false);
    const two = step(step(step(step(openAlert(0).life, false, 1).life, true, 2).life, false, 3).life, true, 4).life;
    expect(two.flaps).toBe(2);
    expect(isChattering(two, 5)).toBe(false);
  });

  it('shelving hides it until a time, still evaluated; the shelf comes down to where it was', () => {
    const shelved = shelveAlert(openAlert(0).life, 100_000, 1_000);
    expect(shelved.changes).toEqual([{ type: 'shelved', from: 'active', to: 'shelved' }]);
    expect(step(shelved.life, true, 50_000).life.state).toBe('shelved');
    const down = step(shelved.life, true, 100_000);
    expect(down.changes).toEqual([{ type: 'unshelved', from: 'shelved', to: 'active' }]);
    const takenThenShelved = shelveAlert(acknowledgeAlert(openAlert(0).life, 10).life, 100_000, 1_000).life;
    expect(step(takenThenShelved, true, 100_000).life.state).toBe('acknowledged');
    // Gone and cleared while on the shelf: cleared, and off the shelf.
    const gone = step(shelved.life, false, 2_000).life;
    const cleared = step(gone, false, 2_000 + HOLD_OFF);
    expect(cleared.life.state).toBe('cleared');
    expect(cleared.life.shelvedUntilMs).toBeNull();
    expect(() => shelveAlert(openAlert(0).life, 1_000, 1_000)).toThrow(RangeError);
  });

  it('a cleared alert nobody took stays in the crews’ list until someone does', () => {
    const cleared = step(step(openAlert(0).life, false, 1).life, false, 1 + HOLD_OFF).life;
    expect(inCrewList(cleared)).toBe(true);
    const taken = acknowledgeAlert(cleared, 100_000);
    expect(taken.changes).toEqual([{ type: 'acknowledged', from: 'cleared', to: 'cleared' }]);
    expect(inCrewList(taken.life)).toBe(false);
    expect(acknowledgeAlert(taken.life, 200_000).changes).toEqual([]);
  });

  it('is stale active for more than a day, not once taken', () => {
    const life = openAlert(0).life;
    expect(isStale(life, STALE_AFTER_MS)).toBe(false);
    expect(isStale(life, STALE_AFTER_MS + 1)).toBe(true);
    expect(isStale(acknowledgeAlert(life, 5).life, STALE_AFTER_MS + 1)).toBe(false);
  });

  it('never clears while the condition holds, whatever the sequence of inputs', () => {
    fc.assert(
      fc.property(fc.array(fc.boolean(), { minLength: 1, maxLength: 60 }), (inputs) => {
        let life = openAlert(0).life;
        let t = 0;
        for (const holds of inputs) {
          t += 7_000;
          const s = step(life, holds, t);
          if (s.life.state === 'cleared' && life.state !== 'cleared') {
            expect(holds).toBe(false);
            expect(t - life.goneSinceMs!).toBeGreaterThanOrEqual(HOLD_OFF);
          }
          life = s.life;
        }
      }),
    );
  });
});
