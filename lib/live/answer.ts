/**
 * `GET /api/live`: live updates of one site (`?site=`) or one unit
 * (`?site=&unit=`) as Server-Sent Events, one stream per page (./sse.ts).
 * The route is one line; the parsing, the viewer's scope and the stream
 * limit are here.
 */
import { z } from 'zod';
import { SLUG } from '@/lib/contract/nameplate';
import { getConfig } from '@/lib/config/env';
import { isAppError } from '@/lib/errors/app-error';
import { getLiveHub } from '@/lib/live/hub';
import { ensureLiveListener } from '@/lib/live/listener';
import { getLiveScope, type LiveScope } from '@/lib/live/queries';
import { createLiveStream, SSE_HEADERS } from '@/lib/live/sse';
import { databaseOnly } from '@/lib/request/context';
import { currentViewer } from '@/lib/auth/viewer';

/** Seconds a client told "too many streams" waits before trying again. */
export const RETRY_AFTER_S = 30;

const slug = (name: string) =>
  z
    .string({ error: `${name}: required, the id of a ${name === 'site' ? 'site' : 'unit'}` })
    .regex(SLUG, { error: (i) => `${name}: must be 1 to 64 of a-z, 0-9 and -, got ${JSON.stringify(i.input)}` });

/** Query of GET /api/live: `site` required, `unit` optional. */
export const liveQuerySchema = z.object({
  site: slug('site'),
  unit: slug('unit').optional(),
});

function error(status: number, code: string, message: string, headers: Record<string, string> = {}) {
  return Response.json({ error: { code, message } }, { status, headers: { 'Cache-Control': 'no-store', ...headers } });
}

/** The viewer's scope of the stream asked for, or the answer that refuses it (401, 503). */
async function scopeOf(site: string, unit: string | undefined): Promise<LiveScope | undefined | Response> {
  try {
    const { handle } = await databaseOnly();
    await ensureLiveListener(handle);
    return await getLiveScope({ db: handle.db, viewer: await currentViewer(), siteId: site, unitId: unit });
  } catch (caught) {
    if (isAppError(caught, 'unauthenticated')) return error(401, 'unauthenticated', caught.message);
    // The page keeps what it shows and tries again (LiveUpdates retries a refused stream).
    return error(503, 'unavailable:live', `live updates are unavailable: the database cannot be reached; try again in ${RETRY_AFTER_S} s`, {
      'Retry-After': String(RETRY_AFTER_S),
    });
  }
}

/** The answer to `GET /api/live?site=…[&unit=…]`: the event stream, or a JSON error naming the problem. */
export async function answerLiveStream(request: Request): Promise<Response> {
  const params = new URL(request.url).searchParams;
  const parsed = liveQuerySchema.safeParse({ site: params.get('site') ?? undefined, unit: params.get('unit') || undefined });
  if (!parsed.success) return error(400, 'bad-input:live', parsed.error.issues[0]!.message);
  const { site, unit } = parsed.data;
  const scope = await scopeOf(site, unit);
  if (scope instanceof Response) return scope;
  if (!scope) return error(404, 'not-found:live', unit ? `no unit "${unit}" on site "${site}"` : `no site "${site}"`);

  const hub = getLiveHub();
  if (!hub.openStream(getConfig().LIVE_MAX_STREAMS)) {
    return error(503, 'unavailable:live', `too many live streams open on this server; try again in ${RETRY_AFTER_S} s`, {
      'Retry-After': String(RETRY_AFTER_S),
    });
  }
  const body = createLiveStream({
    hub,
    siteId: scope.siteId,
    unitId: scope.unitId,
    lastEventId: request.headers.get('last-event-id') ?? params.get('lastEventId'),
    signal: request.signal,
  });
  return new Response(body, { headers: SSE_HEADERS });
}
