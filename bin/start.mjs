#!/usr/bin/env node
// `npm start`: builds the web app when there is no current build, then runs
// the whole product in this process (lib/server/main.ts).
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { register } from 'tsx/esm/api';
import { ensureBuild, root } from './ensure-build.mjs';

ensureBuild();
register({ tsconfig: join(root, 'tsconfig.json') });
await import(pathToFileURL(join(root, 'lib', 'server', 'main.ts')).href);
