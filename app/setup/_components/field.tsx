import type { ReactNode } from 'react';
import styles from './form.module.css';

export interface FieldProps {
  name: string;
  label: string;
  /** What the field wants, shown under the label (units, range, an example). */
  hint?: ReactNode;
  error?: string;
  defaultValue?: string;
  optional?: boolean;
  readOnly?: boolean;
  wide?: boolean;
  type?: 'text' | 'number-ish';
  list?: string;
  autoComplete?: string;
}

/** The DOM id of a field (the error summary links to it). */
export function fieldId(name: string): string {
  return `field-${name.replace(/[^a-zA-Z0-9_-]/g, '-')}`;
}

/**
 * One labelled input with its hint and its problem beside it: the input is
 * described by both (aria-describedby) and marked invalid (aria-invalid).
 * Numbers are typed as text with a decimal keyboard, so that what was typed
 * is kept and the message can quote it.
 */
export function Field({ name, label, hint, error, defaultValue, optional, readOnly, wide, type = 'text', list, autoComplete = 'off' }: FieldProps) {
  const id = fieldId(name);
  const described = [hint ? `${id}-hint` : '', error ? `${id}-error` : ''].filter(Boolean).join(' ') || undefined;
  return (
    <div className={`${styles.field} ${wide ? styles.wide : ''}`}>
      <label htmlFor={id} className={styles.label}>
        {label} {optional ? <span className={styles.optional}>(optional)</span> : null}
      </label>
      <input
        id={id}
        name={name}
        className={styles.input}
        defaultValue={defaultValue}
        readOnly={readOnly}
        aria-invalid={error ? true : undefined}
        aria-describedby={described}
        inputMode={type === 'number-ish' ? 'decimal' : undefined}
        list={list}
        autoComplete={autoComplete}
        spellCheck={false}
      />
      {error ? (
        <span id={`${id}-error`} className={styles.error}>
          {error}
        </span>
      ) : null}
      {hint ? (
        <span id={`${id}-hint`} className={styles.hint}>
          {hint}
        </span>
      ) : null}
    </div>
  );
}

/** A select with the same label, hint and error arrangement. */
export function SelectField({
  name,
  label,
  hint,
  error,
  defaultValue,
  options,
  onChange,
}: {
  name: string;
  label: string;
  hint?: ReactNode;
  error?: string;
  defaultValue?: string;
  options: ReadonlyArray<{ value: string; label: string }>;
  onChange?: (value: string) => void;
}) {
  const id = fieldId(name);
  const described = [hint ? `${id}-hint` : '', error ? `${id}-error` : ''].filter(Boolean).join(' ') || undefined;
  return (
    <div className={styles.field}>
      <label htmlFor={id} className={styles.label}>
        {label}
      </label>
      <select
        id={id}
        name={name}
        className={styles.input}
        defaultValue={defaultValue}
        aria-invalid={error ? true : undefined}
        aria-describedby={described}
        onChange={onChange ? (e) => onChange(e.target.value) : undefined}
      >
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      {error ? (
        <span id={`${id}-error`} className={styles.error}>
          {error}
        </span>
      ) : null}
      {hint ? (
        <span id={`${id}-hint`} className={styles.hint}>
          {hint}
        </span>
      ) : null}
    </div>
  );
}

/** Every problem of a submitted form at its top, each a link to its field; read out when it appears. */
export function ErrorSummary({ errors, labels }: { errors: Record<string, string>; labels: Record<string, string> }) {
  const entries = Object.entries(errors);
  if (entries.length === 0) return null;
  return (
    <div className={styles.summary} role="alert">
      <h2>
        {entries.length === 1 ? 'One problem' : `${entries.length} problems`}: nothing was saved. Correct the {entries.length === 1 ? 'field' : 'fields'} below and save again.
      </h2>
      <ul>
        {entries.map(([name, message]) =>
          name === '_form' ? (
            <li key={name}>{message}</li>
          ) : (
            <li key={name}>
              <a href={`#${fieldId(name)}`}>{labels[name] ?? name}</a>: {message}
            </li>
          ),
        )}
      </ul>
    </div>
  );
}
