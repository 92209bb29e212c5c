/**
 * `npm run simulate`: the demo fleet on the configured broker, live, or a
 * history first (`--backfill DAYS`, then exit, or `--live` to go on).
 */
import { parseArgs } from 'node:util';
import { loadConfig } from '@/lib/config/env';
import { AppError } from '@/lib/errors/app-error';
import { createLogger, type Logger } from '@/lib/log/logger';
import { backfill } from './backfill';
import { demoFleet } from './demo-fleet';
import { redactUrl } from './device';
import { defaultFaultEpochMs } from './fleet-models';
import { DEFAULT_RATE_HZ, startSimulator } from './simulator';

export const USAGE = `usage: npm run simulate -- [options]

Publishes the demo fleet's telemetry to the MQTT broker (MQTT_URL, else
mqtt://127.0.0.1:MQTT_PORT) like field devices, until Ctrl-C.

options:
  --backfill DAYS    first write DAYS of history (ending now), then exit
  --live             with --backfill: go on publishing live afterwards
  --interval S       seconds between history samples (default 10)
  --backfill-rate N  history pace, samples per second (default 10000; 0 = unpaced)
  --rate HZ          live samples per second per unit (default ${DEFAULT_RATE_HZ})
  --units N          only the first N units of the fleet
  --seed N           random seed (default 1): the same seed, the same fleet
  --demag-rate PCT   Ke loss of the demagnetising unit, % per day (default 1)
  -h, --help         this text
`;

/** Parsed command line. */
export interface SimulateArgs {
  help: boolean;
  backfillDays?: number;
  live: boolean;
  intervalS?: number;
  backfillRate?: number;
  rateHz?: number;
  units?: number;
  seed?: number;
  demagPctPerDay?: number;
}

function numberOption(name: string, raw: string | undefined, check: (v: number) => boolean, expects: string): number | undefined {
  if (raw === undefined) return undefined;
  const value = Number(raw);
  if (raw.trim() === '' || !Number.isFinite(value) || !check(value)) {
    throw new AppError('bad-input', 'cli', `--${name} expects ${expects}, got "${raw}"`);
  }
  return value;
}

/**
 * Parses the options (strict: an unknown option is an error naming it).
 * @example parseSimulateArgs(['--backfill', '3', '--live']) // { help: false, backfillDays: 3, live: true }
 */
export function parseSimulateArgs(args: readonly string[]): SimulateArgs {
  let values: Record<string, string | boolean | undefined>;
  try {
    ({ values } = parseArgs({
      args: [...args],
      strict: true,
      allowPositionals: false,
      options: {
        backfill: { type: 'string' },
        live: { type: 'boolean' },
        interval: { type: 'string' },
        'backfill-rate': { type: 'string' },
        rate: { type: 'string' },
        units: { type: 'string' },
        seed: { type: 'string' },
        'demag-rate': { type: 'string' },
        help: { type: 'boolean', short: 'h' },
      },
    }));
  } catch (cause) {
    throw new AppError('bad-input', 'cli', (cause as Error).message.replace(/\. To specify.*$/s, ''), { cause });
  }
  const str = (k: string) => values[k] as string | undefined;
  const parsed: SimulateArgs = { help: values.help === true, live: values.live === true };
  const set = <K extends keyof SimulateArgs>(key: K, value: SimulateArgs[K] | undefined) => {
    if (value !== undefined) parsed[key] = value;
  };
  set('backfillDays', numberOption('backfill', str('backfill'), (v) => v > 0 && v <= 3660, 'a number of days above 0 (at most 3660)'));
  set('intervalS', numberOption('interval', str('interval'), (v) => v >= 0.1 && v <= 3600, 'seconds from 0.1 to 3600'));
  set('backfillRate', numberOption('backfill-rate', str('backfill-rate'), (v) => v >= 0, 'samples per second, 0 or more'));
  set('rateHz', numberOption('rate', str('rate'), (v) => v >= 0.01 && v <= 50, 'samples per second from 0.01 to 50'));
  set('units', numberOption('units', str('units'), (v) => Number.isInteger(v) && v >= 1, 'a whole number of units, 1 or more'));
  set('seed', numberOption('seed', str('seed'), (v) => Number.isInteger(v) && Math.abs(v) < 2 ** 32, 'a whole number'));
  set('demagPctPerDay', numberOption('demag-rate', str('demag-rate'), (v) => v >= 0 && v <= 100, '% per day from 0 to 100'));
  if (parsed.live && parsed.backfillDays === undefined) throw new AppError('bad-input', 'cli', '--live goes with --backfill DAYS (live is the default without it)');
  if (parsed.backfillDays === undefined && (parsed.intervalS !== undefined || parsed.backfillRate !== undefined)) {
    throw new AppError('bad-input', 'cli', '--interval and --backfill-rate go with --backfill DAYS');
  }
  return parsed;
}

