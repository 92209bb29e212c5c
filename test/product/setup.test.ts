/**
 * The setup and data-quality screens in Chromium against `npm start` (the
 * whole product in one process, demo fleet off): a unit form refuses odd
 * poles with the message beside the field and keeps what was typed, then
 * saves the corrected unit; a FLEET.json with one bad entry changes nothing
 * and shows that entry's problem, in the words of `npx millrace units
 * import`; bad telemetry shows on the data-quality screen. Screenshots of
 * each screen at 1440 and 360 px go to test-results/.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import mqtt from 'mqtt';
import type { BrowserContext, Page } from 'playwright-core';
import { eventually, startProductProcess, type RunningProduct } from '@/test/support/product';
import { chromium, skipUnless } from '@/test/support/services';
import { testFleet, testTag } from '@/test/support/ingest';
import { launchBrowser, screenshots } from './browser';
import { prepareProduct, type PreparedProduct } from './prepare';

const tag = testTag();
const site = { id: `tarn-edge-${tag}`, name: `Tarn Edge ${tag}`, timezone: 'Europe/Oslo' };
const unitId = `te-${tag}-01`;
/** A unit registered before the start, with an MQTT account, to send bad telemetry as a device would. */
const sender = testFleet(`${tag}s`, { windUnits: 1, hydroUnits: 0 });
const senderUnit = sender.units[0]!;

