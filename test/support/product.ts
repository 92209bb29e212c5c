/**
 * Starts the product the way a user does (`node bin/start.mjs`, which is
 * `npm start`), on free ports and a throw-away data folder, and stops it.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { freePort } from '@/lib/net/ports';
import type { Page } from 'playwright-core';
import { addTestAccount, signInPage, TEST_ADMIN, type TestAccount } from './accounts';
import { createPostgresDatabase, realBrokerUrl, realDatabaseUrl } from './backend';

export interface RunningProduct {
  url: string;
  port: number;
  env: Record<string, string>;
  output(): string;
  stop(): Promise<void>;
  /** The admin made before the start (test/support/accounts.ts), unless asked for nobody. */
  admin?: TestAccount;
  /** fetch() with the admin's API token (`path` a full URL or a path of the product). */
  fetch(path: string, init?: RequestInit): Promise<Response>;
  /** Signs the page's browser context in as the admin. */
  signIn(page: Page): Promise<void>;
}

/** Starts millrace; resolves when it prints its URL (the first start also builds the app). */
export async function startProductProcess(
  extraEnv: Record<string, string> = {},
  timeoutMs = 240_000,
  { account = true }: { account?: boolean } = {},
): Promise<RunningProduct> {
  const dir = mkdtempSync(join(tmpdir(), 'millrace-product-'));
  const port = await freePort();
  const env: Record<string, string> = {
    PORT: String(port),
    MQTT_PORT: String(await freePort()),
    DATA_DIR: join(dir, 'data'),
    LOG_LEVEL: 'warn',
    NEXT_TELEMETRY_DISABLED: '1',
    INGEST_CLIENT_ID: `millrace-test-${port}`,
    // A share group of its own: on a shared broker, persistent sessions left by other
    // ingesters in the default group would take their share of this test's messages.
    INGEST_SHARE_GROUP: `millrace-test-${port}`,
    ...extraEnv,
  };
  let dropDb: (() => Promise<void>) | undefined;
  if (realDatabaseUrl && extraEnv.DATABASE_URL === undefined) {
    const created = await createPostgresDatabase(realDatabaseUrl, 'millrace_product');
    env.DATABASE_URL = created.url;
    dropDb = created.drop;
  }
  if (realBrokerUrl && extraEnv.MQTT_URL === undefined) env.MQTT_URL = realBrokerUrl;
  // Sign-in is required: an admin (and a token) made the way an operator would, before the start.
  const admin = account ? await addTestAccount(env, { ...TEST_ADMIN, role: 'admin' }) : undefined;
  const childEnv: NodeJS.ProcessEnv = { ...process.env, ...env };
  if (!env.DATABASE_URL) delete childEnv.DATABASE_URL;
  if (!env.MQTT_URL) delete childEnv.MQTT_URL;
  const child: ChildProcess = spawn(process.execPath, ['bin/start.mjs'], { cwd: process.cwd(), env: childEnv, stdio: ['ignore', 'pipe', 'pipe'] });
  let output = '';
  child.stdout!.on('data', (d) => (output += String(d)));
  child.stderr!.on('data', (d) => (output += String(d)));
  const exited = new Promise<number | null>((resolve) => {
    child.once('exit', (code) => resolve(code));
    // A spawn failure emits 'error' and no 'exit': it ends the start with its reason, never an unhandled error.
    child.once('error', (error) => {
      output += `cannot start millrace (${process.execPath}): ${error.message}\n`;
      resolve(null);
    });
  });

  const cleanUp = async () => {
    rmSync(dir, { recursive: true, force: true });
    await dropDb?.();
  };
  const served = new Promise<string>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`millrace did not start in ${timeoutMs} ms:\n${output}`)), timeoutMs);
    const poll = setInterval(() => {
      const m = /millrace is running at (http:\/\/\S+)/.exec(output);
      if (m) {
        clearInterval(poll);
        clearTimeout(timer);
        resolve(m[1]!);
      }
    }, 100);
    void exited.then((code) => {
      clearInterval(poll);
      clearTimeout(timer);
      reject(new Error(`millrace exited with ${code} before it served:\n${output}`));
    });
  });
  let url: string;
  try {
    url = await served;
  } catch (error) {
    if (child.exitCode === null) {
      child.kill('SIGKILL');
      await exited;
    }
    await cleanUp();
    throw error;
  }

  return {
    url,
    port,
    env,
    admin,
    fetch: (path, init = {}) => {
      const headers = new Headers(init.headers);
      if (admin && !headers.has('authorization')) headers.set('authorization', `Bearer ${admin.token}`);
      return fetch(path.startsWith('http') ? path : `${url}${path}`, { ...init, headers });
    },
    signIn: async (page) => {
      if (!admin) throw new Error('this product was started with nobody to sign in as');
      await signInPage(page, url, admin);
    },
    output: () => output,
    stop: async () => {
      if (child.exitCode === null) {
        child.kill('SIGTERM');
        const timer = setTimeout(() => child.kill('SIGKILL'), 15_000);
        await exited;
        clearTimeout(timer);
      }
      await cleanUp();
    },
  };
}

/** Polls `check` until it returns a value, or fails after `timeoutMs`. */
export async function eventually<T>(check: () => Promise<T | undefined>, timeoutMs: number, what: string): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  let last: unknown;
  while (Date.now() < deadline) {
    try {
      const value = await check();
      if (value !== undefined) return value;
    } catch (error) {
      last = error;
    }
    await new Promise((r) => setTimeout(r, 500));
  }
  throw new Error(`timed out waiting for ${what}${last ? `: ${String(last)}` : ''}`);
}

/**
 * The MQTT username and password of a demo unit, as the product issued them
 * at start (it writes them to DATA_DIR/demo-device-credentials.json when the
 * demo runs on the embedded broker); undefined on an outside broker.
 */
export function demoDeviceCredentials(product: RunningProduct, siteId: string, unitId: string): { username: string; password: string } | undefined {
  const file = join(product.env.DATA_DIR!, 'demo-device-credentials.json');
  if (!existsSync(file)) return undefined;
  const all = JSON.parse(readFileSync(file, 'utf8')) as Record<string, { username: string; password: string }>;
  return all[`${siteId}/${unitId}`];
}

/**
 * Issues (or rotates) a unit's device credentials the way an operator does:
 * the unit's setup page, its "Device credentials" button, the password read
 * off the page where it is shown once.
 */
export async function issueDeviceCredentialsOnScreen(
  page: { goto(url: string): Promise<unknown>; click(selector: string): Promise<void>; waitForSelector(selector: string): Promise<unknown>; textContent(selector: string): Promise<string | null> },
  product: RunningProduct,
  siteId: string,
  unitId: string,
): Promise<{ username: string; password: string }> {
  await page.goto(`${product.url}/setup/units/${siteId}/${unitId}`);
  await page.click('#device-credentials button[name=intent][value=issue]');
  await page.waitForSelector('[data-testid="device-password"]');
  const username = (await page.textContent('[data-testid="device-username"]'))?.trim();
  const password = (await page.textContent('[data-testid="device-password"]'))?.trim();
  if (!username || !password) throw new Error(`no credentials shown on the setup page of ${siteId}/${unitId}`);
  return { username, password };
}
