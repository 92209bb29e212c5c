/**
 * The operators' screens in a browser, against `npm start` with the demo
 * fleet: the fleet page puts faulty units first with their reasons, a click
 * leads to a site and a unit, the unit's voltage-against-speed chart has its
 * points and the nameplate line, and no page scrolls sideways at 360 px.
 * Screenshots of each screen at 1440 and 360 px land in test-results/.
 * The faulty units are found on the page and checked against the read API,
 * never named here (the demo fleet's names may change).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BrowserContext, Page } from 'playwright-core';
import { eventually, startProductProcess, type RunningProduct } from '@/test/support/product';
import { chromium, launchChromium, skipUnless } from '@/test/support/services';
import { screenshots, scrollsSideways } from './browser';

const FAULT_VERDICTS = ['demagnetised', 'shorted-turns', 'speed-sensor-fault'];

let product: RunningProduct;
let browser: BrowserContext;

describe.skipIf(skipUnless(chromium, 'dashboard screens in a browser'))('dashboard screens', () => {
  beforeAll(async () => {
    // Diagnose every few seconds so the demo's faults show soon after its history arrives.
    product = await startProductProcess({ DEMO: 'on', DIAGNOSIS_INTERVAL_S: '5' });
    browser = await launchChromium({ width: 1440, height: 900 });
  }, 300_000);

  afterAll(async () => {
    await browser?.close();
    await product?.stop();
  }, 60_000);

  /** The fleet page once the demo's faults have been diagnosed. */
  async function fleetWithFaults(page: Page): Promise<void> {
    await eventually(
      async () => {
        await page.goto(product.url, { waitUntil: 'load' });
        return (await page.locator('.attention li[data-state="fault"]').count()) >= 2 ? true : undefined;
      },
      180_000,
      'the demo fleet’s faults to be diagnosed',
    );
  }

  it('puts the faulty units first, each with its reason in words', async () => {
    const page = await browser.newPage();
    await product.signIn(page);
    await fleetWithFaults(page);
    const worst = await page.locator('section.site').evaluateAll((els) => els.map((e) => e.getAttribute('data-worst')));
    const order = ['fault', 'warning', 'no-data', 'not-judged', 'healthy'];
    // Sites worst first: the ranks never go back up.
    const ranks = worst.map((w) => order.indexOf(w ?? 'healthy'));
    expect(ranks[0]).toBe(0);
    expect([...ranks].sort((a, b) => a - b)).toEqual(ranks);
    // Within a site the faulty units come first, each with a reason.
    const sites = await page.locator('section.site').all();
    for (const site of sites) {
      const states = await site.locator('.attention li').evaluateAll((els) => els.map((e) => e.getAttribute('data-state')));
      const stateRanks = states.map((s) => order.indexOf(s ?? 'healthy'));
      expect([...stateRanks].sort((a, b) => a - b)).toEqual(stateRanks);
    }
    const faults = await page.locator('.attention li[data-state="fault"]').all();
    for (const li of faults) {
      const reason = (await li.locator('.why').textContent())?.trim() ?? '';
      expect(reason.length).toBeGreaterThan(15);
      // The page's fault agrees with the read API: a fault verdict, or an alarm finding.
      const href = (await li.locator('a').getAttribute('href')) as string;
      const [, siteId, unitId] = /\/sites\/([^/]+)\/units\/([^/]+)$/.exec(href) ?? [];
      const health = (await (await product.fetch(`${product.url}/api/v1/units/${siteId}/${unitId}/health`)).json()) as {
        verdict: string;
        findings: Array<{ severity: string }>;
      };
      expect(FAULT_VERDICTS.includes(health.verdict) || health.findings.some((f) => f.severity === 'alarm')).toBe(true);
    }
    // Counts in words and shapes, a caution at the foot.
    await expect(page.locator('[data-testid="fleet-summary"]').textContent()).resolves.toMatch(/\d+ units? on \d+ sites?/);
    await expect(page.locator('footer.caution').textContent()).resolves.toContain('makes voltage whenever its shaft turns');
    expect(await screenshots(page, 'dashboard-fleet')).toEqual([]);
    await page.close();
  }, 240_000);

  it('leads from the fleet to a site and a unit; the unit shows its evidence, findings and caution', async () => {
    const page = await browser.newPage();
    await product.signIn(page);
    await fleetWithFaults(page);
    // A unit whose verdict is a fault of the machine (so its findings send a crew).
    let target: { siteId: string; unitId: string } | undefined;
    for (const li of await page.locator('.attention li[data-state="fault"]').all()) {
      const href = (await li.locator('a').getAttribute('href')) as string;
      const [, siteId, unitId] = /\/sites\/([^/]+)\/units\/([^/]+)$/.exec(href) ?? [];
      const health = (await (await product.fetch(`${product.url}/api/v1/units/${siteId}/${unitId}/health`)).json()) as { verdict: string };
      if (FAULT_VERDICTS.includes(health.verdict)) {
        target = { siteId: siteId as string, unitId: unitId as string };
        break;
      }
    }
    expect(target).toBeDefined();
    const { siteId, unitId } = target!;

    await page.locator(`section.site[data-site="${siteId}"] h2 a`).click();
    await page.waitForURL(`**/sites/${siteId}`);
    const row = page.locator(`table.site-units tr[data-unit="${unitId}"]`);
    await expect(row.getAttribute('data-state')).resolves.toBe('fault');
    // The site's worst unit is first by default.
    await expect(page.locator('table.site-units tbody tr').first().getAttribute('data-state')).resolves.toBe('fault');
    expect(await screenshots(page, 'dashboard-site')).toEqual([]);

    // Filter and sort by search parameters (plain links and a GET form, no script needed); a bad one is named.
    await page.goto(`${product.url}/sites/${siteId}?state=fault&sort=ke&dir=asc`, { waitUntil: 'load' });
    const states = await page.locator('table.site-units tbody tr[data-unit]').evaluateAll((els) => els.map((e) => e.getAttribute('data-state')));
    expect(states.length).toBeGreaterThan(0);
    expect(states.every((st) => st === 'fault')).toBe(true);
    await page.goto(`${product.url}/sites/${siteId}?sort=colour`, { waitUntil: 'load' });
    await expect(page.locator('[data-testid="param-problems"]').textContent()).resolves.toContain('sort: "colour" is not one of');
    await page.goto(`${product.url}/sites/${siteId}`, { waitUntil: 'load' });

    await row.locator('td.card-title a').click();
    await page.waitForURL(`**/sites/${siteId}/units/${unitId}`);
    await expect(page.locator('h1').textContent()).resolves.toContain(unitId);
    const findings = page.locator('[data-testid="findings"]');
    await expect(findings.locator('li[data-severity="alarm"]').count()).resolves.toBeGreaterThan(0);
    // The safety caution is on the page in full view, not folded away.
    const caution = findings.locator('[data-testid="safety-caution"]').first();
    await caution.waitFor({ state: 'visible', timeout: 10_000 });
    await expect(caution.textContent()).resolves.toContain('makes voltage whenever its shaft turns');
    await expect(page.locator('[data-testid="diagnosed-when"]').textContent()).resolves.toMatch(/Diagnosed .* from the samples of .* to .*samples used/);

    // recharts draws after hydration: wait for the symbols.
    const chart = page.locator('[data-testid="emf-chart"]');
    await chart.locator('.recharts-scatter-symbol').first().waitFor({ timeout: 15_000 });
    expect(await chart.locator('.recharts-scatter-symbol').count()).toBeGreaterThan(30);
    expect(await chart.locator('.recharts-reference-line.nameplate-line line').count()).toBe(1);
    await expect(page.locator('[data-testid="emf-summary"]').textContent()).resolves.toContain('nameplate Ke moved to the magnet temperature');
    await expect(chart.locator('.recharts-cartesian-axis-label, .recharts-label').allTextContents()).resolves.toEqual(
      expect.arrayContaining(['Speed, rpm', 'Line voltage, V']),
    );
    expect(await screenshots(page, 'dashboard-unit')).toEqual([]);

    // The time range links go through the rollups beyond a day.
    await page.locator('a[href^="?range=30d"]').click();
    await page.waitForURL('**range=30d**');
    await expect(page.locator('#series-heading ~ p.note').first().textContent()).resolves.toContain('10-minute rollups');
    await page.close();
  }, 240_000);

  it('does not scroll sideways at 360 px on any of the three screens', async () => {
    const page = await browser.newPage();
    await product.signIn(page);
    await page.setViewportSize({ width: 360, height: 780 });
    await fleetWithFaults(page);
    expect(await scrollsSideways(page)).toBe(false);
    const unitHref = (await page.locator('.attention li a').first().getAttribute('href')) as string;
    const siteHref = unitHref.replace(/\/units\/.*$/, '');
    for (const path of [siteHref, unitHref]) {
      await page.goto(`${product.url}${path}`, { waitUntil: 'load' });
      await page.waitForTimeout(500);
      expect(await page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth), path).toBe(true);
    }
    await page.close();
  }, 240_000);
});
