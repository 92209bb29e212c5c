/**
 * Accounts in a browser, from the first start: the demo admin's one-time
 * password from the console, the forced change of it, adding a crew member,
 * a token shown once that carries the crew member's sites and stops when
 * revoked, a wall display link that needs no sign-in, the audit log, and
 * sign-out. Every page is looked at at desk and phone width, and the
 * console must show no content-security-policy violation.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BrowserContext, Page } from 'playwright-core';
import { REFUSED_MESSAGE } from '@/lib/auth/sign-in';
import { startProductProcess, type RunningProduct } from '@/test/support/product';
import { chromium, skipUnless } from '@/test/support/services';
import { launchBrowser, screenshots } from './browser';

let product: RunningProduct;
let browser: BrowserContext;
let page: Page;
const consoleProblems: string[] = [];
const NEW_PASSWORD = 'overshot wheel bucket rim';

describe.skipIf(skipUnless(chromium, 'sign-in and people screens in a browser'))('accounts (npm start, Chromium)', () => {
  beforeAll(async () => {
    // The demo admin is made on an embedded demo start only: no DATABASE_URL, nobody made beforehand.
    product = await startProductProcess({ DEMO: 'on', DATABASE_URL: '' }, 240_000, { account: false });
    browser = await launchBrowser();
    page = await browser.newPage();
    page.on('console', (m) => {
      if (m.type() === 'error' || /Content Security Policy/i.test(m.text())) consoleProblems.push(m.text());
    });
    page.on('pageerror', (e) => consoleProblems.push(e.message));
  }, 300_000);

  afterAll(async () => {
    await browser?.close();
    await product?.stop();
  }, 60_000);

  it('prints a one-time password for the demo admin, who must choose their own at the first sign-in', async () => {
    const m = /demo admin: sign in as (\S+) with the one-time password (\S+)/.exec(product.output());
    expect(m, product.output()).not.toBeNull();
    const [, email, oneTime] = m!;
    expect(email).toBe('admin@demo.invalid');
    await page.goto(product.url);
    expect(new URL(page.url()).pathname).toBe('/sign-in');
    expect(await screenshots(page, 'sign-in')).toEqual([]);
    await page.fill('#email', email!);
    await page.fill('#password', 'not the password at all');
    await page.click('main button[type=submit]');
    await expect.poll(() => page.locator('#sign-in-problem').textContent(), { timeout: 30_000 }).toBe(REFUSED_MESSAGE);
    expect(await page.inputValue('#email')).toBe(email);
    await page.fill('#password', oneTime!);
    await Promise.all([page.waitForURL(/\/account\/password/, { timeout: 60_000 }), page.click('main button[type=submit]')]);
    expect(await screenshots(page, 'account-password')).toEqual([]);
    // Anything else leads back here until the password is changed.
    await page.goto(`${product.url}/setup`);
    expect(new URL(page.url()).pathname).toBe('/account/password');
    await page.fill('#current', oneTime!);
    await page.fill('#password', 'password1234');
    await page.fill('#again', 'password1234');
    await page.click('main button[type=submit]');
    await expect.poll(() => page.locator('#password-error').textContent(), { timeout: 30_000 }).toMatch(/common/);
    await page.fill('#current', oneTime!);
    await page.fill('#password', NEW_PASSWORD);
    await page.fill('#again', NEW_PASSWORD);
    await Promise.all([page.waitForURL((u) => u.pathname === '/setup', { timeout: 60_000 }), page.click('main button[type=submit]')]);
    await expect.poll(() => page.locator('.account-bar').textContent()).toContain('Signed in as admin@demo.invalid');
  }, 180_000);

  it('adds a crew member whose token is shown once, sees only their site, and stops when revoked', async () => {
    await page.goto(`${product.url}/admin/people`);
    const site = await page.locator('input[name=siteIds]').first().getAttribute('value');
    await page.fill('#email', 'crew.one@demo.invalid');
    await page.selectOption('#role', 'crew');
    await page.locator('input[name=siteIds]').first().check();
    await page.fill('#password', 'millpond sluice board');
    await Promise.all([page.waitForURL(/\/admin\/people\/\d+/, { timeout: 60_000 }), page.click('main form button[type=submit]')]);
    expect(await screenshots(page, 'person')).toEqual([]);
    await page.fill('input[name=name] >> nth=0', 'report script');
    await page.getByRole('button', { name: 'Make a token' }).click();
    const token = (await page.locator('[data-testid=secret]').first().textContent({ timeout: 30_000 }))!.trim();
    expect(token).toMatch(/^mrt_/);
    const sites = (await (await fetch(`${product.url}/api/v1/sites`, { headers: { authorization: `Bearer ${token}` } })).json()) as { sites: Array<{ id: string }> };
    expect(sites.sites.map((s) => s.id)).toEqual([site]);
    await page.reload();
    expect(await page.content()).not.toContain(token);
    await page.getByRole('button', { name: 'Revoke' }).first().click();
    await expect.poll(() => page.locator('text=revoked').count(), { timeout: 30_000 }).toBeGreaterThan(0);
    expect((await fetch(`${product.url}/api/v1/sites`, { headers: { authorization: `Bearer ${token}` } })).status).toBe(401);
  }, 120_000);

  it('makes a wall display link that shows the fleet read-only without signing in', async () => {
    await page.goto(`${product.url}/admin/people`);
    await page.locator('main').getByRole('link', { name: 'admin@demo.invalid' }).click();
    await page.waitForURL(/\/admin\/people\/\d+/);
    await page.locator('select[name=scope]').selectOption('fleet');
    await page.locator('input[name=name]').nth(1).fill('control room wall');
    await page.getByRole('button', { name: 'Make a display link' }).click();
    const link = (await page.locator('[data-testid=secret]').first().textContent({ timeout: 30_000 }))!.trim();
    expect(link).toMatch(/\/display\/mrd_/);
    const wall = await browser.browser()?.newContext();
    const other = wall ? await wall.newPage() : await browser.newPage();
    await other.goto(link);
    await expect.poll(() => other.locator('h1').textContent()).toBe('Fleet');
    expect(await other.locator('nav[aria-label=Main]').count()).toBe(0);
    expect(await other.locator('a[href="/setup"]').count()).toBe(0);
    expect(await screenshots(other, 'display')).toEqual([]);
    await other.close();
  }, 120_000);

  it('shows the audit log and signs out on the server', async () => {
    await page.goto(`${product.url}/admin/audit`);
    const text = await page.locator('main').textContent();
    expect(text).toContain('sign-in-failed');
    expect(text).toContain('person-added');
    expect(text).toContain('api-token-revoked');
    expect(await screenshots(page, 'audit')).toEqual([]);
    const cookie = (await browser.cookies()).find((c) => c.name.endsWith('millrace-session'))!;
    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.waitForURL(/\/sign-in/);
    // The old cookie no longer works anywhere.
    const after = await fetch(`${product.url}/setup`, { redirect: 'manual', headers: { cookie: `${cookie.name}=${cookie.value}` } });
    expect(after.status).toBe(302);
    expect(consoleProblems).toEqual([]);
  }, 120_000);
});
