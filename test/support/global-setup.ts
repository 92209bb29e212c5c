import { backendDescription } from './backend';

/** Says once, at the start of the run, which backend the integration tests use. */
export default function setup() {
  process.stdout.write(`\nmillrace tests: backend ${backendDescription()}\n\n`);
}
