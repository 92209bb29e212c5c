/** The outcome of an admin or account form: a message, problems by field, a secret shown once. */
export interface FormResult {
  submitted: number;
  done?: string;
  error?: string;
  fieldErrors?: Record<string, string>;
  /** A token or link shown this once (it is stored only hashed). */
  secret?: string;
  values?: Record<string, string>;
}

export const initialFormResult: FormResult = { submitted: 0 };
