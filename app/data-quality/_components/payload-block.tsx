import styles from '@/app/data-quality/quality.module.css';

/** Characters of a kept payload shown on the page (the database keeps up to 4,096). */
export const SHOWN_PAYLOAD_CHARS = 2000;

/** What the ingester stores instead of the text of a registered unit's whole-message refusal. */
const NOT_KEPT = '(payload not kept';

/**
 * The raw payload as text (React escapes it), folded away, with its size and
 * how much of it is shown: the ingester keeps the start of a long payload,
 * and this page shows the start of what was kept.
 */
export function PayloadBlock({ payload, payloadBytes }: { payload: string; payloadBytes: number }) {
  if (payload.startsWith(NOT_KEPT)) {
    return (
      <p className="note">
        Payload of {payloadBytes.toLocaleString('en-GB')} bytes, not kept: {payload.slice(1, -1)}.
      </p>
    );
  }
  const shown = payload.length > SHOWN_PAYLOAD_CHARS ? payload.slice(0, SHOWN_PAYLOAD_CHARS) : payload;
  const keptOnlyStart = payloadBytes > Buffer.byteLength(payload);
  let extent = '';
  if (shown.length < payload.length) extent = `, the first ${shown.length.toLocaleString('en-GB')} characters shown`;
  else if (keptOnlyStart) extent = ', only its start was kept';
  return (
    <details className={styles.payload}>
      <summary>
        Raw payload: {payloadBytes.toLocaleString('en-GB')} bytes{extent}
      </summary>
      <pre>
        {shown}
        {shown.length < payload.length ? '\n…' : ''}
      </pre>
    </details>
  );
}
