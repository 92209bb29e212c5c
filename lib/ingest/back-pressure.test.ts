import { describe, expect, it } from 'vitest';
import { RoomGate } from './back-pressure';

/** Whether `promise` has settled once pending callbacks have run. */
async function settled(promise: Promise<void>): Promise<boolean> {
  let done = false;
  void promise.then(() => (done = true));
  await new Promise((resolve) => setImmediate(resolve));
  return done;
}

describe('RoomGate (back-pressure)', () => {
  it('has room only while the samples held are below the limit (at the limit the connections stop reading)', () => {
    let held = 99;
    const gate = new RoomGate(100, () => held);
    expect(gate.hasRoom()).toBe(true);
    held = 100;
    expect(gate.hasRoom()).toBe(false);
  });

  it('lets a reader through at once while there is room', async () => {
    const gate = new RoomGate(100, () => 10);
    expect(await settled(gate.room())).toBe(true);
  });

  it('keeps a reader waiting until a release finds room, not at a release that finds none', async () => {
    let held = 150;
    const gate = new RoomGate(100, () => held);
    const waiting = gate.room();
    held = 120;
    gate.release();
    expect(await settled(waiting)).toBe(false);
    held = 40;
    gate.release();
    expect(await settled(waiting)).toBe(true);
  });

  it('wakes every waiting reader at once when room is made', async () => {
    let held = 200;
    const gate = new RoomGate(100, () => held);
    const readers = [gate.room(), gate.room(), gate.room()];
    held = 0;
    gate.release();
    expect(await Promise.all(readers.map(settled))).toEqual([true, true, true]);
  });

  it('once opened for good (stopping), lets every reader through, full or not', async () => {
    const gate = new RoomGate(100, () => 500);
    const waiting = gate.room();
    gate.openForGood();
    expect(await settled(waiting)).toBe(true);
    expect(await settled(gate.room())).toBe(true);
    expect(gate.hasRoom()).toBe(false);
  });
});
