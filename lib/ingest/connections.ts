/**
 * The ingester's MQTT connections, with acknowledgements held back until the
 * messages are committed.
 *
 * mqtt.js hands a connection's messages to `handleMessage` one at a time and
 * sends the PUBACK when the handler calls back; the next message waits for
 * that call. Committing before each call back would cost one transaction per
 * message. So the handler calls back at once with a marker error, which makes
 * mqtt.js skip its own PUBACK and go on to the next message, and the PUBACK
 * is sent later, after the commit, on the same network connection the
 * message came in on. If that connection has closed meanwhile, no PUBACK is
 * sent: the broker delivers the message again on the next connection of the
 * persistent session and the insert ignores the duplicate. While the buffer
 * is full the handler does not call back, so mqtt.js stops reading the socket
 * and the broker keeps the rest.
 *
 * mqtt.js goes from one message to the next by process.nextTick, and a
 * connection with a backlog hands over chunk after chunk in one go: left
 * alone, decoding a backlog would hold the event loop for a whole batch
 * and the database connection would sit waiting for its next statement. So
 * every {@link SLICE_MS} ms of message handling the pool lets the event loop
 * turn once (setImmediate) before it takes the next message.
 */
import mqtt, { type IClientOptions, type IPublishPacket, type MqttClient } from 'mqtt';
import type { Logger } from '@/lib/log/logger';
import { PRESENCE_FILTER, TELEMETRY_FILTER, sharedTelemetryFilter } from './topics';

/** How a delivery is acknowledged: on the network connection it came on, by its packet id. */
export interface Receipt {
  /** Sends the PUBACK if the network connection it came on is still open. */
  ack(): void;
  /** False once that network connection has closed. */
  alive(): boolean;
}

/** One message as a connection delivers it. */
export interface Delivery {
  topic: string;
  payload: Buffer;
  qos: number;
  retain: boolean;
  receivedAtMs: number;
  receipt: Receipt;
}

/**
 * The PUBACKs of one connection, written together. A batch releases
 * thousands of acknowledgements at once; through mqtt.js each would be a
 * packet object, an event and several small socket writes. A PUBACK is four
 * bytes (type, length 2, packet id; MQTT 5 lets a success omit the reason
 * code and properties, section 3.4.2.1), so the ids queued in one tick go
 * out as one write. They are written only on the network connection the
 * messages came on, and only while it is open (see the module comment).
 */
class AckLine {
  private ids: number[] = [];
  private stream: unknown;
  constructor(private readonly client: MqttClient) {}

  open(stream: unknown): boolean {
    return this.client.connected && this.client.stream === stream;
  }

  queue(stream: unknown, messageId: number): void {
    if (this.ids.length > 0 && stream !== this.stream) this.flush();
    if (this.ids.length === 0) {
      this.stream = stream;
      process.nextTick(() => this.flush());
    }
    this.ids.push(messageId);
  }

  /** Writes what is queued now (also called by the tick after the first was queued). */
  flush(): void {
    const ids = this.ids;
    if (ids.length === 0) return;
    this.ids = [];
    if (!this.open(this.stream)) return;
    const bytes = Buffer.allocUnsafe(ids.length * 4);
    for (let k = 0; k < ids.length; k++) {
      bytes[k * 4] = 0x40;
      bytes[k * 4 + 1] = 2;
      bytes.writeUInt16BE(ids[k]!, k * 4 + 2);
    }
    this.client.stream.write(bytes);
  }
}

/** One delivery's receipt: no closures, as it is made for every message. */
class DeliveryReceipt implements Receipt {
  constructor(
    private readonly line: AckLine,
    private readonly stream: unknown,
    private readonly qos: number,
    private readonly messageId: number | undefined,
  ) {}

  ack(): void {
    if (this.qos === 0 || this.messageId === undefined || !this.line.open(this.stream)) return;
    this.line.queue(this.stream, this.messageId);
  }

  alive(): boolean {
    return this.line.open(this.stream);
  }
}

