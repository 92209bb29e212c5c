import { getDatabase } from '@/db/client';
import { currentViewer } from '@/lib/auth/viewer';
import { getFleetExport } from '@/lib/setup/queries';

export const dynamic = 'force-dynamic';

/** The viewer's fleet as FLEET.json (contract, section 4), as a download; `units import` reads it back. */
export async function GET() {
  const { db } = await getDatabase();
  const fleet = await getFleetExport({ db, viewer: await currentViewer() });
  const day = new Date().toISOString().slice(0, 10);
  return new Response(`${JSON.stringify(fleet, null, 2)}\n`, {
    headers: {
      'Content-Type': 'application/json; charset=utf-8',
      'Content-Disposition': `attachment; filename="FLEET-${day}.json"`,
      'Cache-Control': 'no-store',
    },
  });
}
