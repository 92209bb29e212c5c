import type { ActionState } from '@/lib/request/action';

/** What the sign-in form shows after a try. */
export interface SignInState extends ActionState {
  email?: string;
  /** Which field the error is about, to focus it. */
  field?: 'email' | 'password';
  retryAfterS?: number;
}

export const initialSignInState: SignInState = { submitted: 0 };
