// Builds the web app when there is no current build: no .next, or sources
// changed since the last build. Used by `npm start` and by the test setup.
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

export const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');

// What the build is made from; a change to any of these makes the build stale.
const SOURCES = ['app', 'lib', 'db', 'next.config.js', 'package.json', 'package-lock.json', 'tsconfig.json'];

function* files(path) {
  const full = join(root, path);
  if (!existsSync(full)) return;
  const stat = statSync(full);
  if (stat.isFile()) {
    if (!/\.test\.tsx?$/.test(path) && !/\.md$/.test(path)) yield [path, stat];
    return;
  }
  for (const name of readdirSync(full).sort()) yield* files(join(path, name));
}

function sourceStamp() {
  const hash = createHash('sha256');
  for (const source of SOURCES) for (const [path, stat] of files(source)) hash.update(`${path}:${stat.size}:${stat.mtimeMs}\n`);
  return hash.digest('hex');
}

/** Builds when needed; returns true if it built. Exits the process when the build fails. */
export function ensureBuild({ log = (line) => process.stdout.write(line) } = {}) {
  process.env.NEXT_TELEMETRY_DISABLED ??= '1';
  const stampFile = join(root, '.next', 'millrace-build-stamp');
  const stamp = sourceStamp();
  const current = existsSync(join(root, '.next', 'BUILD_ID')) && existsSync(stampFile) && readFileSync(stampFile, 'utf8') === stamp;
  if (current) return false;
  log('millrace: building the web app (first start, or the sources changed) ...\n');
  const result = spawnSync(process.execPath, [join(root, 'node_modules', 'next', 'dist', 'bin', 'next'), 'build'], {
    cwd: root,
    stdio: ['ignore', 'inherit', 'inherit'],
    env: process.env,
  });
  if (result.status !== 0) {
    process.stderr.write('millrace: the web app did not build; see the messages above\n');
    process.exit(result.status ?? 1);
  }
  writeFileSync(stampFile, stamp);
  return true;
}
