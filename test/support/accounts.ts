/**
 * People for product tests, made the way an operator makes them: through
 * `npx millrace user add` (password on standard input) and `token create
 * --json`, on the test's own database before the product starts (the
 * commands cannot open an embedded folder a running product holds).
 */
import { spawn } from 'node:child_process';
import type { Page } from 'playwright-core';

export interface TestAccount {
  email: string;
  password: string;
  /** An API token of the person (`Authorization: Bearer`). */
  token: string;
}

/** The admin every product test signs in as, unless it asks for nobody. */
export const TEST_ADMIN = { email: 'admin@test.invalid', password: 'tailrace sluice gate keeper' } as const;

async function millrace(args: string[], env: Record<string, string>, input?: string): Promise<string> {
  const childEnv: NodeJS.ProcessEnv = { ...process.env, ...env, LOG_LEVEL: 'warn' };
  if (!env.DATABASE_URL) delete childEnv.DATABASE_URL;
  const child = spawn(process.execPath, ['bin/millrace.mjs', ...args], { env: childEnv, cwd: process.cwd(), stdio: ['pipe', 'pipe', 'pipe'] });
  let out = '';
  let err = '';
  child.stdout.on('data', (d) => (out += String(d)));
  child.stderr.on('data', (d) => (err += String(d)));
  child.stdin.end(input ?? '');
  const code = await new Promise<number | null>((resolve) => child.once('exit', resolve));
  if (code !== 0) throw new Error(`millrace ${args.join(' ')} exited ${code}: ${err}`);
  return out;
}

/** Adds a person with `user add` and makes them a token with `token create --json`. */
export async function addTestAccount(
  env: Record<string, string>,
  person: { email: string; password: string; role: 'admin' | 'operator' | 'crew' | 'owner'; sites?: string[] },
): Promise<TestAccount> {
  await millrace(['user', 'add', '--email', person.email, '--role', person.role, ...(person.sites ?? []).flatMap((s) => ['--site', s])], env, `${person.password}\n`);
  const { token } = JSON.parse(await millrace(['token', 'create', '--email', person.email, '--name', 'tests', '--json'], env)) as { token: string };
  return { email: person.email, password: person.password, token };
}

/** Signs the page's browser context in through the sign-in form; resolves once it has left /sign-in. */
export async function signInPage(page: Page, baseUrl: string, account: { email: string; password: string }): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`);
  await page.fill('#email', account.email);
  await page.fill('#password', account.password);
  await Promise.all([page.waitForURL((u) => !u.pathname.startsWith('/sign-in'), { timeout: 60_000 }), page.click('main button[type=submit]')]);
}
