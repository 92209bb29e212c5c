'use client';
/**
 * Import of a FLEET.json, as `npx millrace units import` does it: all or
 * nothing. "Check" only reports; "Import" imports when every entry is valid.
 * The report lists each entry: added, updated, or invalid with its problems.
 */
import { useActionState, useEffect, useRef, useState } from 'react';
import type { ImportState } from '@/app/setup/form-state';
import setup from '@/app/setup/setup.module.css';
import styles from './form.module.css';

type Action = (state: ImportState, data: FormData) => Promise<ImportState>;

const ACTION_TEXT = { add: 'will be added', update: 'will be updated', invalid: 'invalid' } as const;
const DONE_TEXT = { add: 'added', update: 'updated', invalid: 'invalid' } as const;

export function ImportForm({ action, maxBytes }: { action: Action; maxBytes: number }) {
  const [state, formAction, pending] = useActionState(action, { submitted: 0 });
  const [tooLarge, setTooLarge] = useState<string | undefined>();
  const resultRef = useRef<HTMLDivElement>(null);
  useEffect(() => {
    if (state.submitted > 0) resultRef.current?.focus();
  }, [state.submitted]);

  const report = state.report;
  const applied = report?.applied;
  const invalid = report?.entries.filter((e) => e.action === 'invalid') ?? [];
  const fileError = tooLarge ?? state.fileProblem ?? state.error;

  return (
    <>
      <form action={formAction} className={styles.form} noValidate>
        <fieldset className={styles.fieldset}>
          <legend>FLEET.json</legend>
          <div className={`${styles.field} ${styles.wide}`}>
            <label htmlFor="fleet-file" className={styles.label}>
              Fleet file
            </label>
            <span id="fleet-file-hint" className={styles.hint}>
              {'{ "sites": [ { "id", "name", "timezone" } ], "units": [ nameplate, … ] }'}: sites and units are matched by id, added when new and updated when known.
            </span>
            <input
              id="fleet-file"
              name="file"
              type="file"
              accept="application/json,.json"
              className={styles.input}
              aria-invalid={fileError ? true : undefined}
              aria-describedby={`fleet-file-hint${fileError ? ' fleet-file-error' : ''}`}
              onChange={(e) => {
                const f = e.target.files?.[0];
                setTooLarge(
                  f && f.size > maxBytes
                    ? `${f.name} is ${f.size.toLocaleString('en-US')} bytes; the screen takes up to ${maxBytes.toLocaleString('en-US')}. Import larger fleets with npx millrace units import.`
                    : undefined,
                );
              }}
            />
            {fileError ? (
              <span id="fleet-file-error" className={styles.error}>
                {fileError}
              </span>
            ) : null}
          </div>
        </fieldset>
        <div className={styles.actions}>
          <button type="submit" name="intent" value="import" className={styles.primary} disabled={pending || tooLarge !== undefined}>
            {pending ? 'Working…' : 'Import'}
          </button>
          <button type="submit" name="intent" value="check" className={styles.secondary} disabled={pending || tooLarge !== undefined}>
            Check only, change nothing
          </button>
        </div>
      </form>

      <div ref={resultRef} tabIndex={-1} aria-live="polite" className={setup.result}>
        {report ? (
          <section className="panel" aria-labelledby="import-result">
            <h2 id="import-result">
              {applied
                ? `Imported ${state.fileName}: sites ${applied.sitesCreated} added, ${applied.sitesUpdated} updated; units ${applied.unitsCreated} added, ${applied.unitsUpdated} updated.`
                : report.ok
                  ? `${state.fileName} is valid: nothing was changed yet. Import it to make the changes below.`
                  : `${state.fileName}: ${report.problems.length} ${report.problems.length === 1 ? 'problem' : 'problems'}, nothing was changed.`}
            </h2>
            {report.ok && !applied && state.checkedText ? (
              <form action={formAction} className={`${styles.actions} ${setup.checkedImport}`}>
                <input type="hidden" name="fleetText" value={state.checkedText} />
                <input type="hidden" name="fileName" value={state.fileName ?? 'FLEET.json'} />
                <button type="submit" name="intent" value="import" className={styles.primary} disabled={pending}>
                  Import the checked {state.fileName ?? 'file'}
                </button>
              </form>
            ) : null}
            {!report.ok ? (
              <p>
                Correct {invalid.length === 1 ? 'the entry' : 'the entries'} marked invalid{report.fileProblems.length > 0 ? ' and the problems of the file' : ''}, then import the file again: an
                import is all or nothing.
              </p>
            ) : null}
            {report.fileProblems.length > 0 ? (
              <ul className={setup.entryProblems}>
                {report.fileProblems.map((p) => (
                  <li key={p}>{p}</li>
                ))}
              </ul>
            ) : null}
            <ol className={setup.report} aria-label="Entries of the file">
              {report.entries.map((entry) => (
                <li key={entry.path} className={setup.entry} data-entry={entry.path} data-action={entry.action}>
                  <span className={setup.code}>{entry.path}</span>
                  <span>
                    <span
                      className={`${setup.tag} ${
                        entry.action === 'invalid' ? setup.tagInvalid : !report.ok ? setup.tagValid : entry.action === 'add' ? setup.tagAdd : setup.tagUpdate
                      }`}
                    >
                      {entry.kind === 'site' ? 'Site' : 'Unit'} {entry.id ? <span className={setup.code}>{entry.id}</span> : '(no id)'}
                      {entry.kind === 'unit' && entry.siteId ? <span className="muted"> on {entry.siteId}</span> : null}
                      {': '}
                      <span className={setup.verdict}>
                        {applied ? DONE_TEXT[entry.action] : report.ok ? ACTION_TEXT[entry.action] : entry.action === 'invalid' ? 'invalid' : 'valid'}
                      </span>
                    </span>
                  </span>
                  {entry.problems.length > 0 ? (
                    <ul className={setup.entryProblems}>
                      {entry.problems.map((p) => (
                        <li key={p}>{p}</li>
                      ))}
                    </ul>
                  ) : null}
                </li>
              ))}
            </ol>
          </section>
        ) : null}
      </div>
    </>
  );
}
