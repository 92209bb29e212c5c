import { backendDescription } from './backend';
import { ensureBuild } from '../../bin/ensure-build.mjs';

/**
 * Says once which backend the integration tests use, and builds the web app
 * once (the product tests start it; two builds at once would collide).
 */
export default function setup() {
  process.stdout.write(`\nmillrace tests: backend ${backendDescription()}\n\n`);
  ensureBuild({ log: (line: string) => process.stdout.write(line) });
}
