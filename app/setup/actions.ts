'use server';
/**
 * The setup screens' writes. Each parses the form with the contract's schema
 * (lib/setup/forms.ts), answers problems by field with the values as typed,
 * and on success goes to the saved record's page.
 */
import { redirect } from 'next/navigation';
import { getDatabase } from '@/db/client';
import { currentViewer } from '@/lib/auth/viewer';
import { SLUG } from '@/lib/contract/nameplate';
import { importFleetFile, MAX_FLEET_FILE_BYTES, parseFleetText } from '@/lib/setup/fleet-import';
import { formValues, nameplateFromForm, siteFromForm } from '@/lib/setup/forms';
import { insertSite, insertUnit, updateSite, updateUnit } from '@/lib/setup/queries';
import type { FormState, ImportState } from './form-state';

function slugOrThrow(value: string): string {
  // Bound arguments come from our own pages, but a posted action can carry anything.
  if (!SLUG.test(value)) throw new Error('invalid id');
  return value;
}

/** Creates a site (`siteId` undefined) or updates one. */
export async function saveSiteAction(siteId: string | undefined, previous: FormState, data: FormData): Promise<FormState> {
  const values = formValues(data);
  const fixed = siteId === undefined ? undefined : slugOrThrow(siteId);
  const parsed = siteFromForm(values, fixed);
  const submitted = previous.submitted + 1;
  if (!parsed.ok) return { values, fieldErrors: parsed.fieldErrors, submitted };
  const { db } = await getDatabase();
  const viewer = await currentViewer();
  const saved = fixed === undefined ? await insertSite({ db, viewer, site: parsed.value }) : await updateSite({ db, viewer, site: parsed.value });
  if (!saved.ok) return { values, fieldErrors: saved.fieldErrors, submitted };
  redirect(`/setup/sites/${parsed.value.id}?saved=${fixed === undefined ? 'created' : 'updated'}`);
}

/** Creates a unit (`fixed` undefined) or updates one. */
export async function saveUnitAction(fixed: { siteId: string; unitId: string } | undefined, previous: FormState, data: FormData): Promise<FormState> {
  const values = formValues(data);
  const ids = fixed === undefined ? undefined : { id: slugOrThrow(fixed.unitId), siteId: slugOrThrow(fixed.siteId) };
  const parsed = nameplateFromForm(values, ids);
  const submitted = previous.submitted + 1;
  if (!parsed.ok) return { values, fieldErrors: parsed.fieldErrors, submitted };
  const { db } = await getDatabase();
  const viewer = await currentViewer();
  const saved = ids === undefined ? await insertUnit({ db, viewer, nameplate: parsed.value }) : await updateUnit({ db, viewer, nameplate: parsed.value });
  if (!saved.ok) return { values, fieldErrors: saved.fieldErrors, submitted };
  redirect(`/setup/units/${parsed.value.siteId}/${parsed.value.id}?saved=${ids === undefined ? 'created' : 'updated'}`);
}

/** Checks an uploaded FLEET.json and, when asked and valid throughout, imports it (all or nothing). */
export async function importFleetAction(previous: ImportState, data: FormData): Promise<ImportState> {
  const submitted = previous.submitted + 1;
  const intent = data.get('intent') === 'check' ? 'check' : 'import';
  const file = data.get('file');
  const checked = data.get('fleetText');
  let text: string;
  let fileName: string;
  if (typeof checked === 'string' && checked !== '') {
    // A file checked before, sent back as text (see ImportForm).
    text = checked;
    fileName = String(data.get('fileName') ?? 'FLEET.json').slice(0, 200);
  } else if (file instanceof File && file.size > 0) {
    fileName = file.name;
    if (file.size > MAX_FLEET_FILE_BYTES) {
      return { submitted, intent, fileName, fileProblem: `${fileName} is ${file.size.toLocaleString('en-US')} bytes; the screen takes up to ${MAX_FLEET_FILE_BYTES.toLocaleString('en-US')}. Import larger fleets with npx millrace units import.` };
    }
    text = await file.text();
  } else {
    return { submitted, intent, fileProblem: file instanceof File && file.name ? `${file.name} is empty` : 'Choose a FLEET.json file first.' };
  }
  if (Buffer.byteLength(text) > MAX_FLEET_FILE_BYTES) return { submitted, intent, fileName, fileProblem: `${fileName} is too large for the screen; use npx millrace units import` };
  const parsed = parseFleetText(text);
  if (!parsed.ok) return { submitted, intent, fileName, fileProblem: `${fileName}: ${parsed.problem}` };
  const { db } = await getDatabase();
  const report = await importFleetFile({ db, viewer: await currentViewer(), raw: parsed.raw, apply: intent === 'import' });
  return { submitted, intent, fileName, report, checkedText: report.ok && intent === 'check' ? text : undefined };
}
