/**
 * The alert list in a browser, against the built product: an operator ticks
 * an alert on /alerts, acknowledges it with a note, and the page then shows
 * it acknowledged by them; the list and the alert's page (with its safety
 * caution) do not scroll sideways at 360 px. Screenshots at 1440 and 360 px
 * land in test-results/. The alert is stored before the start: an offline
 * alert of a unit that never sent a sample, which the evaluator keeps open.
 */
import { eq } from 'drizzle-orm';
import type { BrowserContext } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDatabase } from '@/db/client';
import { units } from '@/db/schema';
import { openAlert } from '@/lib/alerts/lifecycle';
import { insertAlert } from '@/lib/alerts/store';
import { addTestAccount, signInPage, type TestAccount } from '@/test/support/accounts';
import { testFleet, testTag } from '@/test/support/ingest';
import { startProductProcess, type RunningProduct } from '@/test/support/product';
import { chromium, launchChromium, skipUnless } from '@/test/support/services';
import { screenshots } from './browser';
import { prepareProduct, type PreparedProduct } from './prepare';

const tag = testTag();
const fleet = testFleet(tag, { windUnits: 1, hydroUnits: 0 });
const unit = fleet.units[0]!;

let prepared: PreparedProduct;
let product: RunningProduct;
let browser: BrowserContext;
let operator: TestAccount;
let alertId = 0;

describe.skipIf(skipUnless(chromium, 'the alert list in a browser'))('alert list in a browser', () => {
  beforeAll(async () => {
    prepared = await prepareProduct(fleet, []);
    operator = await addTestAccount(prepared.env, { email: `operator-${tag}@test.invalid`, password: 'penstock gate wheel', role: 'operator', sites: [] });
    const handle = await openDatabase({ url: prepared.env.DATABASE_URL, dataDir: prepared.env.DATA_DIR });
    try {
      const [row] = await handle.db.select({ key: units.key }).from(units).where(eq(units.id, unit.id));
      const nowMs = Date.now();
      const opening = { unitKey: row!.key, condition: 'offline', severity: 'warning', message: 'The unit has never sent a sample.', value: null, limit: 15 } as const;
      alertId = (await insertAlert({ db: handle.db, opening, step: openAlert(nowMs), nowMs }))!.id;
    } finally {
      await handle.close();
    }
    product = await startProductProcess({ DEMO: 'off', ...prepared.env });
    browser = await launchChromium({ width: 1440, height: 900 });
  }, 300_000);

  afterAll(async () => {
    await browser?.close();
    await product?.stop();
    await prepared?.cleanUp();
  }, 60_000);

  it('lets an operator acknowledge an alert with a note, and shows it acknowledged', async () => {
    const page = await browser.newPage();
    const errors: string[] = [];
    page.on('console', (m) => {
      if (m.type() === 'error') errors.push(m.text());
    });
    await signInPage(page, product.url, operator);
    await page.goto(`${product.url}/alerts`, { waitUntil: 'load' });
    const card = page.locator(`li[data-alert="${alertId}"]`);
    await expect(card.getAttribute('data-state')).resolves.toBe('active');
    expect(await screenshots(page, 'alerts-list')).toEqual([]);
    await card.locator('input[type="checkbox"][name="alertId"]').check();
    await page.locator('#acknowledge-selected-note').fill('Checking the logger link.');
    await page.getByRole('button', { name: 'Acknowledge selected' }).click();
    await page.locator('[role="status"]', { hasText: 'Acknowledged one alert.' }).waitFor({ timeout: 10_000 });
    await page.locator(`li[data-alert="${alertId}"][data-state="acknowledged"]`).waitFor({ timeout: 10_000 });
    const text = (await page.locator(`li[data-alert="${alertId}"]`).textContent()) ?? '';
    expect(text).toContain('Acknowledged');
    expect(text).toContain(operator.email);
    expect(text).toContain('Checking the logger link.');
    expect(await screenshots(page, 'alerts-list-acknowledged')).toEqual([]);

    await page.goto(`${product.url}/alerts/${alertId}`, { waitUntil: 'load' });
    await expect(page.locator('[data-testid="safety-caution"]').textContent()).resolves.toContain('makes voltage whenever its shaft turns');
    await expect(page.locator('h2', { hasText: 'History, oldest first' }).count()).resolves.toBe(1);
    expect(await screenshots(page, 'alert-page')).toEqual([]);
    expect(errors).toEqual([]);
    await page.close();
  }, 120_000);
});
