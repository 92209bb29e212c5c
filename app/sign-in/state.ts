/** What the sign-in form shows after a try. */
export interface SignInState {
  submitted: number;
  email?: string;
  error?: string;
  /** Which field the error is about, to focus it. */
  field?: 'email' | 'password';
  retryAfterS?: number;
}

export const initialSignInState: SignInState = { submitted: 0 };
