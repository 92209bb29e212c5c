import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { loadSetupUnitScreen } from '@/lib/setup/screen';
import { saveUnitAction } from '@/app/setup/actions';
import { Breadcrumbs } from '@/app/_components/breadcrumbs';
import { SavedNote } from '@/app/setup/_components/saved-note';
import { UnitForm } from '@/app/setup/_components/unit-form';
import { DeviceCredentials } from '@/app/setup/_components/device-credentials';
import { deviceCredentialsAction } from '@/app/setup/device-actions';
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
  const screen = await loadSetupUnitScreen(siteId, unitId);
  if (!screen) notFound();
  const { site, unit: nameplate, account, editable } = screen;
  return (
    <>
      <Breadcrumbs trail={[{ label: 'Setup', href: '/setup' }, { href: `/setup/sites/${site.id}`, label: site.name }, { label: nameplate.name ?? nameplate.id }]} />
      <h1>
        Unit <span className="unit-id">{nameplate.id}</span>
        {nameplate.name ? ` · ${nameplate.name}` : ''}
      </h1>
      <p className="note">
        On {site.name} · <a href={`/sites/${site.id}/units/${nameplate.id}`}>its health and evidence</a>
      </p>
      <SavedNote saved={saved} what="Unit" />
      {editable ? (
        <UnitForm
          action={saveUnitAction.bind(null, { siteId: site.id, unitId: nameplate.id })}
          initial={initialFormState(screen.form)}
          sites={[{ id: site.id, name: site.name }]}
          editing={{ siteId: site.id, unitId: nameplate.id }}
          submitLabel="Save unit"
        />
      ) : (
        <pre>{screen.nameplateJson}</pre>
      )}
      <DeviceCredentials
        siteId={site.id}
        unitId={nameplate.id}
        account={account}
        canEdit={editable}
        action={deviceCredentialsAction.bind(null, { siteId: site.id, unitId: nameplate.id })}
      />
    </>
  );
}
