import { describe, expect, it } from 'vitest';
import { pendingMessageOf } from './arrival';
import type { Delivery } from './connections';
import { createTelemetryDecoder } from './decode';
import type { UnitDirectory } from './unit-directory';

const T0 = 1_767_225_600_000;
const decoder = createTelemetryDecoder({ retentionDays: 90 });
const receipt = { ack: () => {}, alive: () => true };

/** A directory that knows only wt-01 of karrow-fell. */
const directory: UnitDirectory = {
  resolve: async () => new Map(),
  size: () => 1,
  knows: (siteId, unitId) => siteId === 'karrow-fell' && unitId === 'wt-01',
};

function delivery(topic: string, payload: string): Delivery {
  return { topic, payload: Buffer.from(payload), qos: 1, retain: false, receivedAtMs: T0, receipt };
}

describe('pendingMessageOf', () => {
  it('decodes telemetry into samples, with the delivery kept for its acknowledgement', () => {
    const d = delivery('millrace/karrow-fell/wt-01/telemetry', JSON.stringify([{ ts: T0 - 1000, rpm: 250, vab: 230 }, { ts: T0, rpm: 251, vab: 231 }]));
    const m = pendingMessageOf(d, directory, decoder);
    expect(m).toMatchObject({ kind: 'telemetry', siteId: 'karrow-fell', unitId: 'wt-01', receivedAtMs: T0, qos: 1, payloadBytes: d.payload.byteLength });
    expect(m.samples.count).toBe(2);
    expect(m.receipt).toBe(receipt);
  });

  it('keeps the payload text only for a unit not known here (a whole-message quarantine row may need it)', () => {
    const payload = JSON.stringify({ ts: T0, rpm: 250, vab: 230 });
    expect(pendingMessageOf(delivery('millrace/karrow-fell/wt-01/telemetry', payload), directory, decoder).preview).toBe('');
    expect(pendingMessageOf(delivery('millrace/karrow-fell/wt-09/telemetry', payload), directory, decoder).preview).toBe(payload);
  });

  it('marks a topic that is not a unit topic with why, decoding nothing', () => {
    const m = pendingMessageOf(delivery('millrace/karrow-fell/telemetry', '{}'), directory, decoder);
    expect(m.kind).toBe('bad-topic');
    expect(m.topicProblem).toMatch(/is not millrace\/<siteId>\/<unitId>\/telemetry/);
    expect(m.samples.count).toBe(0);
  });

  it('reads presence, and sets a presence that is neither online nor offline aside', () => {
    expect(pendingMessageOf(delivery('millrace/karrow-fell/wt-01/presence', 'online'), directory, decoder)).toMatchObject({ kind: 'presence', presence: 'online' });
    const bad = pendingMessageOf(delivery('millrace/karrow-fell/wt-01/presence', 'maybe'), directory, decoder);
    expect(bad.presence).toBeNull();
    expect(bad.quarantined[0]?.reason).toMatch(/presence must be "online" or "offline"/);
  });
});
