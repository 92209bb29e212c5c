/**
 * Structured logs: one JSON object a line on standard error, with a level
 * setting (LOG_LEVEL). `area` names the part of millrace that speaks.
 */
export const LOG_LEVELS = ['debug', 'info', 'warn', 'error', 'silent'] as const;
export type LogLevel = (typeof LOG_LEVELS)[number];

export interface Logger {
  debug(msg: string, fields?: Record<string, unknown>): void;
  info(msg: string, fields?: Record<string, unknown>): void;
  warn(msg: string, fields?: Record<string, unknown>): void;
  error(msg: string, fields?: Record<string, unknown>): void;
  child(area: string): Logger;
}

const RANK: Record<LogLevel, number> = { debug: 10, info: 20, warn: 30, error: 40, silent: 100 };

function serialise(value: unknown): unknown {
  if (value instanceof Error) {
    return { name: value.name, message: value.message, ...(value.cause ? { cause: serialise(value.cause) } : {}) };
  }
  return value;
}

/**
 * A logger writing to `out` (standard error by default).
 * @example createLogger('ingest', 'info').info('connected', { broker: 'mqtt://127.0.0.1:1883' })
 */
export function createLogger(
  area: string,
  level: LogLevel = 'info',
  out: (line: string) => void = (line) => process.stderr.write(line),
): Logger {
  const min = RANK[level];
  const write = (lvl: Exclude<LogLevel, 'silent'>, msg: string, fields?: Record<string, unknown>) => {
    if (RANK[lvl] < min) return;
    const record: Record<string, unknown> = { time: new Date().toISOString(), level: lvl, area, msg };
    if (fields) for (const [k, v] of Object.entries(fields)) record[k] = serialise(v);
    out(`${JSON.stringify(record)}\n`);
  };
  return {
    debug: (m, f) => write('debug', m, f),
    info: (m, f) => write('info', m, f),
    warn: (m, f) => write('warn', m, f),
    error: (m, f) => write('error', m, f),
    child: (sub) => createLogger(`${area}.${sub}`, level, out),
  };
}
