import { loadFleetExport } from '@/lib/setup/screen';

export const dynamic = 'force-dynamic';

/** The viewer's fleet as FLEET.json (contract, section 4), as a download; `units import` reads it back. */
export async function GET() {
  const { fleet, fileName } = await loadFleetExport();
  return new Response(`${JSON.stringify(fleet, null, 2)}\n`, {
    headers: {
      'Content-Type': 'application/json; charset=utf-8',
      'Content-Disposition': `attachment; filename="${fileName}"`,
      'Cache-Control': 'no-store',
    },
  });
}
