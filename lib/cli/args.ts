/**
 * A small, strict option parser for the command line, on top of Node's
 * `util.parseArgs`. Unknown options and missing values are errors that name
 * the option; an unknown option or a bad value has code `bad-input:cli-usage`
 * (lib/cli/main.ts then points to the command's --help). Every option a command parses must be listed in its help
 * (lib/cli/help.ts; lib/cli/help.test.ts checks).
 */
import { parseArgs } from 'node:util';
import { AppError } from '@/lib/errors/app-error';

/** util.parseArgs's refusal in our words, naming the option. */
function optionErrorWords(error: Error & { code?: string }): string {
  const option = /'(-{1,2}[^' ]+)/.exec(error.message)?.[1];
  switch (error.code) {
    case 'ERR_PARSE_ARGS_UNKNOWN_OPTION':
      return option ? `unknown option ${option}` : error.message;
    case 'ERR_PARSE_ARGS_INVALID_OPTION_VALUE':
      return option && /argument missing/.test(error.message)
        ? `${option} needs a value`
        : option
          ? `${option} takes no value`
          : error.message;
    default:
      return error.message.replace(/\. To specify.*$/s, '');
  }
}

type OptionSpec = Record<string, { type: 'string' | 'boolean'; required?: boolean; multiple?: boolean }>;

/** Parses `args` against `spec`; throws AppError (`bad-input:cli`) naming the option. */
export function parseOptions<S extends OptionSpec>(
  args: readonly string[],
  spec: S,
): {
  values: { [K in keyof S]: S[K]['multiple'] extends true ? string[] | undefined : S[K]['type'] extends 'string' ? string | undefined : boolean | undefined };
  positionals: string[];
} {
  let parsed;
  try {
    parsed = parseArgs({
      args: [...args],
      options: Object.fromEntries(Object.entries(spec).map(([k, v]) => [k, { type: v.type, ...(v.multiple ? { multiple: true } : {}) }])),
      allowPositionals: true,
      strict: true,
    });
  } catch (cause) {
    throw new AppError('bad-input', 'cli-usage', optionErrorWords(cause as Error & { code?: string }), { cause });
  }
  for (const [name, option] of Object.entries(spec)) {
    if (option.required && parsed.values[name] === undefined) {
      throw new AppError('bad-input', 'cli', `--${name} is required`);
    }
  }
  return parsed as never;
}
