/**
 * The MQTT side of one simulated unit, as a field logger would do it: its
 * own client id, presence `online` (retained) on every connect, a retained
 * `offline` last will, telemetry at QoS 1.
 */
import mqtt, { type MqttClient } from 'mqtt';
import { AppError } from '@/lib/errors/app-error';
import type { Logger } from '@/lib/log/logger';

/** Topic of a unit's telemetry (contract, section 3). */
export function telemetryTopic(siteId: string, unitId: string): string {
  return `millrace/${siteId}/${unitId}/telemetry`;
}

/** Topic of a unit's presence (contract, section 3). */
export function presenceTopic(siteId: string, unitId: string): string {
  return `millrace/${siteId}/${unitId}/presence`;
}

/** Strips a password from a broker URL before it goes into a message. */
export function redactUrl(url: string): string {
  try {
    const u = new URL(url);
    if (u.password) u.password = '***';
    return u.toString().replace(/\/$/, '');
  } catch {
    return url;
  }
}

/** Turns a first-connection failure into an error a person can act on. */
export function connectionError(brokerUrl: string, error: unknown): AppError {
  const url = redactUrl(brokerUrl);
  const e = error as { code?: unknown; message?: unknown } | undefined;
  const code = e?.code;
  const message = typeof e?.message === 'string' ? e.message : String(error);
  let text: string;
  if (code === 'ECONNREFUSED') {
    text = `cannot reach the MQTT broker at ${url} (connection refused): start millrace with \`npm start\` (it runs a broker), or set MQTT_URL to a running broker`;
  } else if (code === 'ENOTFOUND' || code === 'EAI_AGAIN') {
    text = `cannot resolve the host of the MQTT broker at ${url}: check MQTT_URL`;
  } else if (code === 4 || code === 5 || code === 134 || code === 135 || /not authori[sz]ed|bad user/i.test(message)) {
    text = `the MQTT broker at ${url} refused the credentials: check MQTT_USERNAME and MQTT_PASSWORD`;
  } else if (code === 'ETIMEDOUT' || /timed? ?out/i.test(message)) {
    text = `no answer from the MQTT broker at ${url} (timed out): check MQTT_URL and that the broker is running`;
  } else {
    text = `cannot connect to the MQTT broker at ${url}: ${message}`;
  }
  return new AppError('unavailable', 'simulate', text, { cause: error, expose: true });
}

/** A unit's own MQTT username and password (lib/devices issues them). */
export interface DeviceCredentials {
  username: string;
  password: string;
}

/** Gives each unit its own credentials; undefined falls back to the shared username and password. */
export type CredentialsFor = (siteId: string, unitId: string) => DeviceCredentials | undefined;

/** How a run's units reach the broker, and as whom (the live simulator's and the backfill's options). */
export interface BrokerAccess {
  brokerUrl: string;
  log: Logger;
  username?: string | undefined;
  password?: string | undefined;
  /** Each unit's own credentials (a broker that checks who publishes where); else `username`/`password` for all. */
  credentialsFor?: CredentialsFor | undefined;
}

/**
 * The device of one unit in a run: the unit's own credentials when
 * `credentialsFor` has them, else the run's shared ones.
 * @example deviceForUnit({ brokerUrl: 'mqtt://127.0.0.1:1883', log }, { siteId: 'quorvenna-ildresk', id: 'qv-01' }, { clientId: 'millrace-sim-qv-01', presence: true })
 */
export function deviceForUnit(
  access: BrokerAccess,
  unit: { readonly siteId: string; readonly id: string },
  how: { readonly clientId: string; readonly presence: boolean },
): UnitDevice {
  const own = access.credentialsFor?.(unit.siteId, unit.id);
  return new UnitDevice({
    brokerUrl: access.brokerUrl,
    siteId: unit.siteId,
    unitId: unit.id,
    clientId: how.clientId,
    username: own?.username ?? access.username,
    password: own?.password ?? access.password,
    log: access.log,
    presence: how.presence,
  });
}

export interface DeviceOptions {
  brokerUrl: string;
  siteId: string;
  unitId: string;
  clientId: string;
  username?: string | undefined;
  password?: string | undefined;
  log: Logger;
  /** Publish presence and set the last will (live devices); false for a history upload. */
  presence: boolean;
  /** Give up the first connection after this long, ms. */
  connectTimeoutMs?: number;
}

/** One unit's connection to the broker; connect once, then close or drop. */
export class UnitDevice {
  readonly telemetryTopic: string;
  readonly presenceTopic: string;
  private client: MqttClient | undefined;
  private pending = 0;
  private everConnected = false;
  private reportedDown = false;

