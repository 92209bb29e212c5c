import { describe, expect, it } from 'vitest';
import type { LiveEvent } from './events';
import { createLiveHub } from './hub';

const event = (unitId: string): LiveEvent => ({ type: 'samples', siteId: 'tarn-edge', unitId, lastTs: '2026-12-02T10:00:00.000Z' });

describe('live hub', () => {
  it('numbers events in order within a run and replays those after an id', () => {
    const hub = createLiveHub({ ringSize: 4, run: 'r1' });
    expect(hub.currentId()).toBe('r1-0');
    hub.publish([event('a'), event('b'), event('c')]);
    expect(hub.currentId()).toBe('r1-3');
    const after1 = hub.since('r1-1');
    expect(after1.kind === 'replay' && after1.events.map((e) => [e.id, e.event.unitId])).toEqual([
      ['r1-2', 'b'],
      ['r1-3', 'c'],
    ]);
    expect(hub.since('r1-3')).toEqual({ kind: 'replay', events: [] });
    expect(hub.since('r1-0')).toMatchObject({ kind: 'replay' });
  });

  it('asks for a reset when the events after the id have left the ring', () => {
    const hub = createLiveHub({ ringSize: 4, run: 'r1' });
    hub.publish(['a', 'b', 'c', 'd', 'e', 'f'].map(event));
    // Ring holds 3..6: after 2 is still whole, after 1 is not.
    const after2 = hub.since('r1-2');
    expect(after2.kind === 'replay' && after2.events.map((e) => e.seq)).toEqual([3, 4, 5, 6]);
    expect(hub.since('r1-1')).toEqual({ kind: 'reset' });
  });

  it('asks for a reset for an id of another run, from the future, or not an id at all', () => {
    const hub = createLiveHub({ run: 'r2' });
    hub.publish([event('a')]);
    expect(hub.since('r1-1')).toEqual({ kind: 'reset' });
    expect(hub.since('r2-5')).toEqual({ kind: 'reset' });
    expect(hub.since('garbage')).toEqual({ kind: 'reset' });
  });

  it('keeps delivering when one subscriber throws, and stops delivering after unsubscribe', () => {
    const hub = createLiveHub();
    const got: string[] = [];
    hub.subscribe(() => {
      throw new Error('broken page');
    });
    const off = hub.subscribe((e) => got.push(e.event.unitId));
    hub.publish([event('a')]);
    off();
    hub.publish([event('b')]);
    expect(got).toEqual(['a']);
  });

  it('hands out stream places up to the limit and takes them back', () => {
    const hub = createLiveHub();
    expect([hub.openStream(2), hub.openStream(2), hub.openStream(2)]).toEqual([true, true, false]);
    hub.closeStream();
    expect(hub.openStream(2)).toBe(true);
    expect(hub.openStreams()).toBe(2);
  });
});
