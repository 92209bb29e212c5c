/**
 * What every screen loader, route handler and server action starts from:
 * this process's database and the viewer of the current request. app/ never
 * opens the database itself (lint refuses db/ there); it calls a lib function
 * that calls this.
 */
import { getDatabase, type DatabaseHandle, type Db } from '@/db/client';
import { currentViewer, type Viewer } from '@/lib/auth/viewer';

export interface RequestContext {
  readonly db: Db;
  /** The whole handle, for what needs more than queries (the live publisher, the backend's name). */
  readonly handle: DatabaseHandle;
  readonly viewer: Viewer;
  /** The request's clock: one "now" for every query of a screen. */
  readonly nowMs: number;
}

/**
 * The database and the viewer of this request. Nobody signed in: a redirect
 * to sign-in on a page or action, a 401 AppError under /api (lib/auth/request.ts).
 */
export async function requestContext(): Promise<RequestContext> {
  const handle = await getDatabase();
  const viewer = await currentViewer();
  return { db: handle.db, handle, viewer, nowMs: Date.now() };
}

/** The database alone, for what is open without a viewer (sign-in, display links, the health check). */
export async function databaseOnly(): Promise<{ db: Db; handle: DatabaseHandle }> {
  const handle = await getDatabase();
  return { db: handle.db, handle };
}