/**
 * mqtt.js logs through `debug`, whose every call gathers its arguments into
 * an array even when off (a dozen calls a message); left on only when asked
 * for (DEBUG=mqttjs*).
 */
const mqttLog = /mqttjs|^\*$/.test(process.env.DEBUG ?? '') ? {} : { log: () => {} };

export interface ConnectionPoolOptions {
  brokerUrl: string;
  /** MQTT 5 with the shared subscription (a broker such as Mosquitto 2); false for MQTT 3.1.1 (the embedded broker). */
  mqtt5: boolean;
  /** Base client id; connection i is `<clientId>-<i>`. */
  clientId: string;
  /** Connections in the share group (MQTT 5 only; MQTT 3.1.1 uses one). */
  connections: number;
  shareGroup: string;
  username?: string;
  password?: string;
  log: Logger;
  /** How long the broker keeps a session (and its unacknowledged messages) while the ingester is away, s. */
  sessionExpirySeconds?: number;
  keepaliveSeconds?: number;
  /**
   * First reconnect delay, ms; doubles on each failure up to `maxReconnectMs`.
   * Kept short: Mosquitto 2.0.11 does not restore shared subscriptions from
   * its persistence file, so after a broker restart the share group receives
   * nothing until an ingester has subscribed again (see DESIGN.md).
   */
  reconnectMs?: number;
  maxReconnectMs?: number;
  /**
   * Takes a delivery. Returning a promise pauses the connection (no further
   * message is read) until it resolves.
   */
  onDelivery(delivery: Delivery): void | Promise<void>;
  /** Called when a connection closed (its unacknowledged deliveries are no longer alive). */
  onConnectionClosed?(): void;
}

/** Longest run of message handling before the event loop may serve other I/O, ms. */
export const SLICE_MS = 4;

/** Marker that makes mqtt.js skip its own PUBACK (see the module comment). */
const ACK_LATER = Object.freeze(new Error('acknowledged after commit'));

export interface ConnectionState {
  clientId: string;
  connected: boolean;
  subscribed: boolean;
  reconnects: number;
  paused: boolean;
  lastError?: string;
}

/**
 * Lets the event loop turn once every {@link SLICE_MS} ms of message handling
 * (see the module comment); one for all the connections of a pool.
 */
export class Slicer {
  private start: number;

  constructor(
    private readonly sliceMs = SLICE_MS,
    private readonly clock: () => number = () => performance.now(),
  ) {
    this.start = clock();
  }

  /** Runs `next` now, or after one turn of the event loop once this slice is used up. */
  run(next: () => void): void {
    if (this.clock() - this.start < this.sliceMs) return next();
    setImmediate(() => {
      this.start = this.clock();
      next();
    });
  }
}

/** The pool's options with their defaults filled in. */
export type ConnectionPoolSettings = ConnectionPoolOptions & Required<Pick<ConnectionPoolOptions, 'sessionExpirySeconds' | 'keepaliveSeconds' | 'reconnectMs' | 'maxReconnectMs'>>;

/** What the connections of one pool share. */
interface PoolShared {
  /** Set by pause or close: messages arriving from then on stay unacknowledged. */
  stopping: boolean;
  /** Every connection is down (logged once, and once when one is back). */
  brokerDown: boolean;
  readonly states: ConnectionState[];
  readonly slicer: Slicer;
}

/** One connection of the pool. */
interface Connection {
  client: MqttClient;
  acks: AckLine;
  /** Resolves when it has connected and subscribed once; rejects when its first subscription is refused. */
  ready: Promise<void>;
}

/** The mqtt.js options of connection `id`: a persistent session, our own resubscription and backoff. */
export function clientOptionsOf(settings: ConnectionPoolSettings, id: string): IClientOptions {
  const { mqtt5 } = settings;
  return {
    clientId: id,
    ...mqttLog,
    protocolVersion: mqtt5 ? 5 : 4,
    clean: false,
    keepalive: settings.keepaliveSeconds,
    reconnectPeriod: settings.reconnectMs,
    connectTimeout: 10_000,
    resubscribe: false,
    username: settings.username,
    password: settings.password,
    ...(mqtt5 ? { properties: { sessionExpiryInterval: settings.sessionExpirySeconds, receiveMaximum: 65_535 } } : {}),
  };
}

