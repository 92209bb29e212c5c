import { describe, expect, it } from 'vitest';
import { createEmbeddedPersistence } from './embedded-persistence';

/** The outgoing-queue part of an aedes persistence, promise style. */
interface OutgoingStore {
  outgoingEnqueue(sub: { clientId: string }, packet: object): Promise<void>;
  outgoingUpdate(client: object, packet: object): Promise<void>;
  outgoingClearMessageId(client: object, packet: { messageId: number }): Promise<{ brokerCounter?: number } | undefined>;
  outgoingStream(client: object): AsyncIterable<{ brokerCounter: number; messageId?: number }>;
}

const message = (brokerCounter: number) => ({ cmd: 'publish', topic: 'millrace/s/u/telemetry', payload: Buffer.from('{}'), qos: 1, retain: false, brokerId: 'b1', brokerCounter });

async function queued(store: OutgoingStore, client: object): Promise<number[]> {
  const out: number[] = [];
  for await (const p of store.outgoingStream(client)) out.push(p.brokerCounter);
  return out;
}

describe('the embedded broker\'s session store', () => {
  it('lets a PUBACK remove the message sent under that id on its own connection, not an older one with the same id', async () => {
    // MQTT 3.1.1 section 4.3.2: a PUBACK acknowledges the PUBLISH sent with that packet id on this
    // connection; after a reconnect the broker resends unacknowledged messages (section 4.4).
    const store = createEmbeddedPersistence() as unknown as OutgoingStore;
    const old = { id: 'ingest-0' };
    // Two messages sent on the first connection as ids 7 and 8, never acknowledged.
    for (const [counter, id] of [[1, 7], [2, 8]] as const) {
      await store.outgoingEnqueue({ clientId: 'ingest-0' }, message(counter));
      await store.outgoingUpdate(old, { ...message(counter), messageId: id });
    }
    // The client comes back on a new connection; a new message goes out first, as id 7.
    const now = { id: 'ingest-0' };
    await store.outgoingEnqueue({ clientId: 'ingest-0' }, message(3));
    await store.outgoingUpdate(now, { ...message(3), messageId: 7 });
    // Its PUBACK must take that one, not the older message that went out as 7 before.
    expect((await store.outgoingClearMessageId(now, { messageId: 7 }))?.brokerCounter).toBe(3);
    expect(await queued(store, now)).toEqual([1, 2]);
    // The older ones are still there to be resent on the new connection.
    await expect(store.outgoingUpdate(now, { ...message(1), messageId: 9 })).resolves.toBeUndefined();
    expect((await store.outgoingClearMessageId(now, { messageId: 9 }))?.brokerCounter).toBe(1);
    expect(await queued(store, now)).toEqual([2]);
  });

  it('still acknowledges by id alone a message that was not sent on this connection', async () => {
    const store = createEmbeddedPersistence() as unknown as OutgoingStore;
    await store.outgoingEnqueue({ clientId: 'ingest-1' }, message(1));
    await store.outgoingUpdate({ id: 'ingest-1' }, { ...message(1), messageId: 4 });
    expect((await store.outgoingClearMessageId({ id: 'ingest-1' }, { messageId: 4 }))?.brokerCounter).toBe(1);
    expect(await store.outgoingClearMessageId({ id: 'ingest-1' }, { messageId: 4 })).toBeUndefined();
  });
});
