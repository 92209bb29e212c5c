/**
 * Command-line tests run `npx millrace` as a user does: the bin in a data
 * folder of the test's own, with its exit status and both outputs, never
 * against a database the environment points at.
 */
import { execFile } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';

const run = promisify(execFile);
const bin = fileURLToPath(new URL('../../bin/millrace.mjs', import.meta.url));

export interface CliRun {
  status: number;
  out: string;
  err: string;
}

/** Runs `millrace ARGS` with DATA_DIR `dataDir` and `env` on top; DATABASE_URL (and unset variables of `env`) left out. */
export async function runMillrace(args: readonly string[], dataDir: string, env: Record<string, string> = {}): Promise<CliRun> {
  const childEnv: NodeJS.ProcessEnv = { ...process.env, DATA_DIR: dataDir, LOG_LEVEL: 'warn', ...env };
  delete childEnv.DATABASE_URL;
  for (const [key, value] of Object.entries(env)) if (!value) delete childEnv[key];
  try {
    const { stdout, stderr } = await run(process.execPath, [bin, ...args], { env: childEnv });
    return { status: 0, out: stdout, err: stderr };
  } catch (error) {
    const e = error as { code: number; stdout: string; stderr: string };
    return { status: e.code, out: e.stdout, err: e.stderr };
  }
}