describe.skipIf(skipUnless(chromium, 'setup screens in a browser'))('setup screens (npm start, Chromium)', () => {
  let prepared: PreparedProduct;
  let product: RunningProduct;
  let browser: BrowserContext;
  let page: Page;
  const sideways: string[] = [];

  const shoot = async (name: string) => {
    for (const width of await screenshots(page, name)) sideways.push(`${name} at ${width} px`);
  };
  const fleetNow = async () => (await (await product.fetch(`${product.url}/setup/export`)).json()) as { sites: Array<{ id: string }>; units: Array<{ id: string; poles: number }> };

  beforeAll(async () => {
    prepared = await prepareProduct(sender, [senderUnit]);
    product = await startProductProcess({ DEMO: 'off', ...prepared.env });
    browser = await launchBrowser();
    page = await browser.newPage();
    await product.signIn(page);
  }, 300_000);

  afterAll(async () => {
    await browser?.close();
    await product?.stop();
    await prepared?.cleanUp();
  }, 60_000);

  it('lists the sites and units registered before, with what can be done', async () => {
    await page.goto(`${product.url}/setup`);
    await page.locator('main h1').waitFor();
    await expect(page.locator('h1').textContent()).resolves.toBe('Setup');
    const main = (await page.locator('main').textContent())!;
    expect(main).toContain(sender.sites[0]!.name);
    expect(main).toContain(senderUnit.id);
    for (const action of ['Add a site', 'Import FLEET.json', 'Download FLEET.json']) expect(main).toContain(action);
  });

  it('adds a site through its form', async () => {
    await page.goto(`${product.url}/setup/sites/new`);
    await page.fill('#field-id', site.id);
    await page.fill('#field-name', site.name);
    await page.fill('#field-timezone', 'Mars/Olympus');
    await page.click('main button[type=submit]');
    await page.waitForSelector('#field-timezone-error');
    await expect(page.locator('#field-timezone-error').textContent()).resolves.toContain('must be an IANA time zone such as Europe/Oslo, got "Mars/Olympus"');
    await expect(page.locator('#field-name').inputValue()).resolves.toBe(site.name);
    await shoot('setup-site-invalid');
    await page.fill('#field-timezone', site.timezone);
    await page.click('main button[type=submit]');
    await page.waitForURL(`**/setup/sites/${site.id}?saved=created`);
    await expect(page.locator('[role=status]').first().textContent()).resolves.toContain('Site added');
    await shoot('setup-site-edit');
  });

  it('refuses odd poles with the message beside the field, keeps what was typed, then saves the corrected unit', async () => {
    await page.goto(`${product.url}/setup/units/new?site=${site.id}`);
    await page.fill('#field-id', unitId);
    await page.fill('#field-ratedKw', '6');
    await page.fill('#field-ratedRpm', '280');
    await page.fill('#field-maxRpm', '420');
    await page.fill('#field-poles', '7');
    await page.fill('#field-keVPerKrpm', '1100');
    await page.fill('#field-phaseOhm', '0.55');
    await page.fill('#field-cutInMs', '3');
    await page.fill('#field-cutOutMs', '24');
    await page.fill('#field-rotorDiameterM', '5.5');
    await page.fill('#field-powerCurve', '3 0.1\n7 2\n11 6');
    await page.click('main button[type=submit]');
    await page.waitForSelector('#field-poles-error');
    // Beside the field, tied to it, and the field takes focus.
    await expect(page.locator('#field-poles-error').textContent()).resolves.toBe('must be an even number, got 7');
    await expect(page.locator('#field-poles').getAttribute('aria-invalid')).resolves.toBe('true');
    await expect(page.locator('#field-poles').getAttribute('aria-describedby')).resolves.toContain('field-poles-error');
    await expect(page.evaluate(() => document.activeElement?.id)).resolves.toBe('field-poles');
    await expect(page.locator('form [role=alert]').textContent()).resolves.toContain('nothing was saved');
    // What was typed is still there.
    await expect(page.locator('#field-ratedKw').inputValue()).resolves.toBe('6');
    await expect(page.locator('#field-powerCurve').inputValue()).resolves.toBe('3 0.1\n7 2\n11 6');
    expect((await fleetNow()).units.map((u) => u.id)).toEqual([senderUnit.id]);
    await shoot('setup-unit-invalid');

    await page.fill('#field-poles', '18');
    await page.click('main button[type=submit]');
    await page.waitForURL(`**/setup/units/${site.id}/${unitId}?saved=created`);
    await expect(page.locator('[role=status]').first().textContent()).resolves.toContain('Unit added');
    await expect(page.locator('#field-poles').inputValue()).resolves.toBe('18');
    expect((await fleetNow()).units.find((u) => u.id === unitId)).toMatchObject({ id: unitId, poles: 18 });
    await shoot('setup-unit-edit');
    await page.goto(`${product.url}/setup`);
    await shoot('setup-list');
  });

  it('imports nothing from a FLEET.json with one bad entry, and shows that entry’s problem', async () => {
    const fleet = JSON.parse(JSON.stringify(testFleet(tag, { windUnits: 2, hydroUnits: 1 }))) as { units: Array<Record<string, unknown>> };
    fleet.units[1]!.poles = 7;
    const before = await fleetNow();
    await page.goto(`${product.url}/setup/import`);
    await shoot('setup-import');
    await page.setInputFiles('#fleet-file', { name: 'FLEET.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(fleet)) });
    await page.click('button[value=import]');
    const entry = page.locator('[data-entry="units[1]"]');
    await entry.waitFor();
    await expect(entry.getAttribute('data-action')).resolves.toBe('invalid');
    await expect(entry.textContent()).resolves.toContain('units[1].poles: must be an even number, got 7');
    await expect(page.locator('#import-result').textContent()).resolves.toContain('1 problem, nothing was changed');
    expect(await fleetNow()).toEqual(before);
    await shoot('setup-import-invalid');

    // Corrected: checked first (nothing changes), then imported as checked.
    fleet.units[1]!.poles = 18;
    await page.setInputFiles('#fleet-file', { name: 'FLEET.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(fleet)) });
    await page.click('button[value=check]');
    await page.waitForSelector('#import-result:has-text("is valid")');
    await expect(page.locator('[data-entry="units[1]"]').textContent()).resolves.toContain('will be added');
    expect(await fleetNow()).toEqual(before);
    await shoot('setup-import-checked');
    await page.click('button:has-text("Import the checked")');
    await page.waitForSelector('#import-result:has-text("Imported")');
    await expect(page.locator('#import-result').textContent()).resolves.toContain('sites 2 added, 0 updated; units 3 added, 0 updated');
    expect((await fleetNow()).units).toHaveLength(5);
  });

  it('shows telemetry set aside on the data-quality screen, with its reason and payload', async () => {
    const brokerUrl = product.env.MQTT_URL ?? `mqtt://127.0.0.1:${product.env.MQTT_PORT}`;
    const topic = `millrace/${senderUnit.siteId}/${senderUnit.id}/telemetry`;
    const client = await mqtt.connectAsync(brokerUrl, { clientId: `bad-device-${tag}`, ...prepared.credentials.get(`${senderUnit.siteId}/${senderUnit.id}`) });
    await client.publishAsync(topic, JSON.stringify({ ts: Date.now(), rpm: -40, vab: 230 }), { qos: 1 });
    await client.publishAsync(topic, '<b>not json</b>', { qos: 1 });
    await client.endAsync();
    await eventually(
      async () => {
        await page.goto(`${product.url}/data-quality?site=${senderUnit.siteId}&unit=${senderUnit.id}`);
        return (await page.locator('main').textContent())?.includes('payload is not JSON') ? true : undefined;
      },
      30_000,
      'the bad messages to show as set aside',
    );
    const main = (await page.locator('main').textContent())!;
    expect(main).toContain('rpm: -40 rev/min is below 0, outside physical sense');
    expect(main).toContain(`${senderUnit.siteId}/${senderUnit.id}`);
    // The payload is shown as text, not markup.
    await page.locator('details summary').first().click();
    await expect(page.locator('pre', { hasText: '<b>not json</b>' }).count()).resolves.toBe(1);
    await expect(page.locator('main b', { hasText: 'not json' }).count()).resolves.toBe(0);
    await shoot('data-quality');
  });

  it('no screen scrolls sideways at 360 px', () => {
    expect(sideways).toEqual([]);
  });
});
