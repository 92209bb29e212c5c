/**
 * The alert forms as values: which alerts to acknowledge and the note, and
 * a shelf's reason and end. Pure (the actions and their tests share them);
 * each problem is named by its form field.
 */
import { z } from 'zod';
import type { Parsed } from '@/lib/request/action';
import { epochMsOfWallClock } from '@/lib/energy/zoned-time';

/** Longest note or reason kept. */
export const MAX_NOTE_CHARS = 500;
/** Most alerts acknowledged in one go (a page's worth, with room). */
export const MAX_ACKNOWLEDGE_AT_ONCE = 200;
/** Longest shelf: an alert hidden for longer is one nobody means to see again (the alerts issue: at most 30 days). */
export const MAX_SHELVE_MS = 30 * 86_400_000;

/** How long to shelve for: a few fixed spans, or until a date. */
export const SHELVE_CHOICES = [
  { value: '1h', label: '1 hour', ms: 3_600_000 },
  { value: '8h', label: '8 hours', ms: 8 * 3_600_000 },
  { value: '24h', label: '24 hours', ms: 24 * 3_600_000 },
  { value: '7d', label: '7 days', ms: 7 * 86_400_000 },
  { value: 'until', label: 'Until a date and time', ms: undefined },
] as const;

const alertId = z
  .string()
  .regex(/^\d{1,15}$/, { error: (i) => `alertId: not an alert number, got "${String(i.input)}"` })
  .transform(Number);

export interface AcknowledgeInput {
  readonly alertIds: number[];
  readonly note: string | undefined;
}

const note = (field: string, what: string) =>
  z
    .string()
    .trim()
    .max(MAX_NOTE_CHARS, { error: `${field}: at most ${MAX_NOTE_CHARS} characters for the ${what}` });

/** The alerts ticked (every `alertId` of the form) and an optional note. */
export function acknowledgeFromForm(data: FormData): Parsed<AcknowledgeInput> {
  const ids = data.getAll('alertId').filter((v): v is string => typeof v === 'string' && v !== '');
  if (ids.length === 0) return { ok: false, fieldErrors: { alertId: 'alertId: choose at least one alert to acknowledge' } };
  if (ids.length > MAX_ACKNOWLEDGE_AT_ONCE) return { ok: false, fieldErrors: { alertId: `alertId: at most ${MAX_ACKNOWLEDGE_AT_ONCE} alerts at once` } };
  const parsed = z.array(alertId).safeParse(ids);
  if (!parsed.success) return { ok: false, fieldErrors: { alertId: parsed.error.issues[0]!.message } };
  const noted = note('note', 'note').safeParse(String(data.get('note') ?? ''));
  if (!noted.success) return { ok: false, fieldErrors: { note: noted.error.issues[0]!.message } };
  return { ok: true, value: { alertIds: [...new Set(parsed.data)], note: noted.data === '' ? undefined : noted.data } };
}

export interface ShelveInput {
  readonly reason: string;
  readonly untilMs: number;
}

/** `YYYY-MM-DDTHH:MM` as a datetime-local input sends it, read on the wall clock of `timeZone`. */
function wallClockOf(text: string, timeZone: string): number | undefined {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2}))?$/.exec(text.trim());
  if (!m) return undefined;
  const [y, mo, d, h, mi, s] = m.slice(1).map((x) => Number(x ?? 0)) as [number, number, number, number, number, number];
  const wall = Date.UTC(y, mo - 1, d, h, mi, s);
  const back = new Date(wall);
  if (back.getUTCMonth() !== mo - 1 || back.getUTCDate() !== d || h > 23 || mi > 59) return undefined;
  return epochMsOfWallClock(wall, timeZone);
}

/**
 * A shelf from the form: `reason` (required), `for` (one of {@link SHELVE_CHOICES}) and, for
 * `until`, `until` on the site's wall clock; the end must be after now and at most 30 days on.
 */
export function shelveFromForm(values: Record<string, string>, { nowMs, timeZone }: { nowMs: number; timeZone: string }): Parsed<ShelveInput> {
  const fieldErrors: Record<string, string> = {};
  const reason = note('reason', 'reason').min(1, { error: 'reason: say why the alert is shelved' }).safeParse(values.reason ?? '');
  if (!reason.success) fieldErrors.reason = reason.error.issues[0]!.message;
  const choice = SHELVE_CHOICES.find((c) => c.value === (values.for ?? ''));
  let untilMs: number | undefined;
  if (!choice) fieldErrors.for = 'for: choose how long to shelve it';
  else if (choice.ms !== undefined) untilMs = nowMs + choice.ms;
  else {
    untilMs = wallClockOf(values.until ?? '', timeZone);
    if (untilMs === undefined) fieldErrors.until = 'until: give a date and time, such as 2026-05-01T08:00';
    else if (untilMs <= nowMs) fieldErrors.until = 'until: must be in the future';
    else if (untilMs - nowMs > MAX_SHELVE_MS) fieldErrors.until = 'until: at most 30 days from now';
  }
  if (Object.keys(fieldErrors).length > 0 || !reason.success || untilMs === undefined) return { ok: false, fieldErrors };
  return { ok: true, value: { reason: reason.data, untilMs } };
}
