/**
 * The one place that reads `process.env`. Every setting millrace knows is
 * declared here with its default; `loadConfig` fails with one line naming the
 * variable and what it expects. README.md lists the same table for users.
 */
import { z } from 'zod';
import { AppError } from '@/lib/errors/app-error';

const onOff = z
  .enum(['on', 'off', 'true', 'false', '1', '0'], { error: 'expected on or off' })
  .transform((v) => v === 'on' || v === 'true' || v === '1');

const port = z.coerce
  .number({ error: 'expected a TCP port number' })
  .int('expected a whole TCP port number')
  .min(1, 'expected a TCP port from 1 to 65535')
  .max(65535, 'expected a TCP port from 1 to 65535');

const positiveInt = (what: string, max: number) =>
  z.coerce
    .number({ error: `expected ${what}` })
    .int(`expected ${what} as a whole number`)
    .min(1, `expected ${what} of at least 1`)
    .max(max, `expected ${what} of at most ${max}`);

const url = (schemes: readonly string[]) =>
  z
    .string()
    .trim()
    .min(1)
    .refine((v) => {
      try {
        return schemes.includes(new URL(v).protocol.replace(/:$/, ''));
      } catch {
        return false;
      }
    }, `expected a URL starting with ${schemes.map((s) => `${s}://`).join(' or ')}`);

/** Every environment variable millrace reads, with its default. */
export const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('production'),
  DATABASE_URL: url(['postgres', 'postgresql']).optional(),
  DATA_DIR: z.string().min(1).default('./data'),
  MQTT_URL: url(['mqtt', 'mqtts', 'ws', 'wss', 'tcp']).optional(),
  MQTT_USERNAME: z.string().min(1).optional(),
  MQTT_PASSWORD: z.string().min(1).optional(),
  MQTT_PORT: port.default(1883),
  HOST: z.string().min(1).default('127.0.0.1'),
  PORT: port.default(3000),
  DEMO: onOff.default(true),
  LOG_LEVEL: z.enum(['debug', 'info', 'warn', 'error', 'silent'], { error: 'expected debug, info, warn, error or silent' }).default('info'),
  INGEST_CLIENT_ID: z
    .string()
    .regex(/^[A-Za-z0-9._-]{1,64}$/, 'expected letters, digits, dot, dash or underscore, at most 64')
    .optional(),
  INGEST_SHARE_GROUP: z
    .string()
    .regex(/^[A-Za-z0-9._-]{1,64}$/, 'expected letters, digits, dot, dash or underscore, at most 64')
    .default('millrace-ingest'),
  INGEST_CONNECTIONS: positiveInt('a number of MQTT connections', 64).default(4),
  INGEST_BATCH_SAMPLES: positiveInt('a number of samples per batch', 100_000).default(40_000),
  INGEST_BATCH_MS: positiveInt('a number of milliseconds', 10_000).default(200),
  INGEST_BUFFER_SAMPLES: positiveInt('a number of samples', 1_000_000).default(200_000),
  RETENTION_DAYS: positiveInt('a number of days', 36_500).default(90),
  DIAGNOSIS_WINDOW_HOURS: positiveInt('a number of hours', 24 * 31).default(6),
  DIAGNOSIS_INTERVAL_S: positiveInt('a number of seconds', 86_400).default(60),
  /** Live-update streams (app/api/live) open at once in one web process; more are answered 503. */
  LIVE_MAX_STREAMS: positiveInt('a number of streams', 100_000).default(200),
  /** A session unused this long ends (a control room's open page keeps it in use). */
  SESSION_IDLE_HOURS: positiveInt('a number of hours', 24 * 30).default(12),
  /** A session ends this long after sign-in, used or not. */
  SESSION_MAX_DAYS: positiveInt('a number of days', 365).default(7),
  /** Seconds between evaluations of the alert conditions (lib/alerts/evaluator.ts). */
  ALERT_INTERVAL_S: positiveInt('a number of seconds', 3_600).default(15),
  /** The address people reach millrace at, for the links in alerts and webhooks; unset: links are paths. */
  PUBLIC_URL: url(['http', 'https']).optional(),
});

export type Config = z.infer<typeof envSchema>;

/** The names of every variable millrace knows (for the compose-file check). */
export const knownVariables: readonly string[] = Object.keys(envSchema.shape);

/**
 * Parses the environment. Empty strings count as unset, so `DATABASE_URL=`
 * in a compose file means "use the default".
 * @example loadConfig({ PORT: '8080' }).PORT // 8080
 */
export function loadConfig(env: Readonly<Record<string, string | undefined>> = process.env): Config {
  const relevant: Record<string, string> = {};
  for (const name of knownVariables) {
    const value = env[name];
    if (value !== undefined && value !== '') relevant[name] = value;
  }
  const parsed = envSchema.safeParse(relevant);
  if (parsed.success) return parsed.data;
  const issue = parsed.error.issues[0]!;
  const name = String(issue.path[0] ?? 'environment');
  const got = relevant[name];
  throw new AppError(
    'config',
    'env',
    `${name}: ${issue.message}${got === undefined || /PASSWORD/.test(name) ? '' : `, got "${got}"`}`,
  );
}

let cached: Config | undefined;

/** The process's configuration, parsed once. */
export function getConfig(): Config {
  cached ??= loadConfig();
  return cached;
}