/** What connection `index` subscribes to: telemetry (shared on MQTT 5), and presence on the first only. */
export function subscriptionFilters(index: number, mqtt5: boolean, shareGroup: string): Record<string, { qos: 1 }> {
  const filters: Record<string, { qos: 1 }> = { [mqtt5 ? sharedTelemetryFilter(shareGroup) : TELEMETRY_FILTER]: { qos: 1 } };
  if (index === 0) filters[PRESENCE_FILTER] = { qos: 1 };
  return filters;
}

/** The error for the subscriptions the broker refused (a granted QoS over 2 is a refusal code), or undefined. */
export function subscriptionRefusal(granted: ReadonlyArray<{ topic: string; qos: number }>, mqtt5: boolean): Error | undefined {
  const refused = granted.filter((g) => g.qos > 2);
  if (refused.length === 0) return undefined;
  return new Error(
    `the broker refused the subscription${refused.length > 1 ? 's' : ''} ${refused.map((g) => `${g.topic} (code ${g.qos})`).join(', ')}` +
      (mqtt5 ? '; a broker without MQTT 5 shared subscriptions (such as the embedded one) needs mqtt5 off' : ''),
  );
}

/** Opens the connections and subscribes; resolves once each has connected and subscribed, or rejects on a refusal. */
export function openConnectionPool(options: ConnectionPoolOptions) {
  const settings: ConnectionPoolSettings = {
    ...options,
    sessionExpirySeconds: options.sessionExpirySeconds ?? 7 * 86_400,
    keepaliveSeconds: options.keepaliveSeconds ?? 60,
    reconnectMs: options.reconnectMs ?? 250,
    maxReconnectMs: options.maxReconnectMs ?? 2_000,
  };
  const count = settings.mqtt5 ? settings.connections : 1;
  if (!settings.mqtt5 && settings.connections > 1) {
    settings.log.info('an MQTT 3.1.1 broker has no shared subscriptions: one connection carries all telemetry', {
      connectionsAsked: settings.connections,
    });
  }
  const shared: PoolShared = { stopping: false, brokerDown: false, states: [], slicer: new Slicer() };
  const connections: Connection[] = [];
  for (let i = 0; i < count; i++) connections.push(openConnection(settings, shared, i));

  return {
    /** Resolves when every connection has connected and subscribed once. */
    ready: () => Promise.all(connections.map((c) => c.ready)).then(() => undefined),
    states: () => shared.states.map((s) => ({ ...s })),
    /** Stops taking messages: anything arriving from now on stays unacknowledged. */
    pause() {
      shared.stopping = true;
    },
    /** Sends what is queued (the last PUBACKs) and disconnects, keeping the sessions. */
    async close({ force = false }: { force?: boolean } = {}) {
      shared.stopping = true;
      if (!force) for (const c of connections) c.acks.flush();
      await Promise.all(connections.map((c) => endClient(c.client, force)));
    },
  };
}

export type ConnectionPool = ReturnType<typeof openConnectionPool>;

