/**
 * Entry of `npm run simulate` (node bin/run.mjs lib/simulate/main.ts).
 */
import { runSimulate } from './cli';

const interrupted = new Promise<string>((resolve) => {
  let count = 0;
  const onSignal = (signal: NodeJS.Signals) => {
    count++;
    // A second Ctrl-C does not wait for the clean shutdown.
    if (count > 1) process.exit(130);
    resolve(signal);
  };
  process.on('SIGINT', onSignal);
  process.on('SIGTERM', onSignal);
});

const status = await runSimulate(process.argv.slice(2), { stdout: process.stdout, stderr: process.stderr, env: process.env, interrupted });
process.exit(status);
