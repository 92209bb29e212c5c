import type { When as WhenValue } from '@/lib/people/screen';

/** A moment in UTC, or "never". */
export function When({ at }: { at: WhenValue | undefined }) {
  return at ? <time dateTime={at.dateTime}>{at.text}</time> : <span className="muted">never</span>;
}
