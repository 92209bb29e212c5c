import { answerUnitHealth } from '@/lib/api/read';

export const dynamic = 'force-dynamic';

/** The live diagnosis of a unit as the `check --json` object plus when and over which samples (contract, section 6). */
export async function GET(_request: Request, { params }: { params: Promise<{ siteId: string; unitId: string }> }) {
  return answerUnitHealth(await params);
}
