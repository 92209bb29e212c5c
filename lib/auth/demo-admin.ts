/**
 * The demo admin: on an embedded demo start (no DATABASE_URL, DEMO on) with
 * nobody in the database yet, an administrator `admin@demo.invalid` (an
 * invented address under the reserved .invalid domain) is made with a random
 * password printed once to the console. That password must be changed at the
 * first sign-in: until then every page leads to the password form.
 */
import { randomBytes } from 'node:crypto';
import type { Db } from '@/db/client';
import { addPerson, hasPeople } from './people';

export const DEMO_ADMIN_EMAIL = 'admin@demo.invalid';

/** Makes the demo admin when nobody exists; returns the one-time password, or undefined when people exist. */
export async function ensureDemoAdmin({ db }: { db: Db }): Promise<{ email: string; password: string } | undefined> {
  if (await hasPeople({ db })) return undefined;
  const password = randomBytes(18).toString('base64url');
  const added = await addPerson({
    db,
    actor: { label: 'demo start', personId: null },
    person: { email: DEMO_ADMIN_EMAIL, role: 'admin', password, mustChangePassword: true },
  });
  if (!added.ok) throw new Error(`demo admin: ${Object.values(added.fieldErrors).join('; ')}`);
  return { email: DEMO_ADMIN_EMAIL, password };
}

/** The console lines that hand the one-time password over. */
export function demoAdminLines({ email, password }: { email: string; password: string }): string {
  return (
    `  demo admin: sign in as ${email} with the one-time password ${password}\n` +
    `  (you choose your own password at the first sign-in; add people on the People page or with npx millrace user add)\n`
  );
}
