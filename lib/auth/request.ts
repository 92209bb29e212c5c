/**
 * The viewer of a request: a session cookie, or `Authorization: Bearer`
 * with an API token. The web server puts the client's address in
 * `x-millrace-client-ip` and the proxy (proxy.ts) the request's path in
 * `x-millrace-path`, both overwriting whatever a client sent.
 */
import { cache } from 'react';
import { getDatabase, type Db } from '@/db/client';
import { getConfig } from '@/lib/config/env';
import { AppError } from '@/lib/errors/app-error';
import { isApiPath, safeNextPath } from './access';
import { resolveApiToken } from './api-tokens';
import { viewerOfPerson } from './people';
import { resolveSession, sessionCookieName, type SessionTimes } from './sessions';
import type { Viewer } from './viewer';

/**
 * Whether pages, actions and the API require a signed-in person (they do).
 * Set to false, a request with no credentials would be the local viewer
 * (everything), as before accounts existed.
 */
export const SIGN_IN_REQUIRED: boolean = true;

export const CLIENT_IP_HEADER = 'x-millrace-client-ip';
export const PATH_HEADER = 'x-millrace-path';

/** The session settings of this process. */
export function sessionTimes(): SessionTimes {
  const config = getConfig();
  return { idleHours: config.SESSION_IDLE_HOURS, maxDays: config.SESSION_MAX_DAYS };
}

/** Whether the request reached us as plain HTTP on this machine (cookies without Secure and __Host-). */
export function isPlainLocalhost(headers: Headers): boolean {
  const host = (headers.get('host') ?? '').toLowerCase().replace(/:\d+$/, '');
  const proto = headers.get('x-forwarded-proto')?.split(',')[0]?.trim();
  const loopback = host === 'localhost' || host === '127.0.0.1' || host === '[::1]' || host.endsWith('.localhost');
  return loopback && proto !== 'https';
}

/** Whether the session cookie is Secure and `__Host-` prefixed for this request. */
export function secureCookies(headers: Headers): boolean {
  return !isPlainLocalhost(headers);
}

export function clientIp(headers: Headers): string {
  return headers.get(CLIENT_IP_HEADER) ?? 'unknown';
}

/** The Bearer token of an Authorization header, if any. */
export function bearerToken(headers: Headers): string | undefined {
  const value = headers.get('authorization');
  const m = value ? /^Bearer\s+(\S+)\s*$/i.exec(value) : null;
  return m?.[1];
}

/** The session token of a Cookie header for this request's cookie name. */
export function sessionTokenOf(headers: Headers, cookieValue: (name: string) => string | undefined): string | undefined {
  return cookieValue(sessionCookieName(secureCookies(headers)));
}

/**
 * Resolves the credentials of a request. `undefined`: none given;
 * 'invalid': given but not valid (unknown, expired, revoked, disabled).
 */
export async function resolveCredentials({
  db,
  headers,
  sessionToken,
  now,
}: {
  db: Db;
  headers: Headers;
  sessionToken: string | undefined;
  now?: Date;
}): Promise<Viewer | 'invalid' | undefined> {
  const ip = clientIp(headers);
  const bearer = bearerToken(headers);
  if (bearer !== undefined) {
    const person = await resolveApiToken({ db, token: bearer, now });
    return person ? viewerOfPerson({ db, person, via: 'token', ip }) : 'invalid';
  }
  if (sessionToken) {
    const found = await resolveSession({ db, token: sessionToken, times: sessionTimes(), now });
    return found ? viewerOfPerson({ db, person: found.person, via: 'session', ip }) : 'invalid';
  }
  return undefined;
}

/**
 * Whether a page must lead to the password form first: a signed-in person
 * whose password someone else set, on any page but that form (API calls with
 * a token are not held up).
 */
export function mustChangeFirst(viewer: Viewer, path: string): boolean {
  return viewer.via === 'session' && viewer.mustChangePassword === true && !isApiPath(path.split('?')[0]!) && !path.startsWith('/account/password');
}

/** The "not signed in" answer: a redirect to sign-in on pages and actions, a 401 under /api. */
export async function notSignedIn(path: string): Promise<never> {
  if (isApiPath(path.split('?')[0]!)) {
    throw new AppError('unauthenticated', 'auth', 'Sign in, or send Authorization: Bearer <token> (npx millrace token create).');
  }
  const { redirect } = await import('next/navigation');
  return redirect(`/sign-in?next=${encodeURIComponent(safeNextPath(path))}`);
}

/**
 * The credentials of the current Next request, resolved once per render: the
 * page, its layout's account bar and the components read the same answer
 * (React's cache lasts one server render; route handlers and actions resolve
 * it each call).
 */
const credentialsOfThisRequest = cache(async () => {
  const { cookies, headers } = await import('next/headers');
  const h = await headers();
  const jar = await cookies();
  const { db } = await getDatabase();
  const found = await resolveCredentials({ db, headers: h, sessionToken: sessionTokenOf(h, (n) => jar.get(n)?.value) });
  return { found, path: h.get(PATH_HEADER) ?? '/' };
});

/** The viewer of the current Next request (see currentViewer in ./viewer). */
export async function viewerOfRequest(): Promise<Viewer> {
  const { found, path } = await credentialsOfThisRequest();
  if (found !== undefined && found !== 'invalid') {
    if (mustChangeFirst(found, path)) {
      const { redirect } = await import('next/navigation');
      redirect(`/account/password?next=${encodeURIComponent(safeNextPath(path))}`);
    }
    return found;
  }
  if (found === 'invalid' || SIGN_IN_REQUIRED) return notSignedIn(path);
  const { LOCAL_VIEWER } = await import('./viewer');
  return LOCAL_VIEWER;
}

/** The signed-in person of the current request, or undefined; never redirects (for the header's "signed in as"). */
export async function signedInViewer(): Promise<Viewer | undefined> {
  try {
    const { found } = await credentialsOfThisRequest();
    return found === 'invalid' ? undefined : found;
  } catch {
    return undefined;
  }
}
