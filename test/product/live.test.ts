/**
 * Live updates end to end, in Chromium against `npm start`: a sample
 * published over MQTT to the product's broker appears on an open unit page
 * within 5 s, without a reload; paused, the page stays as it is until
 * resumed; the unit's first verdict is announced in words in the polite live
 * region. The diagnosis runs every 2 s here (DIAGNOSIS_INTERVAL_S) so that
 * its event comes within the test.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import mqtt, { type MqttClient } from 'mqtt';
import type { BrowserContext, Page } from 'playwright-core';
import { VERDICT_LABEL } from '@/lib/diagnosis/vocabulary';
import { startProductProcess, type RunningProduct } from '@/test/support/product';
import { chromium, skipUnless } from '@/test/support/services';
import { testFleet, testTag } from '@/test/support/ingest';
import { launchBrowser, screenshots } from './browser';
import { prepareProduct, type PreparedProduct } from './prepare';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 1, hydroUnits: 0 });
const unit = fleet.units[0]!;

describe.skipIf(skipUnless(chromium, 'live updates in a browser'))('live updates (npm start, MQTT, Chromium)', () => {
  let prepared: PreparedProduct;
  let product: RunningProduct;
  let browser: BrowserContext;
  let page: Page;
  let device: MqttClient;
  /** Full page loads since the unit page opened. */
  let navigations = 0;

  const publish = async (tsMs: number) => {
    await device.publishAsync(`millrace/${unit.siteId}/${unit.id}/telemetry`, JSON.stringify({ ts: tsMs, rpm: 250, vab: 231, vbc: 230, vca: 232, kw: 3 }), { qos: 1 });
  };
  /** The newest sample time the page shows, as the <time> element LocalTime renders. */
  const showsSample = (tsMs: number) => page.locator(`time[datetime="${new Date(tsMs).toISOString()}"]`).count();

  beforeAll(async () => {
    // The unit registered and its device given an MQTT account before the product starts, as an operator would.
    prepared = await prepareProduct(fleet, [unit]);
    product = await startProductProcess({ DEMO: 'off', DIAGNOSIS_INTERVAL_S: '2', ...prepared.env });
    browser = await launchBrowser();
    page = await browser.newPage();
    await product.signIn(page);
    device = await mqtt.connectAsync(product.env.MQTT_URL ?? `mqtt://127.0.0.1:${product.env.MQTT_PORT}`, {
      clientId: `live-device-${tag}`,
      ...prepared.credentials.get(`${unit.siteId}/${unit.id}`),
    });
  }, 300_000);

  afterAll(async () => {
    await device?.endAsync();
    await browser?.close();
    await product?.stop();
    await prepared?.cleanUp();
  }, 60_000);

  it('shows a sample published over MQTT on the open unit page within 5 s, without a reload', async () => {
    const response = await page.goto(`${product.url}/sites/${unit.siteId}/units/${unit.id}`);
    expect(response?.status()).toBe(200);
    await page.waitForSelector('[data-live-status="live"]', { timeout: 15_000 });
    // A reload would fire `load` again and drop the marker set on the window below.
    page.on('load', () => navigations++);
    await page.evaluate(() => ((window as unknown as { stillHere: boolean }).stillHere = true));
    const ts = Date.now() - 1000;
    expect(await showsSample(ts)).toBe(0);
    const started = Date.now();
    await publish(ts);
    await page.waitForSelector(`time[datetime="${new Date(ts).toISOString()}"]`, { timeout: 5000 });
    const ms = Date.now() - started;
    process.stdout.write(`live: sample on the unit page ${ms} ms after it was published\n`);
    expect(ms).toBeLessThan(5000);
    expect(navigations).toBe(0);
    await expect(page.evaluate(() => (window as unknown as { stillHere?: boolean }).stillHere)).resolves.toBe(true);
  });

  it('announces the unit’s first verdict in words in a polite live region', async () => {
    const region = page.locator('[data-live-announcement]');
    await expect(region.getAttribute('aria-live')).resolves.toBe('polite');
    // One sample is not enough running data: that is the verdict the diagnosis reaches.
    await page.waitForFunction(
      (label) => document.querySelector('[data-live-announcement]')?.textContent?.includes(label) ?? false,
      VERDICT_LABEL['insufficient-data'],
      { timeout: 15_000 },
    );
    await expect(region.textContent()).resolves.toBe(`Unit ${unit.id}: ${VERDICT_LABEL['insufficient-data']}`);
  });

  it('holds the page while paused and catches up on resume', async () => {
    const pause = page.locator('button[aria-pressed]');
    await pause.click();
    await expect(pause.getAttribute('aria-pressed')).resolves.toBe('true');
    await expect(page.locator('[data-live-status]').getAttribute('data-live-status')).resolves.toBe('paused');
    await expect(page.locator('[data-live-status]').textContent()).resolves.toContain('Paused');
    const ts = Date.now() - 500;
    await publish(ts);
    await page.waitForTimeout(3000);
    expect(await showsSample(ts)).toBe(0);
    await shootLive();
    await pause.click();
    await expect(pause.getAttribute('aria-pressed')).resolves.toBe('false');
    await page.waitForSelector(`time[datetime="${new Date(ts).toISOString()}"]`, { timeout: 5000 });
    await page.waitForSelector('[data-live-status="live"]', { timeout: 10_000 });
    expect(navigations).toBe(0);
    await expect(page.evaluate(() => (window as unknown as { stillHere?: boolean }).stillHere)).resolves.toBe(true);
  });

  it('reads the page again at most once a second however fast events come', async () => {
    await page.waitForSelector('[data-live-status="live"]', { timeout: 10_000 });
    const refreshes: number[] = [];
    const onRequest = (request: { headers(): Record<string, string> }) => {
      // router.refresh() asks the server for the page's components (an RSC request).
      if (request.headers()['rsc'] === '1') refreshes.push(Date.now());
    };
    page.on('request', onRequest);
    const last = Date.now() - 100;
    for (let i = 0; i < 12; i++) {
      await publish(last - (12 - i) * 1000);
      await new Promise((r) => setTimeout(r, 150));
    }
    await publish(last);
    await page.waitForSelector(`time[datetime="${new Date(last).toISOString()}"]`, { timeout: 5000 });
    await page.waitForTimeout(1500);
    page.off('request', onRequest);
    expect(refreshes.length).toBeGreaterThanOrEqual(1);
    const gaps = refreshes.slice(1).map((t, i) => t - refreshes[i]!);
    process.stdout.write(`live: ${refreshes.length} page reads for 13 messages over ${Date.now() - refreshes[0]!} ms, gaps ${gaps.join(', ')} ms\n`);
    for (const gap of gaps) expect(gap).toBeGreaterThanOrEqual(900);
  });

  it('says it is reconnecting while the server refuses the stream, and is live again once it takes it', async () => {
    await page.route('**/api/live?**', (route) =>
      route.fulfill({ status: 503, headers: { 'Retry-After': '30', 'Content-Type': 'application/json' }, body: '{"error":{"code":"unavailable:live","message":"too many live streams"}}' }),
    );
    const pause = page.locator('button[aria-pressed]');
    // A new stream is opened on resume: the server refuses it.
    await pause.click();
    await pause.click();
    await page.waitForSelector('[data-live-status="reconnecting"]', { timeout: 5000 });
    await expect(page.locator('[data-live-status]').textContent()).resolves.toContain('Reconnecting…');
    await page.unroute('**/api/live?**');
    // The page tries again by itself (first after 2 s) and the server takes it now.
    await page.waitForSelector('[data-live-status="live"]', { timeout: 10_000 });
    expect(navigations).toBe(0);
  });

  async function shootLive() {
    const sideways = await screenshots(page, 'live-unit-paused');
    expect(sideways).toEqual([]);
  }
});
