/**
 * The unit setup page's "Device credentials", driven in Chromium against
 * `npm start` (embedded broker): credentials issued by the button are shown
 * once and let the device in; a page load (GET) never issues or shows one;
 * rotating cuts the connected device off and the old password stops working.
 */
import { execFile } from 'node:child_process';
import { promisify } from 'node:util';
import mqtt, { type MqttClient } from 'mqtt';
import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { realDatabaseUrl } from '@/test/support/backend';
import { testFleet, testTag } from '@/test/support/ingest';
import { issueDeviceCredentialsOnScreen, startProductProcess, type RunningProduct } from '@/test/support/product';
import { chromium, skipUnless } from '@/test/support/services';
import { launchBrowser, screenshots } from './browser';
import { prepareProduct, type PreparedProduct } from './prepare';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 1, hydroUnits: 0 });
const unit = fleet.units[0]!;

/** One connection attempt, no reconnects: the client, or the refusal's code. */
function tryConnect(url: string, options: mqtt.IClientOptions): Promise<MqttClient | string> {
  return new Promise((resolve) => {
    const client = mqtt.connect(url, { reconnectPeriod: 0, connectTimeout: 5000, ...options });
    client.once('connect', () => resolve(client));
    client.once('error', (error: Error & { code?: unknown }) => {
      client.end(true);
      resolve(String(error.code ?? error.message));
    });
  });
}

