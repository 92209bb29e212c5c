/**
 * `npm run db:migrate`: applies the committed migrations to the configured
 * database (DATABASE_URL, else the embedded one) and makes partitions ahead.
 */
import { getConfig } from '@/lib/config/env';
import { openDatabase } from './client';

try {
  const config = getConfig();
  const handle = await openDatabase({ url: config.DATABASE_URL, dataDir: config.DATA_DIR });
  process.stdout.write(`migrations applied to ${handle.location}\n`);
  await handle.close();
} catch (error) {
  process.stderr.write(`db:migrate: ${(error as Error).message}\n`);
  process.exitCode = 2;
}
