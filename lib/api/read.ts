/**
 * The read API's calls, one function each, so that a route is one line: the
 * database of this process, the viewer of the request, and the same queries
 * as the screens.
 */
import { getDatabase } from '../../db/client';
import { currentViewer } from '../auth/viewer';
import { getSitesWithUnitIds } from '../fleet/queries';
import { getUnitHealthReport } from '../units/queries';
import { answer, jsonResponse, notFound, parseParams, unitParamsSchema } from './http';

/** `GET /api/v1/sites`. */
export function answerSites(): Promise<Response> {
  return answer(async () => {
    const { db } = await getDatabase();
    const sites = await getSitesWithUnitIds({ db, viewer: await currentViewer() });
    return jsonResponse({ sites });
  });
}

/** `GET /api/v1/units/SITE/UNIT/health`: 404 for no such unit (or not the caller's) and before the first diagnosis. */
export function answerUnitHealth(params: unknown): Promise<Response> {
  return answer(async () => {
    const { siteId, unitId } = parseParams(unitParamsSchema, params);
    const { db } = await getDatabase();
    const report = await getUnitHealthReport({ db, viewer: await currentViewer(), siteId, unitId });
    if (report === undefined) return notFound(`unit ${siteId}/${unitId} (or its first diagnosis)`);
    return jsonResponse(report);
  });
}
