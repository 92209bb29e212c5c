/**
 * Which units are registered, by id. Units are registered by `units import`,
 * never created by whoever publishes, so a unit the directory does not know
 * is looked up once more in the database before its samples are quarantined.
 */
import { getUnitEntries, type UnitEntry } from './queries';
import type { SqlRunner } from './sql';

/** How long the whole directory is trusted before it is read again (a unit may move site). */
export const DIRECTORY_REFRESH_MS = 60_000;

export type UnitResolution =
  | { ok: true; unit: UnitEntry }
  | { ok: false; reason: string };

export interface UnitDirectory {
  /** Resolves every (site, unit) pair named, reading the database at most once. */
  resolve(pairs: ReadonlyArray<{ siteId: string; unitId: string }>): Promise<Map<string, UnitResolution>>;
  /** Number of units known. */
  size(): number;
  /** True when the unit is known here, under that site (no database read). */
  knows(siteId: string, unitId: string): boolean;
}

/** The key of a (site, unit) pair in the map `resolve` returns. */
export function pairKey(siteId: string, unitId: string): string {
  return `${siteId}/${unitId}`;
}

/** A directory over `db`, reloaded in full every {@link DIRECTORY_REFRESH_MS}. */
export function createUnitDirectory({ db, now = Date.now }: { db: SqlRunner; now?: () => number }): UnitDirectory {
  let byId = new Map<string, UnitEntry>();
  let loadedAt = -Infinity;

  return {
    size: () => byId.size,
    knows: (siteId, unitId) => byId.get(unitId)?.siteId === siteId,
    async resolve(pairs) {
      if (now() - loadedAt > DIRECTORY_REFRESH_MS) {
        const all = await getUnitEntries({ db });
        byId = new Map(all.map((u) => [u.id, u]));
        loadedAt = now();
      } else {
        const missing = [...new Set(pairs.map((p) => p.unitId).filter((id) => !byId.has(id)))];
        if (missing.length > 0) for (const u of await getUnitEntries({ db, unitIds: missing })) byId.set(u.id, u);
      }
      const out = new Map<string, UnitResolution>();
      for (const { siteId, unitId } of pairs) {
        const unit = byId.get(unitId);
        let resolution: UnitResolution;
        if (!unit) {
          resolution = {
            ok: false,
            reason: `unit "${unitId}" is not registered; register it with \`npx millrace units import FLEET.json\` before it publishes`,
          };
        } else if (unit.siteId !== siteId) {
          resolution = {
            ok: false,
            reason: `unit "${unitId}" is registered under site "${unit.siteId}", not "${siteId}"; publish on millrace/${unit.siteId}/${unitId}/... or correct the fleet file`,
          };
        } else resolution = { ok: true, unit };
        out.set(pairKey(siteId, unitId), resolution);
      }
      return out;
    },
  };
}
