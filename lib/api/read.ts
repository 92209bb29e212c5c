/**
 * The read API's calls, one function each, so that a route is one line: the
 * database of this process, the viewer of the request, and the same queries
 * as the screens. The `*Answer` functions take the database and viewer
 * explicitly (tests call them); the `answer*` ones find both for a request.
 */
import type { Db } from '@/db/client';
import type { Viewer } from '@/lib/auth/viewer';
import { requestContext } from '@/lib/request/context';
import { getSitesWithUnitIds } from '@/lib/fleet/queries';
import { getUnitHealthReport } from '@/lib/units/queries';
import { answer, jsonResponse, notFound, parseParams, unitParamsSchema } from './http';

/** `GET /api/v1/sites` for a viewer. */
export function sitesAnswer({ db, viewer }: { db: Db; viewer: Viewer }): Promise<Response> {
  return answer(async () => jsonResponse({ sites: await getSitesWithUnitIds({ db, viewer }) }));
}

/** `GET /api/v1/units/SITE/UNIT/health` for a viewer: 404 for no such unit (or not the viewer's) and before the first diagnosis. */
export function unitHealthAnswer({ db, viewer, params }: { db: Db; viewer: Viewer; params: unknown }): Promise<Response> {
  return answer(async () => {
    const { siteId, unitId } = parseParams(unitParamsSchema, params);
    const report = await getUnitHealthReport({ db, viewer, siteId, unitId });
    if (report === undefined) return notFound(`unit ${siteId}/${unitId} (or its first diagnosis)`);
    return jsonResponse(report);
  });
}

/** `GET /api/v1/sites` of this request. */
export function answerSites(): Promise<Response> {
  return answer(async () => {
    const { db, viewer } = await requestContext();
    return sitesAnswer({ db, viewer });
  });
}

/** `GET /api/v1/units/SITE/UNIT/health` of this request. */
export function answerUnitHealth(params: unknown): Promise<Response> {
  return answer(async () => {
    const { db, viewer } = await requestContext();
    return unitHealthAnswer({ db, viewer, params });
  });
}
