/** The IANA zones this server knows, for the site form's suggestions. */
export function timeZoneNames(): string[] {
  try {
    return Intl.supportedValuesOf('timeZone');
  } catch {
    return ['UTC'];
  }
}
