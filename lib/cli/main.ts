/**
 * Entry of `npx millrace` (contract, section 4). Each command lives in its own
 * module and exports `run(args, io): Promise<number>` returning the exit status.
 */
import { AppError } from '../errors/app-error';

export interface CliIo {
  stdout: NodeJS.WritableStream;
  stderr: NodeJS.WritableStream & { isTTY?: boolean };
}

type Command = {
  usage: string;
  summary: string;
  load: () => Promise<{ run(args: string[], io: CliIo): Promise<number> }>;
};

const COMMANDS: Record<string, Command> = {
  check: {
    usage: 'millrace check --nameplate UNIT.json --log LOG.csv [--json]',
    summary: "diagnose a unit's log against its nameplate (Ke, unbalance, speed sensor)",
    load: () => import('./check'),
  },
  energy: {
    usage: 'millrace energy --nameplate UNIT.json --log LOG.csv [--tz ZONE] [--json]',
    summary: 'energy yield of a log per calendar month',
    load: () => import('./energy'),
  },
  units: {
    usage: 'millrace units import FLEET.json',
    summary: 'register or update sites and units from a fleet file',
    load: () => import('./units'),
  },
  export: {
    usage: 'millrace export --unit SITE/UNIT [--from TIME] [--to TIME]',
    summary: "write a unit's stored samples as a CSV log on standard output",
    load: () => import('./export'),
  },
};

/** The help text of `millrace --help`. */
export function helpText(): string {
  const width = Math.max(...Object.values(COMMANDS).map((c) => c.usage.length));
  const lines = Object.values(COMMANDS).map((c) => `  ${c.usage.padEnd(width)}  ${c.summary}`);
  return [
    'millrace — health and energy of small permanent-magnet wind and hydro generators',
    '',
    'usage: npx millrace <command> [options]',
    '',
    'commands:',
    ...lines,
    '',
    'Exit status: 0 when the command ran, 2 when it could not (bad file, column or option).',
    'Database commands use DATABASE_URL when set, else the embedded database in DATA_DIR (./data).',
    '',
  ].join('\n');
}

/** Runs one command line; returns the exit status. */
export async function main(args: readonly string[], io: CliIo = { stdout: process.stdout, stderr: process.stderr }): Promise<number> {
  const [name, ...rest] = args;
  if (name === undefined || name === '--help' || name === '-h' || name === 'help') {
    io.stdout.write(helpText());
    return name === undefined ? 2 : 0;
  }
  const command = COMMANDS[name];
  if (command === undefined) {
    io.stderr.write(`millrace: unknown command "${name}"\n\n${helpText()}`);
    return 2;
  }
  if (rest.includes('--help') || rest.includes('-h')) {
    io.stdout.write(`usage: npx ${command.usage}\n`);
    return 0;
  }
  try {
    const loaded = await command.load();
    return await loaded.run(rest, io);
  } catch (error) {
    if (error instanceof AppError && error.expose) {
      io.stderr.write(`millrace ${name}: ${error.message}\n`);
      return 2;
    }
    io.stderr.write(`millrace ${name}: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`);
    return 1;
  }
}
