/**
 * A product's data made ready before it starts, the way an operator does it
 * with the command line: the fleet registered (`units import`) and device
 * credentials issued (`device credentials SITE/UNIT --json`), so that a test
 * can publish as a unit (the embedded broker refuses anonymous clients). The
 * commands cannot open the embedded database while a product holds it, so
 * this runs first; pass `env` to startProductProcess.
 */
import { execFile } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import type { Fleet } from '@/lib/contract/nameplate';
import { createPostgresDatabase, realDatabaseUrl } from '@/test/support/backend';

const run = promisify(execFile);

export interface PreparedProduct {
  /** DATA_DIR (and DATABASE_URL on PostgreSQL) for startProductProcess. */
  env: Record<string, string>;
  /** MQTT username and password by `site/unit`. */
  credentials: Map<string, { username: string; password: string }>;
  cleanUp(): Promise<void>;
}

async function millrace(args: string[], env: Record<string, string>): Promise<string> {
  const childEnv: NodeJS.ProcessEnv = { ...process.env, ...env, LOG_LEVEL: 'warn' };
  if (!env.DATABASE_URL) delete childEnv.DATABASE_URL;
  const { stdout } = await run(process.execPath, ['bin/millrace.mjs', ...args], { env: childEnv, cwd: process.cwd() });
  return stdout;
}

/** Registers `fleet` and issues credentials for `units` in a fresh data folder (or PostgreSQL database). */
export async function prepareProduct(fleet: Fleet, units: ReadonlyArray<{ siteId: string; id: string }>): Promise<PreparedProduct> {
  const dir = mkdtempSync(join(tmpdir(), 'millrace-prepared-'));
  const env: Record<string, string> = { DATA_DIR: join(dir, 'data') };
  let drop: (() => Promise<void>) | undefined;
  if (realDatabaseUrl) {
    const created = await createPostgresDatabase(realDatabaseUrl, 'millrace_product');
    env.DATABASE_URL = created.url;
    drop = created.drop;
  }
  const file = join(dir, 'FLEET.json');
  writeFileSync(file, JSON.stringify(fleet));
  await millrace(['units', 'import', file], env);
  const credentials = new Map<string, { username: string; password: string }>();
  for (const unit of units) {
    const out = await millrace(['device', 'credentials', `${unit.siteId}/${unit.id}`, '--json'], env);
    credentials.set(`${unit.siteId}/${unit.id}`, JSON.parse(out) as { username: string; password: string });
  }
  return {
    env,
    credentials,
    cleanUp: async () => {
      rmSync(dir, { recursive: true, force: true });
      await drop?.();
    },
  };
}
