import { z } from 'zod';
import { SLUG } from '@/lib/contract/nameplate';

const optionalSlug = (name: string) =>
  z
    .string()
    .optional()
    .transform((v) => (v === undefined || v === '' ? undefined : v))
    .refine((v) => v === undefined || SLUG.test(v), { error: `${name}: not a ${name} id (1 to 64 of a-z, 0-9 and -)` });

/** Search parameters of /data-quality: a site and unit to filter by, and the page cursor. */
export const dataQualityQuerySchema = z.object({
  site: optionalSlug('site'),
  unit: optionalSlug('unit'),
  before: z
    .string()
    .optional()
    .refine((v) => v === undefined || /^\d{1,15}-\d{1,18}$/.test(v), { error: 'before: not a page position of this screen' }),
});
