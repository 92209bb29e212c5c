/**
 * A FLEET.json checked and imported exactly as `npx millrace units import`
 * does it (lib/cli/units.ts): the contract's fleet schema, every problem
 * with its path (`units[3].poles: must be an even number, got 7`), units
 * whose site is neither in the file nor in the database, and then
 * `upsertFleet`, all or nothing. On top, for the setup screen, a report per
 * entry: added, updated, or invalid and why.
 */
import { inArray } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { sites, units } from '@/db/schema';
import { canEditSetup, canSeeSite, type Viewer } from '@/lib/auth/viewer';
import { fleetSchema, type Fleet } from '@/lib/contract/nameplate';
import { formatIssues } from '@/lib/contract/telemetry';
import { findFleetProblems, upsertFleet, type FleetUpsertResult } from '@/lib/setup/queries';

/** Largest FLEET.json the setup screen takes (some 1,500 units): under the 1 MB a server action accepts. */
export const MAX_FLEET_FILE_BYTES = 900_000;

export interface FleetImportEntry {
  /** `sites[0]`, `units[3]`. */
  path: string;
  kind: 'site' | 'unit';
  /** The entry's id as written (may be missing or invalid). */
  id?: string;
  siteId?: string;
  action: 'add' | 'update' | 'invalid';
  /** Its problems, each with its full path. */
  problems: string[];
}

export interface FleetImportReport {
  /** True when every entry is valid (and, when applying, the import was made). */
  ok: boolean;
  entries: FleetImportEntry[];
  /** Every problem, as the command line prints them. */
  problems: string[];
  /** Problems of the file as a whole (not JSON, no lists). */
  fileProblems: string[];
  /** What changed, when the import was applied. */
  applied?: FleetUpsertResult;
}

/** The JSON of an uploaded file, or the problem with it (naming the line of a syntax error). */
export function parseFleetText(text: string): { ok: true; raw: unknown } | { ok: false; problem: string } {
  if (text.trim() === '') return { ok: false, problem: 'the file is empty' };
  try {
    return { ok: true, raw: JSON.parse(text) };
  } catch (error) {
    const at = jsonErrorOffset(text);
    const line = at === undefined ? undefined : text.slice(0, at).split('\n').length;
    return { ok: false, problem: `${line === undefined ? '' : `line ${line}: `}not valid JSON (${(error as Error).message.split('\n')[0]})` };
  }
}

function endsEarly(text: string): boolean {
  try {
    JSON.parse(text);
    return true;
  } catch (error) {
    return /end of JSON input|Unterminated/i.test((error as Error).message);
  }
}

/**
 * Where JSON.parse gives up on `text`, as a character offset. Node's messages
 * do not always say, so it is found from the parser itself: every prefix up
 * to the fault only "ends early", every longer one fails on the fault.
 */
function jsonErrorOffset(text: string): number | undefined {
  const said = /position (\d+)/.exec((() => {
    try {
      JSON.parse(text);
      return '';
    } catch (error) {
      return (error as Error).message;
    }
  })());
  if (said) return Number(said[1]);
  let lo = 0;
  let hi = text.length;
  if (endsEarly(text)) return text.length;
  // Invariant: prefix of length lo ends early; prefix of length hi fails on the fault.
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (endsEarly(text.slice(0, mid))) lo = mid;
    else hi = mid;
  }
  return hi - 1;
}

function stringAt(value: unknown, key: string): string | undefined {
  if (value === null || typeof value !== 'object') return undefined;
  const v = (value as Record<string, unknown>)[key];
  return typeof v === 'string' ? v : undefined;
}

function listAt(raw: unknown, key: 'sites' | 'units'): unknown[] {
  if (raw === null || typeof raw !== 'object') return [];
  const v = (raw as Record<string, unknown>)[key];
  return Array.isArray(v) ? v : [];
}

/**
 * Checks `raw` (a parsed FLEET.json) for `viewer` and, with `apply`, imports
 * it when every entry is valid. Nothing changes when anything is invalid.
 */
