import { answerLiveStream } from '@/lib/live/answer';

export const dynamic = 'force-dynamic';

/** Live updates of one site (`?site=`) or one unit (`?site=&unit=`) as Server-Sent Events (lib/live/answer.ts). */
export function GET(request: Request) {
  return answerLiveStream(request);
}
