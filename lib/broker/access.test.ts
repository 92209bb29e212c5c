import { describe, expect, it } from 'vitest';
import { createCredentialCache, mayPublish, maySubscribe, type BrokerIdentity } from './access';

const device: BrokerIdentity = { kind: 'device', username: 'north-ridge.nr-01', siteId: 'north-ridge', unitId: 'nr-01' };
const ingester: BrokerIdentity = { kind: 'ingester', username: 'millrace-ingest-local' };

describe('who may publish where', () => {
  it('lets a device publish to its own telemetry and presence only', () => {
    expect(mayPublish(device, 'millrace/north-ridge/nr-01/telemetry')).toBe(true);
    expect(mayPublish(device, 'millrace/north-ridge/nr-01/presence')).toBe(true);
    for (const topic of [
      'millrace/north-ridge/nr-02/telemetry',
      'millrace/other-site/nr-01/telemetry',
      'millrace/north-ridge/nr-01/telemetry/extra',
      'millrace/north-ridge/nr-01/other',
      'millrace/north-ridge/nr-01',
      'millrace/north-ridge/nr-01/Telemetry',
      '$SYS/broker/clients',
      'anything',
    ]) {
      expect(mayPublish(device, topic), topic).toBe(false);
    }
  });

  it('lets the ingester and nobody unknown publish anything', () => {
    expect(mayPublish(ingester, 'millrace/north-ridge/nr-01/telemetry')).toBe(false);
    expect(mayPublish(undefined, 'millrace/north-ridge/nr-01/telemetry')).toBe(false);
  });
});

describe('who may subscribe to what', () => {
  it('lets the ingester take telemetry and presence, plain or shared, and nothing wider', () => {
    for (const filter of ['millrace/+/+/telemetry', 'millrace/+/+/presence', '$share/millrace-ingest/millrace/+/+/telemetry', '$share/g/millrace/+/+/presence']) {
      expect(maySubscribe(ingester, filter), filter).toBe(true);
    }
    for (const filter of ['#', 'millrace/#', 'millrace/+/+/+', '$share/g/#', '$share/g/millrace/#', '$share//millrace/+/+/telemetry', '$SYS/#', 'millrace/+/+/telemetry/#']) {
      expect(maySubscribe(ingester, filter), filter).toBe(false);
    }
  });

  it('lets a device subscribe to nothing, not even its own topics', () => {
    for (const filter of ['millrace/north-ridge/nr-01/telemetry', 'millrace/+/+/telemetry', '#']) {
      expect(maySubscribe(device, filter), filter).toBe(false);
      expect(maySubscribe(undefined, filter), filter).toBe(false);
    }
  });
});

describe('the credential cache', () => {
  const password = Buffer.from('abcdefghijklmnopqrstuv');

  it('answers for the same username and password until it expires', () => {
    let now = 1_000;
    const cache = createCredentialCache({ ttlMs: 60_000, now: () => now });
    cache.set(device.username, password, device);
    expect(cache.get(device.username, password)).toEqual(device);
    expect(cache.get(device.username, Buffer.from('abcdefghijklmnopqrstuw'))).toBeUndefined();
    expect(cache.get('north-ridge.nr-02', password)).toBeUndefined();
    now += 59_999;
    expect(cache.get(device.username, password)).toEqual(device);
    now += 1;
    expect(cache.get(device.username, password)).toBeUndefined();
  });

  it('forgets a unit at once, and keeps at most its size', () => {
    const cache = createCredentialCache({ max: 2 });
    cache.set(device.username, password, device);
    cache.set(ingester.username, password, ingester);
    cache.forgetUnit('north-ridge', 'nr-01');
    expect(cache.get(device.username, password)).toBeUndefined();
    expect(cache.get(ingester.username, password)).toEqual(ingester);
    cache.set('a.b', password, { ...device, username: 'a.b' });
    cache.set('c.d', password, { ...device, username: 'c.d' });
    expect(cache.size()).toBe(2);
    expect(cache.get(ingester.username, password)).toBeUndefined();
  });
});
