/** FormData as plain strings (pure: the setup forms' parsers and the action wrapper share it). */

/** What a form sent, field by field, as typed; files and Next's own `$ACTION…` fields are left out. */
export function formValues(data: Iterable<[string, FormDataEntryValue]>): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [key, value] of data) if (typeof value === 'string' && !key.startsWith('$ACTION')) out[key] = value;
  return out;
}
