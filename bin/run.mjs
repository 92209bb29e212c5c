#!/usr/bin/env node
// Runs one of millrace's TypeScript entry points under plain Node (no build step):
// `node bin/run.mjs lib/ingest/main.ts [args...]`.
import { register } from 'tsx/esm/api';
import { pathToFileURL } from 'node:url';
import { resolve, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const entry = process.argv[2];
if (!entry) {
  process.stderr.write('usage: node bin/run.mjs <entry.ts> [args...]\n');
  process.exit(2);
}
process.argv.splice(2, 1);
register({ tsconfig: resolve(root, 'tsconfig.json') });
await import(pathToFileURL(resolve(root, entry)).href);
