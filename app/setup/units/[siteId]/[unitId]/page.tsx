import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { getDatabase } from '@/db/client';
import { canEditSetup, currentViewer } from '@/lib/auth/viewer';
import { SLUG } from '@/lib/contract/nameplate';
import { formOfNameplate } from '@/lib/setup/forms';
import { getSetupSiteById, getSetupUnitById } from '@/lib/setup/queries';
import { saveUnitAction } from '@/app/setup/actions';
import { SetupCrumbs } from '@/app/setup/_components/breadcrumbs';
import { SavedNote } from '@/app/setup/_components/saved-note';
import { UnitForm } from '@/app/setup/_components/unit-form';
import { DeviceCredentials } from '@/app/setup/_components/device-credentials';
import { deviceCredentialsAction } from '@/app/setup/device-actions';
import { getDeviceCredentials } from '@/lib/devices/queries';
import { initialFormState } from '@/app/setup/form-state';

export const dynamic = 'force-dynamic';

export async function generateMetadata({ params }: { params: Promise<{ siteId: string; unitId: string }> }): Promise<Metadata> {
  return { title: `Unit ${(await params).unitId} · Setup` };
}

export default async function EditUnitPage({
  params,
  searchParams,
}: {
  params: Promise<{ siteId: string; unitId: string }>;
  searchParams: Promise<{ saved?: string }>;
}) {
  const { siteId, unitId } = await params;
  const { saved } = await searchParams;
  if (!SLUG.test(siteId) || !SLUG.test(unitId)) notFound();
  const { db } = await getDatabase();
  const viewer = await currentViewer();
  const [site, nameplate] = await Promise.all([getSetupSiteById({ db, viewer, siteId }), getSetupUnitById({ db, viewer, siteId, unitId })]);
  if (!site || !nameplate) notFound();
  const account = await getDeviceCredentials({ db, viewer, siteId, unitId });
  return (
    <>
      <SetupCrumbs trail={[{ href: `/setup/sites/${site.id}`, label: site.name }, { label: nameplate.name ?? nameplate.id }]} />
      <h1>
        Unit <span className="unit-id">{nameplate.id}</span>
        {nameplate.name ? ` · ${nameplate.name}` : ''}
      </h1>
      <p className="note">
        On {site.name} · <a href={`/sites/${site.id}/units/${nameplate.id}`}>its health and evidence</a>
      </p>
      <SavedNote saved={saved} what="Unit" />
      {canEditSetup(viewer) ? (
        <UnitForm
          action={saveUnitAction.bind(null, { siteId: site.id, unitId: nameplate.id })}
          initial={initialFormState(formOfNameplate(nameplate))}
          sites={[{ id: site.id, name: site.name }]}
          editing={{ siteId: site.id, unitId: nameplate.id }}
          submitLabel="Save unit"
        />
      ) : (
        <pre>{JSON.stringify(nameplate, null, 2)}</pre>
      )}
      <DeviceCredentials
        siteId={site.id}
        unitId={nameplate.id}
        account={account && { username: account.username, createdAt: account.createdAt.toISOString(), rotatedAt: account.rotatedAt.toISOString(), revokedAt: account.revokedAt?.toISOString() ?? null }}
        canEdit={canEditSetup(viewer)}
        action={deviceCredentialsAction.bind(null, { siteId: site.id, unitId: nameplate.id })}
      />
    </>
  );
}
