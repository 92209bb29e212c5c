/**
 * The one error type of millrace. `code` reads `kind:area` (`bad-input:cli`,
 * `unavailable:db`), `status` is the HTTP status a route answers with, and
 * `expose` says whether the message may reach a client as it is.
 */
export type ErrorKind =
  | 'bad-input'
  | 'unauthenticated'
  | 'forbidden'
  | 'not-found'
  | 'conflict'
  | 'unavailable'
  | 'config'
  | 'internal';

const STATUS_BY_KIND: Record<ErrorKind, number> = {
  'bad-input': 400,
  unauthenticated: 401,
  forbidden: 403,
  'not-found': 404,
  conflict: 409,
  unavailable: 503,
  config: 500,
  internal: 500,
};

export class AppError extends Error {
  readonly code: `${ErrorKind}:${string}`;
  readonly kind: ErrorKind;
  readonly status: number;
  readonly expose: boolean;

  constructor(
    kind: ErrorKind,
    area: string,
    message: string,
    options: { cause?: unknown; expose?: boolean; status?: number } = {},
  ) {
    super(message, options.cause === undefined ? undefined : { cause: options.cause });
    this.name = 'AppError';
    this.kind = kind;
    this.code = `${kind}:${area}`;
    this.status = options.status ?? STATUS_BY_KIND[kind];
    this.expose = options.expose ?? (kind === 'bad-input' || kind === 'unauthenticated' || kind === 'forbidden' || kind === 'not-found' || kind === 'conflict');
  }
}

/** True when `error` is an AppError, optionally of the given kind. */
export function isAppError(error: unknown, kind?: ErrorKind): error is AppError {
  return error instanceof AppError && (kind === undefined || error.kind === kind);
}
