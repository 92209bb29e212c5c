/**
 * The alert screens: the list for crews and operators (filtered by site,
 * severity, state and condition from the search parameters; a bad one is
 * named and dropped) and one alert with its history and the safety caution.
 * Each row carries its texts chosen: the condition in plain words, reading
 * and limit with units, the state as text, stale and chattering marks, and
 * whether the viewer may act on it.
 */
import { z } from 'zod';
import type { Db } from '@/db/client';
import { SEVERITIES } from '@/db/schema';
import { canAcknowledge, type Viewer } from '@/lib/auth/viewer';
import { ALERT_CONDITIONS, type AlertCondition, type AlertState } from '@/lib/contract/alerts';
import { SLUG } from '@/lib/contract/nameplate';
import { SAFETY_CAUTION } from '@/lib/diagnosis/findings';
import type { UnitState } from '@/lib/fleet/unit-state';
import { requestContext } from '@/lib/request/context';
import { getSetupSites } from '@/lib/setup/queries';
import type { AlertSeverity } from './conditions';
import { SHELVE_CHOICES } from './forms';
import { isChattering, isStale } from './lifecycle';
import { formatAlertCursor, getAlertById, getAlerts, parseAlertCursor, type AlertWithPlace } from './queries';
import { alertLifeOf } from './store';
import { CONDITION_NAME, EVENT_NAME, formatAlertReading, severityName, STATE_NAME, stateText } from './words';

type Search = Record<string, string | string[] | undefined>;
const one = (v: string | string[] | undefined): string | undefined => (Array.isArray(v) ? v[0] : v);
const blankToUndefined = (v: string | undefined) => (v === undefined || v === '' ? undefined : v);

/** The list's state choices: `active` is the crews' list; the others one state exactly, or all. */
export const LIST_STATES = ['active', 'all', 'acknowledged', 'shelved', 'cleared'] as const;
export type ListState = (typeof LIST_STATES)[number];
const LIST_STATE_LABEL: Record<ListState, string> = {
  active: "Crews' list: open, or not yet taken",
  all: 'All, history included',
  acknowledged: 'Acknowledged only',
  shelved: 'Shelved only',
  cleared: 'Cleared only',
};

const pick = <T extends string>(name: string, values: readonly T[]) =>
  z.preprocess(blankToUndefined, z.enum(values, { error: (i) => `${name}: no such ${name} "${String(i.input)}"` }).optional());

/** Search parameters of /alerts. */
export const alertsQuerySchema = z.object({
  site: z.preprocess(blankToUndefined, z.string().regex(SLUG, { error: 'site: not a site id (1 to 64 of a-z, 0-9 and -)' }).optional()),
  unit: z.preprocess(blankToUndefined, z.string().regex(SLUG, { error: 'unit: not a unit id (1 to 64 of a-z, 0-9 and -)' }).optional()),
  severity: pick('severity', SEVERITIES),
  state: pick('state', LIST_STATES),
  condition: pick('condition', ALERT_CONDITIONS),
  before: z.preprocess(blankToUndefined, z.string().regex(/^\d{1,15}-\d{1,18}$/, { error: 'before: not a page position of this screen' }).optional()),
});
export type AlertsQuery = z.output<typeof alertsQuerySchema>;

/** The list's address for a filter and page. */
export function alertsHref(params: Partial<Record<keyof AlertsQuery, string | undefined>>): string {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v) q.set(k, v);
  const s = q.toString();
  return s ? `/alerts?${s}` : '/alerts';
}

/** One alert as a row of the list, and the head of its own page. */
export interface AlertRowView {
  readonly id: string;
  readonly href: string;
  readonly siteId: string;
  readonly siteName: string;
  readonly siteHref: string;
  readonly unitId: string;
  readonly unitName: string | null;
  readonly unitHref: string;
  readonly timeZone: string;
  readonly condition: AlertCondition;
  readonly conditionName: string;
  readonly severity: AlertSeverity;
  readonly severityName: string;
  /** The badge's shape and colour: alarm a fault, warning a warning, a note neutral. */
  readonly badge: UnitState;
  readonly state: AlertState;
  readonly stateText: string;
  readonly message: string;
  readonly reading: string;
  readonly limit: string;
  readonly openedAt: Date;
  readonly changedAt: Date;
  readonly acknowledgedAt: Date | null;
  readonly acknowledgedBy: string | null;
  readonly acknowledgeNote: string | null;
  readonly clearedAt: Date | null;
  readonly shelvedUntil: Date | null;
  readonly shelveReason: string | null;
  /** Active, untaken, for over a day. */
  readonly stale: boolean;
  /** Came and went three or more times in the last minute. */
  readonly chattering: boolean;
  readonly mayAcknowledge: boolean;
  readonly mayShelve: boolean;
}

