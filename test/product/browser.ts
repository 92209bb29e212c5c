/**
 * Browser pieces of the setup and live tests: Chromium through
 * playwright-core with our machines' flags, screenshots at desk and phone
 * width, and the check that a page does not scroll sideways.
 */
import { mkdirSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium as playwright, type BrowserContext, type Page } from 'playwright-core';
import { chromium } from '@/test/support/services';

/** A fresh Chromium profile, headless. */
export function launchBrowser(): Promise<BrowserContext> {
  return playwright.launchPersistentContext(mkdtempSync(join(tmpdir(), 'millrace-chromium-')), {
    executablePath: chromium.location!,
    headless: true,
    viewport: { width: 1440, height: 900 },
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--no-first-run',
    ],
  });
}

/** Widths the screens are looked at: a desk and a phone. */
export const WIDTHS = [1440, 360] as const;

/** Whether the page scrolls sideways at its current width (it must not). */
export async function scrollsSideways(page: Page): Promise<boolean> {
  return page.evaluate(() => document.documentElement.scrollWidth > document.documentElement.clientWidth + 1);
}

/** Full-page screenshots of `page` at each width into test-results/<name>-<width>.png; resolves to the widths that scroll sideways. */
export async function screenshots(page: Page, name: string): Promise<number[]> {
  mkdirSync('test-results', { recursive: true });
  const sideways: number[] = [];
  for (const width of WIDTHS) {
    await page.setViewportSize({ width, height: width === 360 ? 780 : 900 });
    await page.waitForTimeout(150);
    if (await scrollsSideways(page)) sideways.push(width);
    await page.screenshot({ path: `test-results/${name}-${width}.png`, fullPage: true });
  }
  await page.setViewportSize({ width: 1440, height: 900 });
  return sideways;
}
