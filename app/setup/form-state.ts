import type { FieldErrors, FormValues } from '@/lib/setup/forms';
import type { FleetImportReport } from '@/lib/setup/fleet-import';

/** What a setup form shows after a submission: the values as typed and the problems by field. */
export interface FormState {
  values: FormValues;
  fieldErrors: FieldErrors;
  /** Counts submissions, so the form re-mounts with the values typed and focuses the first problem. */
  submitted: number;
}

export function initialFormState(values: FormValues = {}): FormState {
  return { values, fieldErrors: {}, submitted: 0 };
}

/** The import screen after a check or an import. */
export interface ImportState {
  submitted: number;
  fileName?: string;
  intent?: 'check' | 'import';
  /** A problem with the upload itself (no file, too large, not JSON). */
  fileProblem?: string;
  report?: FleetImportReport;
  /** The text of a file checked and found valid, so that it can be imported without choosing it again. */
  checkedText?: string;
}
