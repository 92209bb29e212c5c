/**
 * A small, strict option parser for the command line, on top of Node's
 * `util.parseArgs`. Unknown options and missing values are errors that name
 * the option.
 */
import { parseArgs } from 'node:util';
import { AppError } from '../errors/app-error';

type OptionSpec = Record<string, { type: 'string' | 'boolean'; required?: boolean }>;

/** Parses `args` against `spec`; throws AppError (`bad-input:cli`) naming the option. */
export function parseOptions<S extends OptionSpec>(
  args: readonly string[],
  spec: S,
): { values: { [K in keyof S]: S[K]['type'] extends 'string' ? string | undefined : boolean | undefined }; positionals: string[] } {
  let parsed;
  try {
    parsed = parseArgs({
      args: [...args],
      options: Object.fromEntries(Object.entries(spec).map(([k, v]) => [k, { type: v.type }])),
      allowPositionals: true,
      strict: true,
    });
  } catch (cause) {
    throw new AppError('bad-input', 'cli', (cause as Error).message.replace(/\. To specify.*$/s, ''), { cause });
  }
  for (const [name, option] of Object.entries(spec)) {
    if (option.required && parsed.values[name] === undefined) {
      throw new AppError('bad-input', 'cli', `--${name} is required`);
    }
  }
  return parsed as never;
}
