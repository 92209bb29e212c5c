/**
 * The embedded broker's in-memory session store: aedes-persistence's memory
 * store with its queue of outgoing QoS 1 messages replaced.
 *
 * Why: the memory store finds the message a PUBACK acknowledges by packet id
 * alone. When a persistent-session client reconnects, its queue still holds
 * messages sent on the old connection under the old connection's ids, while
 * aedes resends them and sends new ones under ids of the new connection; ids
 * repeat. A PUBACK for a message sent on the new connection could then remove
 * a different, not yet resent message with the same old id: that message was
 * lost, and when aedes came to resend it, it found it gone ("no such packet")
 * and dropped the connection (seen about one run in 30 of the embedded
 * no-loss test, 2026-12-02). Here a PUBACK first matches the message sent
 * under that id on the connection it came on.
 */
import { createRequire } from 'node:module';

const require = createRequire(import.meta.url);

/** What aedes stores of a message (aedes-packet). */
interface StoredPacket {
  messageId?: number;
  brokerId?: string;
  brokerCounter?: number;
  [key: string]: unknown;
}

interface Sub {
  clientId: string;
}

/** aedes's per-connection client object (only identity and id matter here). */
interface BrokerClient {
  id: string;
}

type MemoryPersistenceClass = new (opts?: object) => object;

const MemoryPersistence = require('aedes-persistence/asyncPersistence.js') as MemoryPersistenceClass & { Packet: new (p: object) => StoredPacket };
const { CallBackPersistence } = require('aedes-persistence/callBackPersistence.js') as {
  CallBackPersistence: new (factory: (opts: object) => object, opts?: object) => object;
};
const { Readable } = require('node:stream') as typeof import('node:stream');

class ConnectionAwareMemory extends MemoryPersistence {
  /** Outgoing messages per client id, oldest first. */
  private readonly queues = new Map<string, StoredPacket[]>();
  /** The connection (client object) that last sent each stored message. */
  private readonly sentOn = new WeakMap<StoredPacket, BrokerClient>();

  private queue(clientId: string): StoredPacket[] {
    let q = this.queues.get(clientId);
    if (!q) this.queues.set(clientId, (q = []));
    return q;
  }

  async outgoingEnqueue(sub: Sub, packet: object): Promise<void> {
    this.queue(sub.clientId).push(new MemoryPersistence.Packet(packet));
  }

  async outgoingEnqueueCombi(subs: Sub[], packet: object): Promise<void> {
    for (const sub of subs) this.queue(sub.clientId).push(new MemoryPersistence.Packet(packet));
  }

  /** As the memory store does it, and notes the connection the message is now sent on. */
  async outgoingUpdate(client: BrokerClient, packet: StoredPacket): Promise<void> {
    const q = this.queue(client.id);
    for (let i = 0; i < q.length; i++) {
      const stored = q[i]!;
      if (stored.brokerId === packet.brokerId) {
        if (stored.brokerCounter === packet.brokerCounter) {
          stored.messageId = packet.messageId;
          this.sentOn.set(stored, client);
          return;
        }
      } else if (stored.messageId === packet.messageId) {
        q[i] = packet;
        this.sentOn.set(packet, client);
        return;
      }
    }
    throw new Error('no such packet');
  }

  /** Removes the message acknowledged: the one sent under this id on this connection, else (as before) the first with the id. */
  async outgoingClearMessageId(client: BrokerClient, packet: StoredPacket): Promise<StoredPacket | undefined> {
    const q = this.queue(client.id);
    let at = q.findIndex((p) => p.messageId === packet.messageId && this.sentOn.get(p) === client);
    if (at < 0) at = q.findIndex((p) => p.messageId === packet.messageId);
    if (at < 0) return undefined;
    return q.splice(at, 1)[0];
  }

  outgoingStream(client: BrokerClient) {
    // A copy: the queue changes while aedes streams it.
    return Readable.from([...(this.queues.get(client.id) ?? [])]);
  }
}

/** A persistence for `Aedes.createBroker({ persistence })`. */
export function createEmbeddedPersistence(): object {
  return new CallBackPersistence((opts) => new ConnectionAwareMemory(opts));
}
