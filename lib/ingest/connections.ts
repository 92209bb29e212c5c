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

/** Opens the connections and subscribes; resolves once each has connected and subscribed, or rejects on a refusal. */
export function openConnectionPool(options: ConnectionPoolOptions) {
  const {
    brokerUrl,
    mqtt5,
    clientId,
    shareGroup,
    log,
    onDelivery,
    sessionExpirySeconds = 7 * 86_400,
    keepaliveSeconds = 60,
    reconnectMs = 250,
    maxReconnectMs = 2_000,
  } = options;
  const count = mqtt5 ? options.connections : 1;
  if (!mqtt5 && options.connections > 1) {
    log.info('an MQTT 3.1.1 broker has no shared subscriptions: one connection carries all telemetry', {
      connectionsAsked: options.connections,
    });
  }
  let stopping = false;
  let brokerDown = false;
  const states: ConnectionState[] = [];
  const clients: MqttClient[] = [];
  const ackLines: AckLine[] = [];
  const readies: Array<Promise<void>> = [];
  let sliceStart = performance.now();
  /** Runs `next` now, or after one turn of the event loop once this slice is used up. */
  const inSlice = (next: () => void) => {
    if (performance.now() - sliceStart < SLICE_MS) return next();
    setImmediate(() => {
      sliceStart = performance.now();
      next();
    });
  };

  for (let i = 0; i < count; i++) {
    const id = `${clientId}-${i}`;
    const state: ConnectionState = { clientId: id, connected: false, subscribed: false, reconnects: 0, paused: false };
    states.push(state);
    const clientOptions: IClientOptions = {
      clientId: id,
      ...mqttLog,
      protocolVersion: mqtt5 ? 5 : 4,
      clean: false,
      keepalive: keepaliveSeconds,
      reconnectPeriod: reconnectMs,
      connectTimeout: 10_000,
      resubscribe: false,
      username: options.username,
      password: options.password,
      ...(mqtt5 ? { properties: { sessionExpiryInterval: sessionExpirySeconds, receiveMaximum: 65_535 } } : {}),
    };
    const client = mqtt.connect(brokerUrl, clientOptions);
    clients.push(client);
    const acks = new AckLine(client);
    ackLines.push(acks);

    client.handleMessage = (packet: IPublishPacket, callback) => {
      if (stopping) return; // Left unacknowledged: the broker delivers it again to the next session.
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
        wait = onDelivery(delivery);
      } catch (error) {
        log.error('a message could not be taken in; it stays unacknowledged', { topic: packet.topic, error });
      }
      if (wait) {
        state.paused = true;
        wait.then(
          () => {
            state.paused = false;
            if (!stopping) proceed();
          },
          () => {},
        );
      } else inSlice(proceed);
    };

    const subscribe = async () => {
      const filters: Record<string, { qos: 1 }> = { [mqtt5 ? sharedTelemetryFilter(shareGroup) : TELEMETRY_FILTER]: { qos: 1 } };
      if (i === 0) filters[PRESENCE_FILTER] = { qos: 1 };
      const granted = await client.subscribeAsync(filters);
      const refused = granted.filter((g) => g.qos > 2);
      if (refused.length > 0) {
        throw new Error(
          `the broker refused the subscription${refused.length > 1 ? 's' : ''} ${refused.map((g) => `${g.topic} (code ${g.qos})`).join(', ')}` +
            (mqtt5 ? '; a broker without MQTT 5 shared subscriptions (such as the embedded one) needs mqtt5 off' : ''),
        );
      }
      state.subscribed = true;
    };

    readies.push(
      new Promise<void>((resolve, reject) => {
        let first = true;
        client.on('connect', () => {
          state.connected = true;
          client.options.reconnectPeriod = reconnectMs;
          if (brokerDown) {
            brokerDown = false;
            log.info('broker connection restored', { broker: brokerUrl, clientId: id });
          }
          subscribe().then(
            () => {
              if (first) {
                first = false;
                log.info('subscribed', { broker: brokerUrl, clientId: id, mqtt5 });
                resolve();
              }
            },
            (error) => {
              log.error('subscription failed', { broker: brokerUrl, clientId: id, error });
              if (first) {
                first = false;
                reject(error);
              }
            },
          );
        });
      }),
    );
    client.on('reconnect', () => {
      state.reconnects++;
      client.options.reconnectPeriod = Math.min(maxReconnectMs, (client.options.reconnectPeriod ?? reconnectMs) * 2);
    });
    client.on('close', () => {
      const was = state.connected;
      state.connected = false;
      state.subscribed = false;
      if (was) options.onConnectionClosed?.();
      if (!stopping && !brokerDown && !states.some((s) => s.connected)) {
        brokerDown = true;
        log.warn('broker unreachable; reconnecting with backoff', { broker: brokerUrl, error: state.lastError });
      }
    });
    client.on('error', (error) => {
      state.lastError = error.message;
      log.debug('broker connection error', { clientId: id, error });
    });
  }

  return {
    /** Resolves when every connection has connected and subscribed once. */
    ready: () => Promise.all(readies).then(() => undefined),
    states: () => states.map((s) => ({ ...s })),
    /** Stops taking messages: anything arriving from now on stays unacknowledged. */
    pause() {
      stopping = true;
    },
    /** Sends what is queued (the last PUBACKs) and disconnects, keeping the sessions. */
    async close({ force = false }: { force?: boolean } = {}) {
      stopping = true;
      if (!force) for (const line of ackLines) line.flush();
      await Promise.all(
        clients.map(
          (c) =>
            new Promise<void>((resolve) => {
              const timer = setTimeout(() => {
                c.end(true, () => resolve());
              }, 3000);
              timer.unref();
              c.end(force, () => {
                clearTimeout(timer);
                resolve();
              });
            }),
        ),
      );
    },
  };
}

export type ConnectionPool = ReturnType<typeof openConnectionPool>;
