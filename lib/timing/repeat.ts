/**
 * A background pass run again and again: the first at once, each next one
 * `everyMs(elapsedMs)` after the last ended, never two at once; stopping
 * waits for the pass under way. The diagnosis worker and the alert evaluator
 * run this way beside the ingester.
 */

/**
 * Starts repeating `pass` (which must not throw: a worker logs its own failures); resolves the
 * returned stop function once the pass under way has ended.
 * @example const stop = repeatEvery(() => 60_000, async () => runOnce()); await stop();
 */
export function repeatEvery(everyMs: (elapsedMs: number) => number, pass: () => Promise<void>): () => Promise<void> {
  let stopped = false;
  let timer: NodeJS.Timeout | undefined;
  let inFlight: Promise<void> | undefined;
  const run = () => {
    const started = Date.now();
    inFlight = pass().finally(() => {
      inFlight = undefined;
      if (!stopped) timer = setTimeout(run, Math.max(0, everyMs(Date.now() - started)));
    });
  };
  run();
  return async () => {
    stopped = true;
    if (timer !== undefined) clearTimeout(timer);
    await inFlight;
  };
}
