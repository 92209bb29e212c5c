/**
 * Who may open which path, in one table that the proxy applies to every
 * request and the access test (test/auth/access.test.ts) checks against the
 * files under app/. Pages, actions and queries check again on their own
 * (a site the viewer may not see is a 404 there).
 */
import { canAdminPeople, canEditSetup, type Viewer } from './viewer';

/** public: anyone; signed-in: any person; setup: admins and operators; admin: admins. */
export type Need = 'public' | 'signed-in' | 'setup' | 'admin';

const RULES: ReadonlyArray<{ test: RegExp; need: Need }> = [
  { test: /^\/sign-in\/?$/, need: 'public' },
  { test: /^\/display\/[^/]+\/?$/, need: 'public' },
  { test: /^\/api\/health\/?$/, need: 'public' },
  { test: /^\/admin(\/|$)/, need: 'admin' },
  { test: /^\/setup\/(sites|units)\/new\/?$/, need: 'setup' },
  { test: /^\/setup\/import\/?$/, need: 'setup' },
];

/** What a path needs. Anything not listed needs a signed-in person. */
export function needOfPath(pathname: string): Need {
  return RULES.find((r) => r.test.test(pathname))?.need ?? 'signed-in';
}

/** Whether the viewer (undefined: nobody) meets the need. */
export function meetsNeed(viewer: Viewer | undefined, need: Need): boolean {
  if (need === 'public') return true;
  if (!viewer || viewer.via === 'display') return false;
  if (need === 'setup') return canEditSetup(viewer);
  if (need === 'admin') return canAdminPeople(viewer);
  return true;
}

/** A path under /api answers JSON errors (401/403); others redirect to sign-in or show a page. */
export function isApiPath(pathname: string): boolean {
  return pathname === '/api' || pathname.startsWith('/api/');
}

/**
 * A `next` path after sign-in: only a path of this site (no scheme, no host,
 * no `//`), else the fleet page. Stops an open redirect through /sign-in?next=.
 * @example safeNextPath('//evil.example/x') // '/'
 */
export function safeNextPath(next: string | null | undefined): string {
  if (!next || !next.startsWith('/') || next.startsWith('//') || next.startsWith('/\\') || /[\r\n]/.test(next)) return '/';
  if (next.startsWith('/sign-in')) return '/';
  return next.slice(0, 2000);
}