describe.skipIf(skipUnless(chromium, 'device credentials on the unit setup page'))('device credentials on the setup page (npm start, embedded broker, Chromium)', () => {
  let prepared: PreparedProduct;
  let product: RunningProduct;
  let browser: BrowserContext;
  let page: Page;
  let brokerUrl: string;

  beforeAll(async () => {
    prepared = await prepareProduct(fleet, []);
    // The embedded broker is the one that checks device accounts itself, also when the suite runs on PostgreSQL and Mosquitto.
    product = await startProductProcess({ DEMO: 'off', ...prepared.env, MQTT_URL: '' });
    brokerUrl = `mqtt://127.0.0.1:${product.env.MQTT_PORT}`;
    browser = await launchBrowser();
    page = await browser.newPage();
    await product.signIn(page);
  }, 300_000);

  afterAll(async () => {
    await browser?.close();
    await product?.stop();
    await prepared?.cleanUp();
  }, 60_000);

  it('issues on the button, shows the password once, and it lets the device in', async () => {
    await page.goto(`${product.url}/setup/units/${unit.siteId}/${unit.id}`);
    await expect(page.locator('#device-credentials').textContent()).resolves.toContain('No credentials yet');
    // Nobody may connect before: anonymous and guessed accounts alike.
    expect(await tryConnect(brokerUrl, { clientId: `anon-${tag}` })).toBe('5');
    const issued = await issueDeviceCredentialsOnScreen(page, product, unit.siteId, unit.id);
    expect(issued.username).toBe(`${unit.siteId}.${unit.id}`);
    expect(issued.password).toMatch(/^[A-Za-z0-9_-]{22}$/);
    await expect(page.locator('#device-credentials').textContent()).resolves.toMatch(/shown once/);
    // Looked at on a desk and a phone: no sideways scroll at either width.
    expect(await screenshots(page, 'setup-device-credentials-issued')).toEqual([]);
    const device = await tryConnect(brokerUrl, { clientId: `dev-${tag}`, ...issued });
    expect(typeof device).not.toBe('string');
    await (device as MqttClient).endAsync();
  });

  it('never shows or issues a password on a page load', async () => {
    await page.goto(`${product.url}/setup/units/${unit.siteId}/${unit.id}`);
    const text = (await page.locator('#device-credentials').textContent()) ?? '';
    expect(text).toContain(`${unit.siteId}.${unit.id}`);
    expect(text).toContain('when issued');
    expect(await page.locator('[data-testid="device-password"]').count()).toBe(0);
    await page.reload();
    expect((await page.locator('#device-credentials').textContent()) ?? '').toContain('when issued');
    expect(await screenshots(page, 'setup-device-credentials')).toEqual([]);
  });

  it('rotating cuts the connected device off; the old password is refused, the new one taken', async () => {
    const old = await issueDeviceCredentialsOnScreen(page, product, unit.siteId, unit.id);
    const device = (await tryConnect(brokerUrl, { clientId: `dev-${tag}`, ...old })) as MqttClient;
    expect(typeof device).not.toBe('string');
    const closed = new Promise<void>((resolve) => device.once('close', () => resolve()));
    const fresh = await issueDeviceCredentialsOnScreen(page, product, unit.siteId, unit.id);
    expect(fresh.password).not.toBe(old.password);
    await expect(page.locator('#device-credentials').textContent()).resolves.toContain('The old password no longer works');
    await closed;
    device.end(true);
    expect(await tryConnect(brokerUrl, { clientId: `dev-${tag}`, ...old })).toBe('4');
    const again = await tryConnect(brokerUrl, { clientId: `dev-${tag}`, ...fresh });
    expect(typeof again).not.toBe('string');
    await (again as MqttClient).endAsync();
  });

  it('revoking cuts the device off and refuses it; the page says so', async () => {
    const issued = await issueDeviceCredentialsOnScreen(page, product, unit.siteId, unit.id);
    const device = (await tryConnect(brokerUrl, { clientId: `dev-${tag}`, ...issued })) as MqttClient;
    expect(typeof device).not.toBe('string');
    const closed = new Promise<void>((resolve) => device.once('close', () => resolve()));
    await page.click('#device-credentials button[name=intent][value=revoke]');
    await page.waitForSelector('#device-credentials :text("Revoked: the device cannot connect")');
    expect(await page.locator('[data-testid="device-password"]').count()).toBe(0);
    await closed;
    device.end(true);
    expect(await tryConnect(brokerUrl, { clientId: `dev-${tag}`, ...issued })).toBe('4');
    await page.reload();
    expect((await page.locator('#device-credentials').textContent()) ?? '').toMatch(/Revoked .*the device cannot connect/);
    expect(await screenshots(page, 'setup-device-credentials-revoked')).toEqual([]);
  });

  it('takes a rotation from the command line too: on PostgreSQL it cuts the device off by NOTIFY; on the embedded database the command refuses', async () => {
    const issued = await issueDeviceCredentialsOnScreen(page, product, unit.siteId, unit.id);
    const device = (await tryConnect(brokerUrl, { clientId: `dev-${tag}`, ...issued })) as MqttClient;
    expect(typeof device).not.toBe('string');
    const closed = new Promise<void>((resolve) => device.once('close', () => resolve()));
    const env: NodeJS.ProcessEnv = { ...process.env, DATA_DIR: product.env.DATA_DIR, LOG_LEVEL: 'warn' };
    if (product.env.DATABASE_URL) env.DATABASE_URL = product.env.DATABASE_URL;
    else delete env.DATABASE_URL;
    const command = promisify(execFile)(process.execPath, ['bin/millrace.mjs', 'device', 'credentials', `${unit.siteId}/${unit.id}`, '--json'], { env });
    if (realDatabaseUrl) {
      const fresh = JSON.parse((await command).stdout) as { username: string; password: string };
      await closed;
      expect(await tryConnect(brokerUrl, { clientId: `dev-${tag}`, ...issued })).toBe('4');
      const again = await tryConnect(brokerUrl, { clientId: `dev-${tag}`, ...fresh });
      expect(typeof again).not.toBe('string');
      await (again as MqttClient).endAsync();
    } else {
      await expect(command).rejects.toMatchObject({ code: 2, stderr: expect.stringContaining('is in use by process') });
      expect(device.connected).toBe(true);
    }
    device.end(true);
  });
});
