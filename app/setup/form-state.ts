import type { ActionState } from '@/lib/request/action';
import type { FormValues } from '@/lib/setup/forms';
import type { FleetImportReport } from '@/lib/setup/fleet-import';

/** What a setup form shows after a submission: the values as typed and the problems by field (ActionState). */
export type FormState = ActionState;

export function initialFormState(values: FormValues = {}): FormState {
  return { values, fieldErrors: {}, submitted: 0 };
}

/** The problems a setup form lists: by field, and the form's own (`_form`: not allowed, gone meanwhile). */
export function problemsOf(state: FormState): Record<string, string> {
  return state.error ? { _form: state.error, ...state.fieldErrors } : { ...state.fieldErrors };
}

/** The import screen after a check or an import. */
export interface ImportState extends ActionState {
  fileName?: string;
  intent?: 'check' | 'import';
  /** A problem with the upload itself (no file, too large, not JSON). */
  fileProblem?: string;
  report?: FleetImportReport;
  /** The text of a file checked and found valid, so that it can be imported without choosing it again. */
  checkedText?: string;
}