  constructor(private readonly options: DeviceOptions) {
    this.telemetryTopic = telemetryTopic(options.siteId, options.unitId);
    this.presenceTopic = presenceTopic(options.siteId, options.unitId);
  }

  /** Messages published and not yet acknowledged by the broker. */
  get inFlight(): number {
    return this.pending;
  }

  /** True while the connection is up. */
  get connected(): boolean {
    return this.client?.connected === true;
  }

  /**
   * Connects; resolves on the first CONNACK. The first failure rejects with
   * an AppError naming the broker; later drops reconnect on their own.
   */
  connect(): Promise<void> {
    const o = this.options;
    const client = mqtt.connect(o.brokerUrl, {
      clientId: o.clientId,
      protocolVersion: 4,
      clean: true,
      keepalive: 30,
      reconnectPeriod: 2000,
      connectTimeout: o.connectTimeoutMs ?? 10_000,
      ...(o.username !== undefined ? { username: o.username } : {}),
      ...(o.password !== undefined ? { password: o.password } : {}),
      ...(o.presence ? { will: { topic: this.presenceTopic, payload: Buffer.from('offline'), qos: 1 as const, retain: true } } : {}),
    });
    this.client = client;
    client.on('connect', () => {
      if (this.reportedDown) o.log.info('broker connection restored', { unit: o.unitId });
      this.reportedDown = false;
      this.everConnected = true;
      if (o.presence) client.publish(this.presenceTopic, 'online', { qos: 1, retain: true });
    });
    client.on('close', () => {
      if (this.everConnected && !this.reportedDown && !client.disconnecting) {
        this.reportedDown = true;
        o.log.warn('broker connection lost, reconnecting', { unit: o.unitId, broker: redactUrl(o.brokerUrl) });
      }
    });
    return new Promise<void>((resolve, reject) => {
      const timer = setTimeout(() => fail(Object.assign(new Error('connection timed out'), { code: 'ETIMEDOUT' })), (o.connectTimeoutMs ?? 10_000) + 500);
      const done = () => {
        clearTimeout(timer);
        client.removeListener('error', fail);
      };
      const fail = (error: unknown) => {
        done();
        client.end(true);
        reject(connectionError(o.brokerUrl, error));
      };
      client.once('connect', () => {
        done();
        client.on('error', (error) => o.log.warn('broker error', { unit: o.unitId, error }));
        resolve();
      });
      client.once('error', fail);
    });
  }

  /** Publishes `payload` (a JSON text) as telemetry at QoS 1; resolves on the broker's PUBACK. */
  publishTelemetry(payload: string): Promise<void> {
    const client = this.client;
    if (client === undefined) return Promise.reject(new Error(`unit ${this.options.unitId} is not connected`));
    this.pending++;
    return new Promise<void>((resolve, reject) => {
      client.publish(this.telemetryTopic, payload, { qos: 1 }, (error) => {
        this.pending--;
        if (error) reject(error);
        else resolve();
      });
    });
  }

  /**
   * Drops the connection the way a failing device does: the socket closes
   * without a DISCONNECT, so the broker publishes the last will (`offline`).
   * Messages not yet acknowledged are lost with the device (their
   * publishes reject). The device is done; a comeback is a new device.
   */
  dropUnclean(): void {
    const client = this.client;
    if (client === undefined) return;
    this.client = undefined;
    client.options.reconnectPeriod = 0;
    client.end(true);
  }

  /**
   * Shuts down cleanly: waits up to `drainMs` for acknowledgements, says
   * `offline` itself (a clean DISCONNECT does not fire the last will), and
   * disconnects.
   */
  async close(drainMs = 5000): Promise<void> {
    const client = this.client;
    if (client === undefined) return;
    this.client = undefined;
    const until = Date.now() + drainMs;
    while (this.pending > 0 && client.connected && Date.now() < until) await new Promise((r) => setTimeout(r, 20));
    if (this.options.presence && client.connected) {
      await new Promise<void>((resolve) => {
        const timer = setTimeout(resolve, 2000);
        client.publish(this.presenceTopic, 'offline', { qos: 1, retain: true }, () => {
          clearTimeout(timer);
          resolve();
        });
      });
    }
    await new Promise<void>((resolve) => {
      const timer = setTimeout(() => {
        client.end(true);
        resolve();
      }, 2000);
      client.end(false, {}, () => {
        clearTimeout(timer);
        resolve();
      });
    });
  }
}
