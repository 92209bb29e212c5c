/**
 * The alert forms as values: which alerts are ticked, the note's length, and
 * a shelf's end (a span, or a time on the site's wall clock, in the future
 * and at most 30 days on), each problem named by its field.
 */
import { describe, expect, it } from 'vitest';
import { acknowledgeFromForm, MAX_NOTE_CHARS, shelveFromForm } from './forms';

function form(values: Record<string, string | string[]>): FormData {
  const data = new FormData();
  for (const [k, v] of Object.entries(values)) for (const one of [v].flat()) data.append(k, one);
  return data;
}

describe('acknowledge form', () => {
  it('takes every ticked alert once, and a trimmed note', () => {
    expect(acknowledgeFromForm(form({ alertId: ['3', '7', '3'], note: '  on my way  ' }))).toEqual({ ok: true, value: { alertIds: [3, 7], note: 'on my way' } });
    expect(acknowledgeFromForm(form({ alertId: '3', note: '' }))).toEqual({ ok: true, value: { alertIds: [3], note: undefined } });
  });

  it('names the field of each problem', () => {
    expect(acknowledgeFromForm(form({ note: 'x' }))).toEqual({ ok: false, fieldErrors: { alertId: 'alertId: choose at least one alert to acknowledge' } });
    expect(acknowledgeFromForm(form({ alertId: 'x1' }))).toEqual({ ok: false, fieldErrors: { alertId: 'alertId: not an alert number, got "x1"' } });
    expect(acknowledgeFromForm(form({ alertId: '1', note: 'n'.repeat(MAX_NOTE_CHARS + 1) }))).toEqual({
      ok: false,
      fieldErrors: { note: `note: at most ${MAX_NOTE_CHARS} characters for the note` },
    });
  });
});

describe('shelve form', () => {
  const nowMs = Date.UTC(2026, 3, 10, 12, 0);
  const shelve = (values: Record<string, string>) => shelveFromForm(values, { nowMs, timeZone: 'Europe/Oslo' });

  it('ends after a fixed span', () => {
    expect(shelve({ reason: 'Planned work', for: '1h' })).toEqual({ ok: true, value: { reason: 'Planned work', untilMs: nowMs + 3_600_000 } });
    expect(shelve({ reason: 'Planned work', for: '7d' })).toMatchObject({ ok: true, value: { untilMs: nowMs + 7 * 86_400_000 } });
  });

  it("reads a date on the site's clock (Oslo in April is UTC+2)", () => {
    expect(shelve({ reason: 'Survey', for: 'until', until: '2026-04-11T08:00' })).toEqual({ ok: true, value: { reason: 'Survey', untilMs: Date.UTC(2026, 3, 11, 6, 0) } });
  });

  it('refuses a missing reason, a past or too distant end, and a date that is not one', () => {
    expect(shelve({ reason: '   ', for: '8h' })).toEqual({ ok: false, fieldErrors: { reason: 'reason: say why the alert is shelved' } });
    expect(shelve({ reason: 'x', for: 'until', until: '2026-04-10T13:59' })).toEqual({ ok: false, fieldErrors: { until: 'until: must be in the future' } });
    expect(shelve({ reason: 'x', for: 'until', until: '2026-05-11T14:01' })).toEqual({ ok: false, fieldErrors: { until: 'until: at most 30 days from now' } });
    expect(shelve({ reason: 'x', for: 'until', until: '2026-02-30T08:00' })).toMatchObject({ ok: false, fieldErrors: { until: expect.stringMatching(/^until: give a date/) } });
    expect(shelve({ reason: 'x', for: 'until' })).toMatchObject({ ok: false, fieldErrors: { until: expect.stringMatching(/^until: / ) } });
    expect(shelve({ reason: '' })).toEqual({ ok: false, fieldErrors: { reason: 'reason: say why the alert is shelved', for: 'for: choose how long to shelve it' } });
  });
});
