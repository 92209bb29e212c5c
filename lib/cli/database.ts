/**
 * Opens the database for a command-line command: DATABASE_URL when set, else
 * the embedded folder, which a running embedded server holds (then the lock
 * refuses with a message saying so).
 */
import { getConfig } from '@/lib/config/env';
import { openDatabase, type DatabaseHandle } from '@/db/client';

/** Opens and migrates the configured database; the caller closes it. */
export async function openCliDatabase(): Promise<DatabaseHandle> {
  const config = getConfig();
  return openDatabase({ url: config.DATABASE_URL, dataDir: config.DATA_DIR, maxConnections: 2 });
}
