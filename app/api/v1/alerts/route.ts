import { answerAlerts } from '@/lib/alerts/api';

export const dynamic = 'force-dynamic';

/** The alerts of the caller's sites, newest first (contract, sections 6 and 7). */
export function GET(request: Request) {
  return answerAlerts(request);
}