export async function importFleetFile({ db, viewer, raw, apply }: { db: Db; viewer: Viewer; raw: unknown; apply: boolean }): Promise<FleetImportReport> {
  const problems: string[] = [];
  let fleet: Fleet | undefined;
  const parsed = fleetSchema.safeParse(raw);
  if (parsed.success) {
    fleet = parsed.data;
    problems.push(...(await findFleetProblems({ db, fleet })));
  } else {
    problems.push(...formatIssues(parsed.error.issues));
  }

  const rawSites = listAt(raw, 'sites');
  const rawUnits = listAt(raw, 'units');
  const siteIds = rawSites.map((s) => stringAt(s, 'id')).filter((id): id is string => id !== undefined);
  const unitIds = rawUnits.map((u) => stringAt(u, 'id')).filter((id): id is string => id !== undefined);
  const existingSites = new Set(
    siteIds.length === 0 ? [] : (await db.select({ id: sites.id }).from(sites).where(inArray(sites.id, siteIds))).map((s) => s.id),
  );
  const existingUnits = new Map(
    unitIds.length === 0
      ? []
      : (await db.select({ id: units.id, siteId: units.siteId }).from(units).where(inArray(units.id, unitIds))).map((u) => [u.id, u.siteId] as const),
  );

  // Who may change what: the same rules as the forms.
  if (!canEditSetup(viewer)) problems.unshift('you may not change the setup (your role is read-only)');
  rawSites.forEach((s, i) => {
    const id = stringAt(s, 'id');
    if (id !== undefined && !canSeeSite(viewer, id)) problems.push(`sites[${i}].id: "${id}" is not one of the sites you may change`);
  });
  rawUnits.forEach((u, i) => {
    const siteId = stringAt(u, 'siteId');
    if (siteId !== undefined && !canSeeSite(viewer, siteId)) problems.push(`units[${i}].siteId: "${siteId}" is not one of the sites you may change`);
  });

  const problemsOf = (path: string) => problems.filter((p) => p.startsWith(`${path}.`) || p.startsWith(`${path}:`));
  const entries: FleetImportEntry[] = [
    ...rawSites.map((s, i): FleetImportEntry => {
      const path = `sites[${i}]`;
      const id = stringAt(s, 'id');
      const own = problemsOf(path);
      return { path, kind: 'site', id, action: own.length > 0 ? 'invalid' : id !== undefined && existingSites.has(id) ? 'update' : 'add', problems: own };
    }),
    ...rawUnits.map((u, i): FleetImportEntry => {
      const path = `units[${i}]`;
      const id = stringAt(u, 'id');
      const own = problemsOf(path);
      return {
        path,
        kind: 'unit',
        id,
        siteId: stringAt(u, 'siteId'),
        action: own.length > 0 ? 'invalid' : id !== undefined && existingUnits.has(id) ? 'update' : 'add',
        problems: own,
      };
    }),
  ];
  const fileProblems = problems.filter((p) => !/^(sites|units)\[\d+\]/.test(p));
  const report: FleetImportReport = { ok: problems.length === 0, entries, problems, fileProblems };
  if (report.ok && apply && fleet) {
    report.applied = await upsertFleet({ db, fleet });
    const { actorOfViewer, writeAudit } = await import('@/lib/auth/audit');
    await writeAudit({
      db,
      actor: actorOfViewer(viewer),
      action: 'fleet-imported',
      target: `${fleet.sites.length} sites, ${fleet.units.length} units`,
      detail: { ...report.applied, sites: fleet.sites.map((s) => s.id), units: fleet.units.map((u) => `${u.siteId}/${u.id}`) },
    });
  }
  return report;
}

/** A FLEET.json sent from the import screen: its text and JSON, or the problem with the upload itself, in words. */
export type FleetUpload =
  | { ok: true; intent: 'check' | 'import'; fileName: string; text: string; raw: unknown }
  | { ok: false; intent: 'check' | 'import'; fileName?: string; problem: string };

/**
 * Reads the import form: a file chosen (`file`), or the text of a file checked
 * before and sent back (`fleetText`, `fileName`), so that it can be imported
 * without choosing it again; `intent` "check" only checks. Files over
 * MAX_FLEET_FILE_BYTES go to the command line.
 */
export async function readFleetUpload(data: FormData): Promise<FleetUpload> {
  const intent = data.get('intent') === 'check' ? 'check' : 'import';
  const file = data.get('file');
  const checked = data.get('fleetText');
  let text: string;
  let fileName: string;
  if (typeof checked === 'string' && checked !== '') {
    text = checked;
    fileName = String(data.get('fileName') ?? 'FLEET.json').slice(0, 200);
  } else if (file instanceof File && file.size > 0) {
    fileName = file.name;
    if (file.size > MAX_FLEET_FILE_BYTES) {
      return {
        ok: false,
        intent,
        fileName,
        problem: `${fileName} is ${file.size.toLocaleString('en-US')} bytes; the screen takes up to ${MAX_FLEET_FILE_BYTES.toLocaleString('en-US')}. Import larger fleets with npx millrace units import.`,
      };
    }
    text = await file.text();
  } else {
    return { ok: false, intent, problem: file instanceof File && file.name ? `${file.name} is empty` : 'Choose a FLEET.json file first.' };
  }
  if (Buffer.byteLength(text) > MAX_FLEET_FILE_BYTES) return { ok: false, intent, fileName, problem: `${fileName} is too large for the screen; use npx millrace units import` };
  const parsed = parseFleetText(text);
  if (!parsed.ok) return { ok: false, intent, fileName, problem: `${fileName}: ${parsed.problem}` };
  return { ok: true, intent, fileName, text, raw: parsed.raw };
}
