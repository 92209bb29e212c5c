'use server';
/**
 * The setup screens' writes, each made with action() (lib/request/action.ts):
 * admins and operators only; the form parsed with the contract's schema
 * (lib/setup/forms.ts), problems answered by field with the values as typed;
 * on success, the saved record's page.
 */
import { redirect } from 'next/navigation';
import { z } from 'zod';
import { canEditSetup } from '@/lib/auth/viewer';
import { SLUG } from '@/lib/contract/nameplate';
import { action } from '@/lib/request/action';
import { importFleetFile, readFleetUpload } from '@/lib/setup/fleet-import';
import { nameplateFromForm, siteFromForm } from '@/lib/setup/forms';
import { insertSite, insertUnit, updateSite, updateUnit } from '@/lib/setup/queries';
import type { FormState, ImportState } from '@/app/setup/form-state';

const REFUSED = 'You may not change the setup: ask an administrator or operator.';
const slug = z.string().regex(SLUG);
const unitIds = z.object({ siteId: slug, unitId: slug });

/** Creates a site (bound `undefined`) or updates one. */
export const saveSiteAction = action(
  { allow: canEditSetup, refused: REFUSED, bound: z.tuple([slug.optional()]), input: (values, [siteId]) => siteFromForm(values, siteId) },
  async ({ db, viewer, input: site, bound: [siteId], values, submitted }): Promise<FormState> => {
    const saved = siteId === undefined ? await insertSite({ db, viewer, site }) : await updateSite({ db, viewer, site });
    if (!saved.ok) return { submitted, values, fieldErrors: saved.fieldErrors };
    redirect(`/setup/sites/${site.id}?saved=${siteId === undefined ? 'created' : 'updated'}`);
  },
);

/** Creates a unit (bound `undefined`) or updates one (its id and site stay). */
export const saveUnitAction = action(
  {
    allow: canEditSetup,
    refused: REFUSED,
    bound: z.tuple([unitIds.optional()]),
    input: (values, [ids]) => nameplateFromForm(values, ids && { id: ids.unitId, siteId: ids.siteId }),
  },
  async ({ db, viewer, input: nameplate, bound: [ids], values, submitted }): Promise<FormState> => {
    const saved = ids === undefined ? await insertUnit({ db, viewer, nameplate }) : await updateUnit({ db, viewer, nameplate });
    if (!saved.ok) return { submitted, values, fieldErrors: saved.fieldErrors };
    redirect(`/setup/units/${nameplate.siteId}/${nameplate.id}?saved=${ids === undefined ? 'created' : 'updated'}`);
  },
);

/** Checks an uploaded FLEET.json and, when asked and valid throughout, imports it (all or nothing). */
export const importFleetAction = action(
  { allow: canEditSetup, refused: REFUSED },
  async ({ db, viewer, data, submitted }): Promise<ImportState> => {
    const upload = await readFleetUpload(data);
    if (!upload.ok) return { submitted, intent: upload.intent, fileName: upload.fileName, fileProblem: upload.problem };
    const { intent, fileName, text, raw } = upload;
    const report = await importFleetFile({ db, viewer, raw, apply: intent === 'import' });
    return { submitted, intent, fileName, report, checkedText: report.ok && intent === 'check' ? text : undefined };
  },
);