const BADGE: Record<AlertSeverity, UnitState> = { alarm: 'fault', warning: 'warning', info: 'not-judged' };

/** The view of one alert for a viewer at `nowMs`. */
export function alertRowView(a: AlertWithPlace, viewer: Viewer, nowMs: number): AlertRowView {
  const { row } = a;
  const life = alertLifeOf(row);
  const mayAct = canAcknowledge(viewer);
  const siteHref = `/sites/${a.siteId}`;
  return {
    id: String(row.id),
    href: `/alerts/${row.id}`,
    siteId: a.siteId,
    siteName: a.siteName,
    siteHref,
    unitId: a.unitId,
    unitName: a.unitName,
    unitHref: `${siteHref}/units/${a.unitId}`,
    timeZone: a.timezone,
    condition: row.condition,
    conditionName: CONDITION_NAME[row.condition],
    severity: row.severity,
    severityName: severityName(row.severity),
    badge: BADGE[row.severity],
    state: row.state,
    stateText: stateText(row.state, row.acknowledgedAt !== null),
    message: row.message,
    reading: formatAlertReading(row.condition, row.value),
    limit: formatAlertReading(row.condition, row.limitValue),
    openedAt: row.openedAt,
    changedAt: row.changedAt,
    acknowledgedAt: row.acknowledgedAt,
    acknowledgedBy: row.acknowledgedBy,
    acknowledgeNote: row.acknowledgeNote,
    clearedAt: row.clearedAt,
    shelvedUntil: row.shelvedUntil,
    shelveReason: row.shelveReason,
    stale: isStale(life, nowMs),
    chattering: isChattering(life, nowMs),
    mayAcknowledge: mayAct && row.acknowledgedAt === null,
    mayShelve: mayAct && row.state !== 'cleared',
  };
}

export interface FilterOption {
  readonly value: string;
  readonly label: string;
}

export interface AlertsScreen {
  readonly query: AlertsQuery;
  /** A search parameter that could not be used, naming it. */
  readonly problem: string | undefined;
  readonly filtered: boolean;
  readonly options: { sites: FilterOption[]; severities: FilterOption[]; states: FilterOption[]; conditions: FilterOption[] };
  /** The alerts shown, newest first (in the crews' list: the shelved ones apart). */
  readonly rows: AlertRowView[];
  /** In the crews' list, the shelved alerts of this page, shown apart. */
  readonly shelved: AlertRowView[];
  readonly summary: string;
  readonly emptyText: string;
  /** The viewer may acknowledge and shelve (crew, operators, admins). */
  readonly canAct: boolean;
  readonly shelveChoices: FilterOption[];
  readonly newestHref: string | undefined;
  readonly olderHref: string | undefined;
}

export async function loadAlertsScreen(search: Search): Promise<AlertsScreen> {
  const { db, viewer, nowMs } = await requestContext();
  return readAlertsScreen({ db, viewer, nowMs, search });
}

function parseQuery(search: Search): { query: AlertsQuery; problem: string | undefined } {
  const raw = Object.fromEntries(Object.keys(alertsQuerySchema.shape).map((k) => [k, one(search[k])]));
  const parsed = alertsQuerySchema.safeParse(raw);
  if (parsed.success) return { query: parsed.data, problem: undefined };
  // Drop the bad parameters only, keep the good ones.
  const bad = new Set(parsed.error.issues.map((i) => String(i.path[0])));
  const kept = alertsQuerySchema.parse(Object.fromEntries(Object.entries(raw).filter(([k]) => !bad.has(k))));
  return { query: kept, problem: parsed.error.issues.map((i) => i.message).join('; ') };
}

