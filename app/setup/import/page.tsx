import type { Metadata } from 'next';
import { MAX_FLEET_FILE_BYTES } from '@/lib/setup/fleet-import';
import { importFleetAction } from '@/app/setup/actions';
import { Breadcrumbs } from '@/app/_components/breadcrumbs';
import { ImportForm } from '@/app/setup/_components/import-form';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Import FLEET.json' };

export default function ImportPage() {
  return (
    <>
      <Breadcrumbs trail={[{ label: 'Setup', href: '/setup' }, { label: 'Import' }]} />
      <h1>Import FLEET.json</h1>
      <p className="note">
        Registers or updates sites and units from a fleet file, exactly as <code>npx millrace units import FLEET.json</code> does: everything is
        checked first, and if any entry is invalid nothing changes. <a href="/setup/export">Download the current fleet</a> to start from it.
      </p>
      <ImportForm action={importFleetAction} maxBytes={MAX_FLEET_FILE_BYTES} />
    </>
  );
}
