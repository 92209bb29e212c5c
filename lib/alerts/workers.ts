/**
 * The alert workers of one process: the evaluator and the webhook delivery
 * loop, which the evaluator kicks after a pass that changed an alert. The
 * product's one process and each ingester start them the same way.
 */
import type { Db } from '@/db/client';
import type { Config } from '@/lib/config/env';
import type { LivePublisher } from '@/lib/live/publisher';
import type { Logger } from '@/lib/log/logger';
import { startAlertEvaluator } from './evaluator';
import { startWebhookDelivery } from './webhooks/deliver';

/** How often the delivery loop looks for due messages when nothing kicks it, ms. */
export const WEBHOOK_POLL_MS = 1_000;

/** Starts both; the returned function stops the evaluator first, then the deliveries under way. */
export function startAlertWorkers({
  db,
  config,
  log,
  live,
}: {
  db: Db;
  config: Pick<Config, 'ALERT_INTERVAL_S' | 'PUBLIC_URL'>;
  log: Logger;
  live?: LivePublisher;
}): () => Promise<void> {
  const webhooks = startWebhookDelivery({ db, log: log.child('webhooks'), pollMs: WEBHOOK_POLL_MS });
  const stopEvaluator = startAlertEvaluator({
    db,
    intervalS: config.ALERT_INTERVAL_S,
    baseUrl: config.PUBLIC_URL,
    log: log.child('alerts'),
    live,
    onChanges: () => webhooks.kick(),
  });
  return async () => {
    await stopEvaluator();
    await webhooks.stop();
  };
}
