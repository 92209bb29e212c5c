#!/usr/bin/env node
// The `millrace` command (contract, section 4). The commands live in lib/cli.
import { register } from 'tsx/esm/api';
import { pathToFileURL, fileURLToPath } from 'node:url';
import { resolve, dirname } from 'node:path';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
register({ tsconfig: resolve(root, 'tsconfig.json') });
const { main } = await import(pathToFileURL(resolve(root, 'lib/cli/main.ts')).href);
process.exitCode = await main(process.argv.slice(2));
