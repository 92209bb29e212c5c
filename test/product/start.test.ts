import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BrowserContext } from 'playwright-core';
import { mkdirSync } from 'node:fs';
import { demoDeviceCredentials, eventually, startProductProcess, type RunningProduct } from '@/test/support/product';
import { realBrokerUrl, realDatabaseUrl } from '@/test/support/backend';
import { chromium, launchChromium, skipUnless } from '@/test/support/services';
import mqtt from 'mqtt';

// `npm start` as a user runs it: the build when needed, then the whole product
// in one process. With the demo fleet on, telemetry flows from the simulated
// devices through the broker and the ingester into the database, and the
// fleet page shows it.
let product: RunningProduct;
let browser: BrowserContext;

beforeAll(async () => {
  product = await startProductProcess({ DEMO: 'on' });
  // Only the browser case needs Chromium; the others run without it.
  if (chromium.available) browser = await launchChromium({ width: 1280, height: 900 });
}, 300_000);

afterAll(async () => {
  await browser?.close();
  await product?.stop();
}, 60_000);

interface Health {
  status: string;
  components: Record<string, { status: string; [k: string]: unknown }>;
}

describe(`npm start (${realDatabaseUrl ? 'PostgreSQL' : 'embedded PGlite'}, ${realBrokerUrl ? 'real broker' : 'embedded broker'})`, () => {
  it('reports database, broker and ingester state at /api/health', async () => {
    const health = await eventually(
      async () => {
        const res = await product.fetch(`${product.url}/api/health`);
        const body = (await res.json()) as Health;
        const broker = body.components.ingester?.broker as { connected?: number } | undefined;
        return (broker?.connected ?? 0) >= 1 ? body : undefined;
      },
      30_000,
      'the ingester to connect',
    );
    expect(health.components.database?.status).toBe('ok');
    expect(health.components.database?.backend).toBe(realDatabaseUrl ? 'postgres' : 'pglite');
    expect(health.components.broker?.embedded).toBe(!realBrokerUrl);
    expect(health.components.ingester?.status).toBe('ok');
  });

  it('stores the demo fleet telemetry that went through the broker', async () => {
    const committed = await eventually(
      async () => {
        const body = (await (await product.fetch(`${product.url}/api/health`)).json()) as Health;
        const counters = body.components.ingester?.counters as { rowsCommitted?: number } | undefined;
        const rows = counters?.rowsCommitted ?? 0;
        return rows > 50 ? rows : undefined;
      },
      90_000,
      'demo samples to be committed',
    );
    expect(committed).toBeGreaterThan(50);
  });

  it.skipIf(skipUnless(chromium, 'fleet list in a browser'))('shows the fleet list in a browser', async () => {
    const page = await browser.newPage();
    await product.signIn(page);
    await eventually(
      async () => {
        await page.goto(product.url, { waitUntil: 'load' });
        // A site whose oldest last sample is a time: every unit there has reported.
        return (await page.locator('section.site .figures time').count()) > 0 ? true : undefined;
      },
      60_000,
      'a site to show its units reporting',
    );
    const sites = await page.locator('section.site').count();
    const units = Number(/(\d+) units? on/.exec((await page.locator('[data-testid="fleet-summary"]').textContent()) ?? '')?.[1] ?? 0);
    expect(sites).toBeGreaterThanOrEqual(3);
    expect(units).toBeGreaterThanOrEqual(10);
    await expect(page.locator('footer.caution').textContent()).resolves.toContain('makes voltage whenever its shaft turns');
    mkdirSync('test-results', { recursive: true });
    await page.screenshot({ path: `test-results/fleet-${realDatabaseUrl ? 'postgres' : 'pglite'}.png`, fullPage: true });
    await page.close();
  });

  it('shows an operator a bad message set aside, with its reason', async () => {
    const brokerUrl = product.env.MQTT_URL ?? `mqtt://127.0.0.1:${product.env.MQTT_PORT}`;
    // Signed in as the demo unit itself (the embedded broker refuses anonymous devices).
    const client = await mqtt.connectAsync(brokerUrl, { clientId: `bad-device-${product.port}`, ...demoDeviceCredentials(product, 'quorvenna-ildresk', 'qv-01') });
    await client.publishAsync('millrace/quorvenna-ildresk/qv-01/telemetry', JSON.stringify({ ts: Date.now(), rpm: 200, vab: 'abc' }), { qos: 1 });
    await client.endAsync();
    const html = await eventually(
      async () => {
        const text = await (await product.fetch(product.url)).text();
        return text.includes('vab: expected a number of volts') ? text : undefined;
      },
      30_000,
      'the bad sample to show as set aside',
    );
    expect(html).toContain('Telemetry set aside');
    expect(html).toContain('millrace/quorvenna-ildresk/qv-01/telemetry');
  });
});