/** The first `n` units of the demo fleet and the sites they stand on. */
export function fleetSubset(n: number | undefined) {
  if (n === undefined) return demoFleet;
  if (n > demoFleet.units.length) {
    throw new AppError('bad-input', 'cli', `--units expects at most ${demoFleet.units.length} (the demo fleet's size), got ${n}`);
  }
  const units = demoFleet.units.slice(0, n);
  const sites = demoFleet.sites.filter((s) => units.some((u) => u.siteId === s.id));
  return { sites, units };
}

export interface CliIo {
  stdout: { write(text: string): unknown };
  stderr: { write(text: string): unknown };
  env: Readonly<Record<string, string | undefined>>;
  /** Resolves on SIGINT or SIGTERM (the caller wires the signals). */
  interrupted: Promise<string>;
}

/** Runs the command line; resolves with the exit status. */
export async function runSimulate(args: readonly string[], io: CliIo, logger?: Logger): Promise<number> {
  let parsed: SimulateArgs;
  let config;
  try {
    parsed = parseSimulateArgs(args);
    if (parsed.help) {
      io.stdout.write(USAGE);
      return 0;
    }
    config = loadConfig(io.env);
  } catch (error) {
    io.stderr.write(`simulate: ${(error as Error).message}\n\n${USAGE}`);
    return 2;
  }
  const log = logger ?? createLogger('simulate', config.LOG_LEVEL);
  const brokerUrl = config.MQTT_URL ?? `mqtt://127.0.0.1:${config.MQTT_PORT}`;
  const credentials = { username: config.MQTT_USERNAME, password: config.MQTT_PASSWORD };
  let stopping = false;
  const controller = new AbortController();
  void io.interrupted.then((signal) => {
    stopping = true;
    log.info('stopping', { signal });
    controller.abort();
  });
  try {
    const fleet = fleetSubset(parsed.units);
    // One epoch for history and live, so the faults carry on where the history left them.
    const faultEpochMs = defaultFaultEpochMs(Date.now());
    const common = { brokerUrl, fleet, seed: parsed.seed, demagPctPerDay: parsed.demagPctPerDay, faultEpochMs, log, ...credentials };
    if (parsed.backfillDays !== undefined) {
      const result = await backfill({
        ...common,
        days: parsed.backfillDays,
        intervalS: parsed.intervalS,
        maxSamplesPerS: parsed.backfillRate,
        signal: controller.signal,
      });
      io.stdout.write(
        `history written to ${redactUrl(brokerUrl)}: ${result.samples} samples in ${result.messages} messages for ${result.units} units, ` +
          `${result.from} to ${result.to}, ${(result.elapsedMs / 1000).toFixed(1)} s (${result.samplesPerS} samples/s)\n`,
      );
      if (!parsed.live || stopping) return 0;
    }
    const simulator = await startSimulator({ ...common, rateHz: parsed.rateHz });
    const state = simulator.state();
    io.stdout.write(`publishing ${state.units} units to ${state.broker} at ${state.rateHz} samples/s each; Ctrl-C stops\n`);
    if (!stopping) await io.interrupted;
    await simulator.stop();
    const end = simulator.state();
    io.stdout.write(`stopped: ${end.samplesSent} samples in ${end.messagesSent} messages\n`);
    return 0;
  } catch (error) {
    if (stopping && error instanceof AppError && /stopped on request/.test(error.message)) {
      io.stdout.write('stopped during the history upload; what was acknowledged is written\n');
      return 0;
    }
    const message = error instanceof AppError && error.expose ? error.message : `unexpected error: ${(error as Error).stack ?? String(error)}`;
    io.stderr.write(`simulate: ${message}\n`);
    return error instanceof AppError && error.kind === 'bad-input' ? 2 : 1;
  }
}
