/**
 * `GET /api/v1/alerts?state=active|all&site=SITE` (contract section 6):
 * `{ "alerts": [ alert, ... ] }`, newest first, the alert object of section 7,
 * the viewer's sites only. `state` defaults to `active` (the crews' list);
 * a bad `state` or `site` is a 400 naming it, a site the caller may not see
 * a 404 like one that does not exist. At most {@link MAX_ALERT_PAGE} alerts.
 */
import { z } from 'zod';
import type { Db } from '@/db/client';
import { canSeeSite, type Viewer } from '@/lib/auth/viewer';
import type { AlertObject } from '@/lib/contract/alerts';
import { SLUG } from '@/lib/contract/nameplate';
import { getConfig } from '@/lib/config/env';
import { getSitesWithUnitIds } from '@/lib/fleet/queries';
import { answer, jsonResponse, notFound, parseParams } from '@/lib/api/http';
import { requestContext } from '@/lib/request/context';
import { getAlerts, MAX_ALERT_PAGE } from './queries';
import { alertObjectOf } from './store';

/** The query string of the call; other parameters are ignored. */
export const alertsParamsSchema = z.object({
  state: z.enum(['active', 'all'], { error: (i) => `state: must be active or all, got "${String(i.input)}"` }).default('active'),
  site: z
    .string()
    .regex(SLUG, { error: (i) => `site: must be 1 to 64 of a-z, 0-9 and -, got "${String(i.input)}"` })
    .optional(),
});

/** The answer's body for a viewer: the alerts, newest first. */
export async function readAlertsAnswer({
  db,
  viewer,
  state,
  siteId,
  baseUrl = '',
}: {
  db: Db;
  viewer: Viewer;
  state: 'active' | 'all';
  siteId?: string;
  baseUrl?: string;
}): Promise<{ alerts: AlertObject[] }> {
  const { alerts } = await getAlerts({ db, viewer, state, siteId, limit: MAX_ALERT_PAGE });
  return { alerts: alerts.map((a) => alertObjectOf(a.row, { siteId: a.siteId, unitId: a.unitId }, baseUrl)) };
}

/** `GET /api/v1/alerts` for a viewer; `search` is the request's query string. */
export function alertsAnswer({ db, viewer, search, baseUrl }: { db: Db; viewer: Viewer; search: URLSearchParams; baseUrl?: string }): Promise<Response> {
  return answer(async () => {
    const params = parseParams(alertsParamsSchema, { state: search.get('state') ?? undefined, site: search.get('site') ?? undefined });
    if (params.site !== undefined) {
      const seen = canSeeSite(viewer, params.site) && (await getSitesWithUnitIds({ db, viewer })).some((s) => s.id === params.site);
      if (!seen) return notFound(`site ${params.site}`);
    }
    return jsonResponse(await readAlertsAnswer({ db, viewer, state: params.state, siteId: params.site, baseUrl }));
  });
}

/** `GET /api/v1/alerts` of this request. */
export function answerAlerts(request: Request): Promise<Response> {
  return answer(async () => {
    const { db, viewer } = await requestContext();
    return alertsAnswer({ db, viewer, search: new URL(request.url).searchParams, baseUrl: getConfig().PUBLIC_URL ?? '' });
  });
}
