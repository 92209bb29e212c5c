/**
 * A Mosquitto of the test's own, started from the configuration millrace
 * ships (the inline `configs.mosquitto_conf` of docker-compose.yml) with only
 * the listener port and the persistence folder changed, so a test can stop,
 * kill and restart it.
 *
 * Access: given `auth` (the files `npx millrace device export-broker-auth`
 * writes), the shipped password_file and acl_file lines point at them and
 * anonymous access stays off, exactly as shipped. Without it the broker is
 * opened for tests that have no accounts (the ingest tests): allow_anonymous
 * true and no password or ACL file, stated in the call, never a default of
 * the shipped text.
 */
import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import { chownSync, closeSync, mkdtempSync, openSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { connect } from 'node:net';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parse } from 'yaml';
import { freePort } from '@/lib/net/ports';

import { mosquitto } from './services';

/**
 * The Mosquitto binary found by test/support/services.ts (MOSQUITTO_BIN, PATH,
 * /usr/sbin); undefined when there is none. Guard tests with
 * `skipUnless(mosquitto, ...)`.
 */
export const MOSQUITTO_BIN: string | undefined = mosquitto.location;

const ROOT = resolve(fileURLToPath(new URL('.', import.meta.url)), '../..');

/** The shipped configuration text. */
export function shippedMosquittoConf(): string {
  const compose = parse(readFileSync(join(ROOT, 'docker-compose.yml'), 'utf8')) as {
    configs?: { mosquitto_conf?: { content?: string } };
  };
  const content = compose.configs?.mosquitto_conf?.content;
  if (typeof content !== 'string') throw new Error('docker-compose.yml has no configs.mosquitto_conf.content');
  return content;
}

/** Where a test broker's accounts come from: the exported files, or none (anonymous, for tests without accounts). */
export type TestMosquittoAuth = { passwordFile: string; aclFile: string } | 'open-for-tests';

/** The shipped configuration with the test's port, folder and account files (and nothing else) changed. */
export function testMosquittoConf(port: number, dataDir: string, auth: TestMosquittoAuth): string {
  const conf = shippedMosquittoConf();
  if (!/^listener\s+1883\b.*$/m.test(conf)) throw new Error('the shipped Mosquitto configuration has no "listener 1883" line');
  if (!/^persistence_location\s+.*$/m.test(conf)) throw new Error('the shipped Mosquitto configuration has no persistence_location line');
  for (const line of [/^allow_anonymous false$/m, /^password_file\s+\S+$/m, /^acl_file\s+\S+$/m]) {
    if (!line.test(conf)) throw new Error(`the shipped Mosquitto configuration has no ${line.source} line`);
  }
  const withAuth =
    auth === 'open-for-tests'
      ? conf
          .replace(/^allow_anonymous false$/m, 'allow_anonymous true')
          .replace(/^password_file\s+\S+$/m, '')
          .replace(/^acl_file\s+\S+$/m, '')
      : conf.replace(/^password_file\s+\S+$/m, `password_file ${auth.passwordFile}`).replace(/^acl_file\s+\S+$/m, `acl_file ${auth.aclFile}`);
  return withAuth
    .replace(/^listener\s+1883\b.*$/m, `listener ${port} 127.0.0.1`)
    .replace(/^persistence_location\s+.*$/m, `persistence_location ${dataDir}/`);
}

export interface TestMosquitto {
  url: string;
  port: number;
  dir: string;
  /** Stops it cleanly (SIGTERM: it saves its persistence file). */
  stop(): Promise<void>;
  /** Stops it as a crash would (SIGKILL). */
  kill(): Promise<void>;
  /** Starts it again on the same port and folder. */
  start(): Promise<void>;
  /** Stops it and removes its folder. */
  dispose(): Promise<void>;
  /** Its log so far. */
  log(): string;
  /** Sends SIGHUP: Mosquitto reads its password and ACL files again. */
  reload(): void;
}

function waitForPort(port: number, timeoutMs: number): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  return new Promise((resolvePromise, reject) => {
    const attempt = () => {
      const socket = connect({ port, host: '127.0.0.1' });
      socket.once('connect', () => {
        socket.destroy();
        resolvePromise();
      });
      socket.once('error', () => {
        socket.destroy();
        if (Date.now() > deadline) reject(new Error(`mosquitto did not listen on port ${port}`));
        else setTimeout(attempt, 50);
      });
    };
    attempt();
  });
}

/** Starts a Mosquitto with the shipped configuration on a free port (`bin`: another binary than the one found). */
export async function startMosquitto({ bin = MOSQUITTO_BIN, auth }: { bin?: string; auth: TestMosquittoAuth }): Promise<TestMosquitto> {
  const port = await freePort();
  const dir = mkdtempSync(join(tmpdir(), 'millrace-mosquitto-'));
  const confPath = join(dir, 'mosquitto.conf');
  const logPath = join(dir, 'mosquitto.log');
  writeFileSync(confPath, testMosquittoConf(port, dir, auth));
  // Started as root, Mosquitto runs as the user "mosquitto": let it write its persistence file here.
  if (process.getuid?.() === 0) {
    try {
      const uid = Number(execFileSync('id', ['-u', 'mosquitto'], { encoding: 'utf8' }).trim());
      const gid = Number(execFileSync('id', ['-g', 'mosquitto'], { encoding: 'utf8' }).trim());
      chownSync(dir, uid, gid);
    } catch {
      // No such user: Mosquitto keeps running as root.
    }
  }
  let child: ChildProcess | undefined;

  const start = async () => {
    if (!bin) throw new Error(`cannot start Mosquitto: ${mosquitto.missing}`);
    const out = openSync(logPath, 'a');
    child = spawn(bin, ['-c', confPath], { stdio: ['ignore', out, out] });
    closeSync(out);
    const started = child;
    // A spawn failure (ENOENT, EACCES) is an 'error' event: without a listener it
    // would escape as an unhandled error; it rejects start() instead.
    const failed = new Promise<never>((_, reject) =>
      started.once('error', (error: NodeJS.ErrnoException) =>
        reject(new Error(`cannot start Mosquitto (${bin}): ${error.code === 'ENOENT' ? 'no such file' : error.message}`)),
      ),
    );
    failed.catch(() => {});
    // A test that fails before dispose() must not leave its broker running.
    const killOnExit = () => started.kill('SIGKILL');
    process.once('exit', killOnExit);
    started.once('exit', () => process.off('exit', killOnExit));
    const exited = new Promise<never>((_, reject) =>
      child!.once('exit', (code) => reject(new Error(`mosquitto (${bin}) exited with ${code}: ${readFileSync(logPath, 'utf8').slice(-2000)}`))),
    );
    exited.catch(() => {});
    await Promise.race([waitForPort(port, 10_000), exited, failed]);
  };
  const end = async (signal: NodeJS.Signals) => {
    const c = child;
    child = undefined;
    if (!c || c.exitCode !== null) return;
    await new Promise<void>((resolvePromise) => {
      c.once('exit', () => resolvePromise());
      c.kill(signal);
    });
  };
  try {
    await start();
  } catch (error) {
    rmSync(dir, { recursive: true, force: true });
    throw error;
  }
  return {
    url: `mqtt://127.0.0.1:${port}`,
    port,
    dir,
    start,
    stop: () => end('SIGTERM'),
    kill: () => end('SIGKILL'),
    dispose: async () => {
      await end('SIGTERM');
      rmSync(dir, { recursive: true, force: true });
    },
    log: () => readFileSync(logPath, 'utf8'),
    reload: () => {
      child?.kill('SIGHUP');
    },
  };
}
