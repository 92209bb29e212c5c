/**
 * The read API's answers (contract, section 6): JSON bodies, errors as
 * `{ "error": { "code", "message" } }` with 400 naming the bad parameter and
 * 404 for a site or unit that does not exist or that the caller may not see.
 */
import { z } from 'zod';
import { SLUG } from '@/lib/contract/nameplate';
import { AppError, isAppError } from '@/lib/errors/app-error';

/** A JSON answer that no cache keeps (the figures change with every sample). */
export function jsonResponse(body: unknown, status = 200): Response {
  return Response.json(body, { status, headers: { 'Cache-Control': 'no-store' } });
}

/** An error answer of the contract's shape. */
export function errorResponse(status: number, code: string, message: string): Response {
  return jsonResponse({ error: { code, message } }, status);
}

const slug = (name: string) =>
  z.string({ error: `${name}: required` }).regex(SLUG, { error: (issue) => `${name}: must be 1 to 64 of a-z, 0-9 and -, got "${String(issue.input)}"` });

/** Route parameters of `/api/v1/units/[siteId]/[unitId]/...`. */
export const unitParamsSchema = z.object({ siteId: slug('siteId'), unitId: slug('unitId') });

/**
 * Parses route or query parameters; a bad one throws a 400 AppError whose message names it.
 * @example parseParams(unitParamsSchema, { siteId: 'north', unitId: 'n-1' }) // { siteId: 'north', unitId: 'n-1' }
 */
export function parseParams<S extends z.ZodType>(schema: S, params: unknown): z.output<S> {
  const parsed = schema.safeParse(params);
  if (parsed.success) return parsed.data;
  const message = parsed.error.issues.map((i) => (i.message.includes(':') ? i.message : `${i.path.join('.')}: ${i.message}`)).join('; ');
  throw new AppError('bad-input', 'api', message, { expose: true });
}

/** Runs a handler; AppErrors become their status and message, anything else a 500 that reveals nothing. */
export async function answer(handler: () => Promise<Response>): Promise<Response> {
  try {
    return await handler();
  } catch (error) {
    if (isAppError(error) && error.expose) {
      const code = error.kind === 'bad-input' ? 'bad-parameter' : error.kind;
      return errorResponse(error.status, code, error.message);
    }
    process.stderr.write(
      `${JSON.stringify({ time: new Date().toISOString(), level: 'error', area: 'api', msg: 'request failed', error: String((error as Error)?.stack ?? error) })}\n`,
    );
    return errorResponse(500, 'internal', 'The server could not answer; try again, and check /api/health if it keeps failing.');
  }
}

/** The 404 of the contract: the same answer whether the thing does not exist or the caller may not see it. */
export function notFound(what: string): Response {
  return errorResponse(404, 'not-found', `${what} not found`);
}
