/** The path table, the sign-in redirect's `next`, the same-origin rule and the policy header. */
import { describe, expect, it } from 'vitest';
import { isApiPath, meetsNeed, needOfPath, safeNextPath } from './access';
import { contentSecurityPolicy } from './csp';
import { sameOriginRequest } from './csrf';
import { canAcknowledge, canAdminPeople, canEditSetup, type Viewer } from './viewer';

const as = (role: Viewer['role'], via: Viewer['via'] = 'session'): Viewer => ({ id: 'p', role, siteIds: 'all', via, personId: 1 });

describe('needOfPath and meetsNeed', () => {
  it('lets anyone reach sign-in, a display link and the health check, and nothing else', () => {
    for (const p of ['/sign-in', '/display/mrd_x', '/api/health']) expect(needOfPath(p), p).toBe('public');
    for (const p of ['/', '/sites/a', '/setup', '/api/v1/sites', '/api/live', '/data-quality', '/account/password', '/display', '/display/a/b']) {
      expect(meetsNeed(undefined, needOfPath(p)), p).toBe(false);
    }
  });

  it('keeps /admin to admins and adding or importing setup to admins and operators', () => {
    expect(needOfPath('/admin/people/3')).toBe('admin');
    expect(meetsNeed(as('admin'), 'admin')).toBe(true);
    expect(meetsNeed(as('operator'), 'admin')).toBe(false);
    for (const p of ['/setup/sites/new', '/setup/units/new', '/setup/import']) {
      expect(meetsNeed(as('operator'), needOfPath(p)), p).toBe(true);
      expect(meetsNeed(as('crew'), needOfPath(p)), p).toBe(false);
      expect(meetsNeed(as('owner'), needOfPath(p)), p).toBe(false);
    }
    // A display link's viewer is never a person, even on a page that needs only that.
    expect(meetsNeed(as('owner', 'display'), 'signed-in')).toBe(false);
  });

  it('tells API paths from pages', () => {
    expect(isApiPath('/api/v1/sites')).toBe(true);
    expect(isApiPath('/apiary')).toBe(false);
  });
});

describe('role rules', () => {
  it('gives each role what the issue says, and a display link nothing to change', () => {
    const table = (['admin', 'operator', 'crew', 'owner'] as const).map((r) => [r, canAdminPeople(as(r)), canEditSetup(as(r)), canAcknowledge(as(r))]);
    expect(table).toEqual([
      ['admin', true, true, true],
      ['operator', false, true, true],
      ['crew', false, false, true],
      ['owner', false, false, false],
    ]);
    for (const r of ['admin', 'operator', 'crew', 'owner'] as const) {
      const display = as(r, 'display');
      expect([canAdminPeople(display), canEditSetup(display), canAcknowledge(display)], r).toEqual([false, false, false]);
    }
  });
});

describe('safeNextPath', () => {
  it('keeps a path of this site and refuses anything that leaves it', () => {
    expect(safeNextPath('/sites/a?x=1')).toBe('/sites/a?x=1');
    for (const bad of ['//evil.example/x', '/\\evil.example', 'https://evil.example/', 'javascript:alert(1)', '/x\r\nSet-Cookie: a=b', '/sign-in?next=/x', '', null]) {
      expect(safeNextPath(bad), String(bad)).toBe('/');
    }
  });
});

describe('sameOriginRequest', () => {
  it('passes reads and same-origin writes, refuses writes from another site', () => {
    expect(sameOriginRequest({ method: 'GET', host: 'a.test', origin: 'https://b.test' })).toBe(true);
    expect(sameOriginRequest({ method: 'POST', host: 'a.test:3000', origin: 'http://a.test:3000' })).toBe(true);
    expect(sameOriginRequest({ method: 'POST', host: 'a.test', origin: 'https://b.test' })).toBe(false);
    expect(sameOriginRequest({ method: 'POST', host: 'a.test', origin: 'https://a.test.evil.example' })).toBe(false);
    expect(sameOriginRequest({ method: 'DELETE', host: 'a.test', origin: 'null' })).toBe(false);
    expect(sameOriginRequest({ method: 'POST', host: 'a.test', origin: null, secFetchSite: 'cross-site' })).toBe(false);
    expect(sameOriginRequest({ method: 'POST', host: 'a.test', origin: null, secFetchSite: 'same-site' })).toBe(false);
    // No browser headers at all: a script with a token, which carries no ambient cookie.
    expect(sameOriginRequest({ method: 'POST', host: 'a.test', origin: null })).toBe(true);
  });
});

describe('contentSecurityPolicy', () => {
  it('allows scripts only with the nonce, forbids framing and plugins', () => {
    const csp = contentSecurityPolicy('abc123');
    expect(csp).toContain("script-src 'self' 'nonce-abc123' 'strict-dynamic'");
    expect(csp).not.toContain('unsafe-eval');
    expect(csp).toContain("frame-ancestors 'none'");
    expect(csp).toContain("object-src 'none'");
    expect(csp).not.toMatch(/script-src[^;]*unsafe-inline/);
  });
});
