#!/usr/bin/env node
// `npm run ingest`: the standalone ingester. Its TypeScript is bundled into one
// plain module by esbuild at each start (a fraction of a second; packages stay
// in node_modules) and that module runs under plain Node: no TypeScript loader
// thread and no source maps held, some 30 MB less resident memory than
// `bin/run.mjs lib/ingest/main.ts`, which runs the same code (DEVELOPERS.md,
// "Measured figures"). The heap flags that bound its memory are in the
// package.json script.
import { buildSync } from 'esbuild';
import { mkdirSync, rmSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const folder = join(root, 'node_modules', '.cache', 'millrace');
// One file per process: two ingesters starting at once never read each other's half-written bundle.
const bundle = join(folder, `ingest-${process.pid}.mjs`);
mkdirSync(folder, { recursive: true });
try {
  buildSync({
    entryPoints: [join(root, 'lib', 'ingest', 'main.ts')],
    outfile: bundle,
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    packages: 'external',
    tsconfig: join(root, 'tsconfig.json'),
    logLevel: 'error',
  });
  await import(pathToFileURL(bundle).href);
} finally {
  // Loaded (or failed): the file is no longer needed.
  rmSync(bundle, { force: true });
}
