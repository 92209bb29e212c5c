import { backendDescription } from './backend';
// @ts-expect-error plain ESM helper shared with `npm start`
import { ensureBuild } from '../../bin/ensure-build.mjs';

/**
 * Says once which backend the integration tests use, and builds the web app
 * once (the product tests start it; two builds at once would collide).
 */
export default function setup() {
  process.stdout.write(`\nmillrace tests: backend ${backendDescription()}\n\n`);
  (ensureBuild as (o: { log: (l: string) => void }) => boolean)({ log: (line) => process.stdout.write(line) });
}