/** Connection `index` of the pool: connects, takes its messages, subscribes on each connect, reconnects with backoff. */
function openConnection(settings: ConnectionPoolSettings, shared: PoolShared, index: number): Connection {
  const id = `${settings.clientId}-${index}`;
  const state: ConnectionState = { clientId: id, connected: false, subscribed: false, reconnects: 0, paused: false };
  shared.states.push(state);
  const client = mqtt.connect(settings.brokerUrl, clientOptionsOf(settings, id));
  const acks = new AckLine(client);
  client.handleMessage = messageHandler(settings, shared, state, client, acks);
  const ready = subscribeOnConnect(settings, shared, state, client, index);
  client.on('reconnect', () => {
    state.reconnects++;
    client.options.reconnectPeriod = Math.min(settings.maxReconnectMs, (client.options.reconnectPeriod ?? settings.reconnectMs) * 2);
  });
  client.on('close', () => {
    const was = state.connected;
    state.connected = false;
    state.subscribed = false;
    if (was) settings.onConnectionClosed?.();
    if (!shared.stopping && !shared.brokerDown && !shared.states.some((s) => s.connected)) {
      shared.brokerDown = true;
      settings.log.warn('broker unreachable; reconnecting with backoff', { broker: settings.brokerUrl, error: state.lastError });
    }
  });
  client.on('error', (error) => {
    state.lastError = error.message;
    settings.log.debug('broker connection error', { clientId: id, error });
  });
  return { client, acks, ready };
}

/**
 * The connection's message handler: hands each delivery over and calls
 * mqtt.js back at once (with the marker for QoS > 0, see the module
 * comment), or, when the delivery asks to wait, once it may read again.
 */
function messageHandler(settings: ConnectionPoolSettings, shared: PoolShared, state: ConnectionState, client: MqttClient, acks: AckLine): MqttClient['handleMessage'] {
  return (packet: IPublishPacket, callback) => {
    if (shared.stopping) return; // Left unacknowledged: the broker delivers it again to the next session.
    const qos = packet.qos;
    const delivery: Delivery = {
      topic: packet.topic,
      payload: Buffer.isBuffer(packet.payload) ? packet.payload : Buffer.from(packet.payload),
      qos,
      retain: packet.retain,
      receivedAtMs: Date.now(),
      receipt: new DeliveryReceipt(acks, client.stream, qos, packet.messageId),
    };
    const proceed = () => (qos > 0 ? callback(ACK_LATER) : callback());
    let wait: void | Promise<void> = undefined;
    try {
      wait = settings.onDelivery(delivery);
    } catch (error) {
      settings.log.error('a message could not be taken in; it stays unacknowledged', { topic: packet.topic, error });
    }
    if (wait) {
      state.paused = true;
      wait.then(
        () => {
          state.paused = false;
          if (!shared.stopping) proceed();
        },
        () => {},
      );
    } else shared.slicer.run(proceed);
  };
}

/**
 * Subscribes on every connect (the broker may have lost the subscription
 * with a restart); resolves after the first subscription, or rejects when
 * the first is refused. Later refusals are only logged.
 */
function subscribeOnConnect(settings: ConnectionPoolSettings, shared: PoolShared, state: ConnectionState, client: MqttClient, index: number): Promise<void> {
  const { brokerUrl, mqtt5, log } = settings;
  const subscribe = async () => {
    const granted = await client.subscribeAsync(subscriptionFilters(index, mqtt5, settings.shareGroup));
    const refusal = subscriptionRefusal(granted, mqtt5);
    if (refusal) throw refusal;
    state.subscribed = true;
  };
  return new Promise<void>((resolve, reject) => {
    let first = true;
    client.on('connect', () => {
      state.connected = true;
      client.options.reconnectPeriod = settings.reconnectMs;
      if (shared.brokerDown) {
        shared.brokerDown = false;
        log.info('broker connection restored', { broker: brokerUrl, clientId: state.clientId });
      }
      subscribe().then(
        () => {
          if (first) {
            first = false;
            log.info('subscribed', { broker: brokerUrl, clientId: state.clientId, mqtt5 });
            resolve();
          }
        },
        (error) => {
          log.error('subscription failed', { broker: brokerUrl, clientId: state.clientId, error });
          if (first) {
            first = false;
            reject(error);
          }
        },
      );
    });
  });
}

/** Disconnects `client` (at once with `force`), forcing it after 3 s. */
function endClient(client: MqttClient, force: boolean): Promise<void> {
  return new Promise<void>((resolve) => {
    const timer = setTimeout(() => {
      client.end(true, () => resolve());
    }, 3000);
    timer.unref();
    client.end(force, () => {
      clearTimeout(timer);
      resolve();
    });
  });
}
