import { getDatabase } from '@/db/client';
import { currentViewer } from '@/lib/auth/viewer';
import { isAppError } from '@/lib/errors/app-error';
import { getConfig } from '@/lib/config/env';
import { getLiveHub } from '@/lib/live/hub';
import { ensureLiveListener } from '@/lib/live/listener';
import { getLiveScope } from '@/lib/live/queries';
import { createLiveStream, SSE_HEADERS } from '@/lib/live/sse';
import { liveQuerySchema } from './schema';

export const dynamic = 'force-dynamic';

/** Seconds a client told "too many streams" waits before trying again. */
const RETRY_AFTER_S = 30;

function error(status: number, code: string, message: string, headers: Record<string, string> = {}) {
  return Response.json({ error: { code, message } }, { status, headers: { 'Cache-Control': 'no-store', ...headers } });
}

/**
 * Live updates of one site (`?site=`) or one unit (`?site=&unit=`) as
 * Server-Sent Events: one stream per page (lib/live/sse.ts).
 */
export async function GET(request: Request) {
  const params = new URL(request.url).searchParams;
  const parsed = liveQuerySchema.safeParse({ site: params.get('site') ?? undefined, unit: params.get('unit') || undefined });
  if (!parsed.success) return error(400, 'bad-input:live', parsed.error.issues[0]!.message);
  const { site, unit } = parsed.data;

  let scope;
  try {
    const handle = await getDatabase();
    await ensureLiveListener(handle);
    scope = await getLiveScope({ db: handle.db, viewer: await currentViewer(), siteId: site, unitId: unit });
  } catch (caught) {
    if (isAppError(caught, 'unauthenticated')) return error(401, 'unauthenticated', caught.message);
    // The page keeps what it shows and tries again (LiveUpdates retries a refused stream).
    return error(503, 'unavailable:live', `live updates are unavailable: the database cannot be reached; try again in ${RETRY_AFTER_S} s`, {
      'Retry-After': String(RETRY_AFTER_S),
    });
  }
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
