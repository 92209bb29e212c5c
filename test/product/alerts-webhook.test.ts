/**
 * Alerts end to end against `npm start`: an overspeed published over MQTT by
 * a unit's own device (rpm above the nameplate's maxRpm: contract section 7,
 * `overspeed`) reaches an endpoint added with `npx millrace webhook add` as
 * exactly one `alert.opened`, signed as the Standard Webhooks specification
 * says (verified by the maintained `standardwebhooks` library) and sent again
 * with the same `webhook-id` after the endpoint failed once. What is checked
 * is what leaves the product, as an integrator's endpoint receives it.
 */
import { execFile } from 'node:child_process';
import { promisify } from 'node:util';
import mqtt, { type MqttClient } from 'mqtt';
import { Webhook } from 'standardwebhooks';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startEndpoint, type TestEndpoint } from '@/test/alerts/webhook-endpoint';
import { eventually, startProductProcess, type RunningProduct } from '@/test/support/product';
import { testFleet, testTag } from '@/test/support/ingest';
import { prepareProduct, type PreparedProduct } from './prepare';

const run = promisify(execFile);
const tag = testTag();
const fleet = testFleet(tag, { windUnits: 1, hydroUnits: 0 });
const unit = fleet.units[0]!;

describe('alerts: an overspeed over MQTT becomes one signed webhook (npm start)', () => {
  let prepared: PreparedProduct;
  let product: RunningProduct;
  let endpoint: TestEndpoint;
  let device: MqttClient;
  let secret = '';

  beforeAll(async () => {
    prepared = await prepareProduct(fleet, [unit]);
    // Fails the first delivery, then takes every one.
    endpoint = await startEndpoint((n) => (n === 0 ? 503 : 200));
    const childEnv: NodeJS.ProcessEnv = { ...process.env, ...prepared.env, LOG_LEVEL: 'warn' };
    if (!prepared.env.DATABASE_URL) delete childEnv.DATABASE_URL;
    const { stdout } = await run(process.execPath, ['bin/millrace.mjs', 'webhook', 'add', '--url', endpoint.url, '--min-severity', 'alarm', '--json'], { env: childEnv });
    secret = (JSON.parse(stdout) as { secret: string }).secret;
    product = await startProductProcess({ DEMO: 'off', ALERT_INTERVAL_S: '1', ...prepared.env });
    device = await mqtt.connectAsync(product.env.MQTT_URL ?? `mqtt://127.0.0.1:${product.env.MQTT_PORT}`, {
      clientId: `alert-device-${tag}`,
      ...prepared.credentials.get(`${unit.siteId}/${unit.id}`),
    });
  }, 300_000);

  afterAll(async () => {
    await device?.endAsync();
    await product?.stop();
    await endpoint?.close();
    await prepared?.cleanUp();
  }, 60_000);

  it('sends exactly one alert.opened, signed, retried with the same webhook-id after a failure', async () => {
    const now = Date.now();
    const samples = Array.from({ length: 20 }, (_, i) => ({ ts: now - (20 - i) * 1000, rpm: unit.maxRpm + 15, vab: 400, vbc: 400, vca: 400, kw: 5 }));
    await device.publishAsync(`millrace/${unit.siteId}/${unit.id}/telemetry`, JSON.stringify(samples), { qos: 1 });
    await eventually(async () => (endpoint.received.length >= 2 ? true : undefined), 60_000, 'the webhook and its retry');
    // Time for any duplicate to arrive: several more evaluations and delivery polls.
    await new Promise((r) => setTimeout(r, 4_000));
    const ids = endpoint.ids();
    expect(new Set(ids).size).toBe(1);
    expect(ids).toHaveLength(2);
    const hook = new Webhook(secret);
    for (const r of endpoint.received) {
      const payload = hook.verify(r.body, r.headers as Record<string, string>) as { type: string; data: Record<string, unknown> };
      expect(payload.type).toBe('alert.opened');
      expect(payload.data).toMatchObject({ siteId: unit.siteId, unitId: unit.id, condition: 'overspeed', severity: 'alarm', state: 'active', value: unit.maxRpm + 15, limit: unit.maxRpm });
      expect(payload.data.url).toBe(`/sites/${unit.siteId}/units/${unit.id}`);
    }
    expect(() => new Webhook(`whsec_${Buffer.alloc(32, 7).toString('base64')}`).verify(endpoint.received[0]!.body, endpoint.received[0]!.headers as Record<string, string>)).toThrow();
  }, 90_000);
});
