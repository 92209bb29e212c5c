/**
 * Entry of `npx millrace` (contract, section 4). Each command lives in its own
 * module and exports `run(args, io): Promise<number>` returning the exit status.
 */
import { AppError } from '@/lib/errors/app-error';
import { describeFileError, isFileError, withNetworkWords } from './file-errors';
import { COMMAND_HELP, commandHelpText, helpText } from './help';

export { helpText } from './help';

export interface CliIo {
  stdout: NodeJS.WritableStream;
  stderr: NodeJS.WritableStream & { isTTY?: boolean };
  /** Where `user add` reads the password (process.stdin when absent). */
  stdin?: NodeJS.ReadableStream & { isTTY?: boolean };
}

type CommandModule = { run(args: string[], io: CliIo): Promise<number> };

/** The commands; their options and help are in lib/cli/help.ts (COMMAND_HELP). */
export const COMMANDS: Record<string, () => Promise<CommandModule>> = {
  check: () => import('./check'),
  energy: () => import('./energy'),
  units: () => import('./units'),
  export: () => import('./export'),
  device: () => import('./device'),
  user: () => import('./user'),
  token: () => import('./token'),
  webhook: () => import('./webhook'),
};

/** The help of `millrace <name> --help` (every sub-command of `units`, say); undefined for an unknown name. */
export function helpOf(name: string): string | undefined {
  const entries = Object.values(COMMAND_HELP).filter((c) => c.name === name || c.name.startsWith(`${name} `));
  return entries.length === 0 ? undefined : entries.map(commandHelpText).join('\n');
}

/** Runs one command line; returns the exit status. */
export async function main(args: readonly string[], io: CliIo = { stdout: process.stdout, stderr: process.stderr }): Promise<number> {
  const [name, ...rest] = args;
  if (name === undefined) {
    io.stderr.write(helpText());
    return 2;
  }
  if (name === '--help' || name === '-h' || name === 'help') {
    const about = rest[0] === undefined ? undefined : helpOf(rest[0]);
    if (rest[0] !== undefined && about === undefined) {
      io.stderr.write(`millrace: unknown command "${rest[0]}"\n\n${helpText()}`);
      return 2;
    }
    io.stdout.write(about ?? helpText());
    return 0;
  }
  const load = COMMANDS[name];
  if (load === undefined) {
    io.stderr.write(`millrace: unknown command "${name}"\n\n${helpText()}`);
    return 2;
  }
  if (rest.includes('--help') || rest.includes('-h')) {
    io.stdout.write(helpOf(name)!);
    return 0;
  }
  try {
    const loaded = await load();
    return await loaded.run(rest, io);
  } catch (error) {
    if (error instanceof AppError && error.expose) {
      const hint = error.code === 'bad-input:cli-usage' ? `\n(npx millrace ${name} --help lists its options)` : '';
      io.stderr.write(`millrace ${name}: ${withNetworkWords(error.message, error.cause)}${hint}\n`);
      return 2;
    }
    // A file error that no command put in words (EACCES on a folder, ENOSPC ...): still in words.
    if (isFileError(error)) {
      io.stderr.write(`millrace ${name}: ${describeFileError(error, 'file')}\n`);
      return 2;
    }
    io.stderr.write(`millrace ${name}: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`);
    return 1;
  }
}