/** The list's view model for the viewer (only their sites' alerts). */
export async function readAlertsScreen({ db, viewer, nowMs, search }: { db: Db; viewer: Viewer; nowMs: number; search: Search }): Promise<AlertsScreen> {
  const { query, problem } = parseQuery(search);
  const listState = query.state ?? 'active';
  const [sites, page] = await Promise.all([
    getSetupSites({ db, viewer }),
    getAlerts({
      db,
      viewer,
      state: listState === 'active' ? 'active' : 'all',
      inState: listState === 'active' || listState === 'all' ? undefined : listState,
      siteId: query.site,
      unitId: query.site ? query.unit : undefined,
      severity: query.severity,
      condition: query.condition,
      before: query.before ? parseAlertCursor(query.before) : undefined,
    }),
  ]);
  const views = page.alerts.map((a) => alertRowView(a, viewer, nowMs));
  const apart = listState === 'active';
  const rows = apart ? views.filter((v) => v.state !== 'shelved') : views;
  const shelved = apart ? views.filter((v) => v.state === 'shelved') : [];
  const siteName = query.site ? `site ${sites.find((s) => s.id === query.site)?.name ?? query.site}` : undefined;
  const where = siteName === undefined ? 'your sites' : query.unit ? `unit ${query.unit} of ${siteName}` : siteName;
  const keep = { site: query.site, unit: query.site ? query.unit : undefined, severity: query.severity, state: query.state, condition: query.condition };
  return {
    query,
    problem,
    filtered: Object.values(keep).some((v) => v !== undefined),
    options: {
      sites: sites.map((s) => ({ value: s.id, label: s.name })),
      severities: [...SEVERITIES].reverse().map((s) => ({ value: s, label: severityName(s) })),
      states: LIST_STATES.map((s) => ({ value: s, label: LIST_STATE_LABEL[s] })),
      conditions: ALERT_CONDITIONS.map((c) => ({ value: c, label: CONDITION_NAME[c] })),
    },
    rows,
    shelved,
    summary: `${views.length === 0 ? 'No' : views.length}${page.next ? '+' : ''} ${views.length === 1 ? 'alert' : 'alerts'} for ${where}${apart ? ` in the crews' list${shelved.length ? `, ${shelved.length} of them shelved` : ''}` : ''}.`,
    emptyText: query.before
      ? 'No older alerts.'
      : apart
        ? `Nothing needs attention on ${where}: no open alert, and every cleared one has been acknowledged.`
        : `No alerts on ${where} with this filter.`,
    canAct: canAcknowledge(viewer),
    shelveChoices: SHELVE_CHOICES.map((c) => ({ value: c.value, label: c.label })),
    newestHref: query.before ? alertsHref(keep) : undefined,
    olderHref: page.next ? alertsHref({ ...keep, before: formatAlertCursor(page.next) }) : undefined,
  };
}

/** One change of an alert, as its history lists it. */
export interface AlertHistoryEntry {
  readonly at: Date;
  readonly what: string;
  readonly state: string;
  readonly by: string;
  readonly note: string | null;
}

export interface AlertScreen {
  readonly alert: AlertRowView;
  readonly history: AlertHistoryEntry[];
  /** The words of the findings for anyone sent to the machine. */
  readonly caution: string;
  /** Where the unit's own page, its site, and the list of the unit's site are. */
  readonly links: { unit: string; site: string; siteAlerts: string };
  readonly trail: Array<{ label: string; href?: string }>;
  readonly canAct: boolean;
  readonly shelveChoices: FilterOption[];
}

const alertIdParam = z.string().regex(/^\d{1,15}$/).transform(Number);

export async function loadAlertScreen(alertId: string): Promise<AlertScreen | undefined> {
  const { db, viewer, nowMs } = await requestContext();
  return readAlertScreen({ db, viewer, nowMs, alertId });
}

/** One alert's view model, or undefined when it does not exist or is not the viewer's. */
export async function readAlertScreen({ db, viewer, nowMs, alertId }: { db: Db; viewer: Viewer; nowMs: number; alertId: string }): Promise<AlertScreen | undefined> {
  const id = alertIdParam.safeParse(alertId);
  if (!id.success) return undefined;
  const found = await getAlertById({ db, viewer, alertId: id.data });
  if (!found) return undefined;
  const alert = alertRowView(found, viewer, nowMs);
  return {
    alert,
    history: found.events.map((e) => ({
      at: e.at,
      what: EVENT_NAME[e.type],
      state: STATE_NAME[e.toState],
      by: e.actor === 'evaluator' ? 'millrace' : e.actor,
      note: e.note,
    })),
    caution: SAFETY_CAUTION,
    links: { unit: alert.unitHref, site: alert.siteHref, siteAlerts: alertsHref({ site: alert.siteId, state: 'all' }) },
    trail: [{ label: 'Alerts', href: '/alerts' }, { label: `${alert.conditionName} · ${alert.unitId}` }],
    canAct: canAcknowledge(viewer),
    shelveChoices: SHELVE_CHOICES.map((c) => ({ value: c.value, label: c.label })),
  };
}
