import { eq } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { people } from '../../db/schema';

/** Whether the person must choose a new password before anything else (a password someone else set). */
export async function mustChangePasswordOf({ db, personId }: { db: Db; personId: number }): Promise<boolean> {
  const [row] = await db.select({ must: people.mustChangePassword }).from(people).where(eq(people.id, personId)).limit(1);
  return row?.must === true;
}
