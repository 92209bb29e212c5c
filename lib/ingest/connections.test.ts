import { afterEach, describe, expect, it, vi } from 'vitest';
import { createLogger } from '@/lib/log/logger';
import { Slicer, clientOptionsOf, subscriptionFilters, subscriptionRefusal, type ConnectionPoolSettings } from './connections';

const settings: ConnectionPoolSettings = {
  brokerUrl: 'mqtt://127.0.0.1:1883',
  mqtt5: true,
  clientId: 'millrace-ingest-test',
  connections: 4,
  shareGroup: 'millrace-ingest',
  username: 'millrace-ingest',
  password: 'secret',
  log: createLogger('ingest', 'silent'),
  sessionExpirySeconds: 604_800,
  keepaliveSeconds: 60,
  reconnectMs: 250,
  maxReconnectMs: 2000,
  onDelivery: () => {},
};

describe('clientOptionsOf', () => {
  it('asks for a persistent session and leaves resubscribing to the pool', () => {
    expect(clientOptionsOf(settings, 'millrace-ingest-test-2')).toMatchObject({
      clientId: 'millrace-ingest-test-2',
      clean: false,
      resubscribe: false,
      keepalive: 60,
      reconnectPeriod: 250,
      username: 'millrace-ingest',
    });
  });

  it('speaks MQTT 5 with a session expiry and the largest receive window, or MQTT 3.1.1 without them', () => {
    expect(clientOptionsOf(settings, 'a')).toMatchObject({ protocolVersion: 5, properties: { sessionExpiryInterval: 604_800, receiveMaximum: 65_535 } });
    const v311 = clientOptionsOf({ ...settings, mqtt5: false }, 'a');
    expect(v311.protocolVersion).toBe(4);
    expect(v311.properties).toBeUndefined();
  });
});

describe('subscriptionFilters', () => {
  it('subscribes the first connection to shared telemetry and presence, the others to shared telemetry only (MQTT 5)', () => {
    expect(subscriptionFilters(0, true, 'grp')).toEqual({ '$share/grp/millrace/+/+/telemetry': { qos: 1 }, 'millrace/+/+/presence': { qos: 1 } });
    expect(subscriptionFilters(3, true, 'grp')).toEqual({ '$share/grp/millrace/+/+/telemetry': { qos: 1 } });
  });

  it('subscribes to plain telemetry where there are no shared subscriptions (MQTT 3.1.1)', () => {
    expect(subscriptionFilters(0, false, 'grp')).toEqual({ 'millrace/+/+/telemetry': { qos: 1 }, 'millrace/+/+/presence': { qos: 1 } });
  });
});

describe('subscriptionRefusal', () => {
  it('is nothing when every subscription was granted (QoS 0 to 2)', () => {
    expect(subscriptionRefusal([{ topic: 'a', qos: 1 }, { topic: 'b', qos: 0 }], true)).toBeUndefined();
  });

  it('names each refused filter with its code, and on MQTT 5 says to turn mqtt5 off for a broker without shared subscriptions', () => {
    const error = subscriptionRefusal([{ topic: 'a', qos: 1 }, { topic: '$share/g/t', qos: 158 }, { topic: 'p', qos: 128 }], true);
    expect(error?.message).toBe(
      'the broker refused the subscriptions $share/g/t (code 158), p (code 128); a broker without MQTT 5 shared subscriptions (such as the embedded one) needs mqtt5 off',
    );
    expect(subscriptionRefusal([{ topic: 't', qos: 128 }], false)?.message).toBe('the broker refused the subscription t (code 128)');
  });
});

describe('Slicer', () => {
  afterEach(() => {
    vi.useRealTimers();
  });

  it('runs message handling at once within a slice, and after one turn of the event loop once the slice is used up', async () => {
    vi.useFakeTimers();
    let nowMs = 0;
    const slicer = new Slicer(4, () => nowMs);
    const ran: string[] = [];
    slicer.run(() => ran.push('first'));
    nowMs = 3.9;
    slicer.run(() => ran.push('within'));
    expect(ran).toEqual(['first', 'within']);
    nowMs = 4;
    slicer.run(() => ran.push('deferred'));
    expect(ran).toEqual(['first', 'within']);
    await vi.advanceTimersByTimeAsync(0);
    expect(ran).toEqual(['first', 'within', 'deferred']);
    // The turn started a new slice.
    nowMs = 6;
    slicer.run(() => ran.push('new slice'));
    expect(ran).toHaveLength(4);
  });
});
