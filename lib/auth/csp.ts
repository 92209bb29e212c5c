/**
 * Security headers of every response. The content security policy allows
 * scripts only from this site with the request's nonce ('strict-dynamic' lets
 * Next's own scripts load their chunks); Next reads the nonce from the
 * request's Content-Security-Policy header and puts it on its scripts
 * (node_modules/next/dist/docs/01-app/02-guides/content-security-policy.md).
 * Styles allow inline style attributes: React renders `style={…}` (recharts
 * draws with them), which a nonce cannot cover; style attributes cannot run
 * script. No framing (clickjacking), no plugins, forms and the base URL only
 * to this site.
 */
import { randomBytes } from 'node:crypto';

export function newNonce(): string {
  return randomBytes(16).toString('base64');
}

export function contentSecurityPolicy(nonce: string, { dev = false }: { dev?: boolean } = {}): string {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${dev ? " 'unsafe-eval'" : ''}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    "connect-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join('; ');
}

/** Headers every response carries besides the policy. */
export const SECURITY_HEADERS: Readonly<Record<string, string>> = Object.freeze({
  'X-Content-Type-Options': 'nosniff',
  'Referrer-Policy': 'same-origin',
  'X-Frame-Options': 'DENY',
  'Cross-Origin-Opener-Policy': 'same-origin',
  'Permissions-Policy': 'camera=(), microphone=(), geolocation=()',
});
