/**
 * Cross-site request forgery: every request that may change state (anything
 * but GET, HEAD and OPTIONS) must come from this site's own pages. Browsers
 * send `Origin` on such requests (and `Sec-Fetch-Site`); a different origin,
 * or `Sec-Fetch-Site: cross-site|same-site`, is refused. A request with
 * neither header is not from a browser (a script with a Bearer token) and
 * carries no ambient cookie risk of a browser, so it passes. Nothing changes
 * state on GET (the access test checks that GET of every route is read-only).
 */
export function isSafeMethod(method: string): boolean {
  return method === 'GET' || method === 'HEAD' || method === 'OPTIONS';
}

/**
 * Whether a state-changing request may go on.
 * @example sameOriginRequest({ method: 'POST', host: 'a.test', origin: 'https://b.test' }) // false
 */
export function sameOriginRequest({ method, host, origin, secFetchSite }: { method: string; host: string | null; origin: string | null; secFetchSite?: string | null }): boolean {
  if (isSafeMethod(method)) return true;
  if (secFetchSite === 'cross-site' || secFetchSite === 'same-site') return false;
  if (origin === null) return true;
  if (origin === 'null' || !host) return false;
  try {
    return new URL(origin).host.toLowerCase() === host.toLowerCase();
  } catch {
    return false;
  }
}
