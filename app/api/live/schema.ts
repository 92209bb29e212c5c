import { z } from 'zod';
import { SLUG } from '@/lib/contract/nameplate';

const slug = (name: string) =>
  z
    .string({ error: `${name}: required, the id of a ${name === 'site' ? 'site' : 'unit'}` })
    .regex(SLUG, { error: (i) => `${name}: must be 1 to 64 of a-z, 0-9 and -, got ${JSON.stringify(i.input)}` });

/** Query of GET /api/live: `site` required, `unit` optional. */
export const liveQuerySchema = z.object({
  site: slug('site'),
  unit: slug('unit').optional(),
});
