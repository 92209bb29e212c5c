import { answerSites } from '@/lib/api/read';

export const dynamic = 'force-dynamic';

/** The sites the caller may see, with their units' ids (contract, section 6). */
export function GET() {
  return answerSites();
}
