/**
 * Runs before every page, route and server action (Next 16's proxy, formerly
 * middleware): security headers with a fresh CSP nonce, the cross-site check
 * of state-changing requests, and who may open the path (lib/auth/access.ts):
 * nobody signed in gets a redirect to /sign-in (pages) or a 401 (API); a
 * signed-in person without the right role a 403. Pages, actions and queries
 * check again themselves: this is the first gate, not the only one.
 */
import { NextResponse, type NextRequest } from 'next/server';
import { getDatabase } from './db/client';
import { isApiPath, meetsNeed, needOfPath, safeNextPath } from './lib/auth/access';
import { contentSecurityPolicy, newNonce, SECURITY_HEADERS } from './lib/auth/csp';
import { sameOriginRequest } from './lib/auth/csrf';
import { mustChangeFirst, PATH_HEADER, resolveCredentials, sessionTokenOf, SIGN_IN_REQUIRED } from './lib/auth/request';

function withHeaders(response: NextResponse, csp: string): NextResponse {
  response.headers.set('Content-Security-Policy', csp);
  for (const [name, value] of Object.entries(SECURITY_HEADERS)) response.headers.set(name, value);
  return response;
}

function refuse(api: boolean, status: 401 | 403, code: string, message: string, csp: string): NextResponse {
  const response = api
    ? NextResponse.json({ error: { code, message } }, { status, headers: { 'Cache-Control': 'no-store' } })
    : new NextResponse(
        `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>Not allowed · millrace</title></head><body style="font-family:system-ui,sans-serif;max-width:40rem;margin:2rem auto;padding:0 1rem;line-height:1.5"><h1>Not allowed</h1><p>${message}</p><p><a href="/">Back to the fleet</a></p></body></html>`,
        { status, headers: { 'Content-Type': 'text/html; charset=utf-8', 'Cache-Control': 'no-store' } },
      );
  return withHeaders(response, csp);
}

export async function proxy(request: NextRequest) {
  const nonce = newNonce();
  const csp = contentSecurityPolicy(nonce, { dev: process.env.NODE_ENV === 'development' });
  const { pathname, search } = request.nextUrl;
  const api = isApiPath(pathname);

  if (!sameOriginRequest({ method: request.method, host: request.headers.get('host'), origin: request.headers.get('origin'), secFetchSite: request.headers.get('sec-fetch-site') })) {
    return refuse(api, 403, 'forbidden:csrf', 'This request came from another site and was refused. Use millrace’s own pages.', csp);
  }

  const need = needOfPath(pathname);
  if (need !== 'public') {
    let viewer;
    try {
      const { db } = await getDatabase();
      viewer = await resolveCredentials({ db, headers: request.headers, sessionToken: sessionTokenOf(request.headers, (n) => request.cookies.get(n)?.value) });
    } catch {
      viewer = undefined; // the page itself answers (its own error page says the database is unavailable)
    }
    if (viewer === 'invalid' || (viewer === undefined && SIGN_IN_REQUIRED)) {
      if (api) return refuse(true, 401, 'unauthenticated', 'Sign in, or send Authorization: Bearer <token> (npx millrace token create).', csp);
      const to = new URL('/sign-in', request.url);
      to.searchParams.set('next', safeNextPath(pathname + search));
      return withHeaders(NextResponse.redirect(to, request.method === 'GET' || request.method === 'HEAD' ? 302 : 303), csp);
    }
    if (viewer !== undefined && mustChangeFirst(viewer, pathname) && request.method === 'GET') {
      // Before anything else, a password someone else set is replaced (answered here, before the page streams).
      const to = new URL('/account/password', request.url);
      to.searchParams.set('next', safeNextPath(pathname + search));
      return withHeaders(NextResponse.redirect(to, 302), csp);
    }
    if (viewer !== undefined && !meetsNeed(viewer, need)) {
      return refuse(api, 403, 'forbidden', need === 'admin' ? 'Only an administrator may open this page.' : 'Only an administrator or operator may change the setup.', csp);
    }
  }

  const requestHeaders = new Headers(request.headers);
  requestHeaders.set(PATH_HEADER, pathname + search);
  requestHeaders.set('Content-Security-Policy', csp);
  return withHeaders(NextResponse.next({ request: { headers: requestHeaders } }), csp);
}

export const config = {
  matcher: ['/((?!_next/static|_next/image|icon.svg|favicon.ico).*)'],
};
