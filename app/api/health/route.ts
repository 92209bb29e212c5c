import { getHealthReport } from '@/lib/server/health';

export const dynamic = 'force-dynamic';

/** Database, broker, ingester and demo state as JSON; 503 when a part is down. */
export async function GET() {
  const report = await getHealthReport();
  return Response.json(report, {
    status: report.status === 'down' ? 503 : 200,
    headers: { 'Cache-Control': 'no-store' },
  });
}
