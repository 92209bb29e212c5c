import { defineConfig } from 'drizzle-kit';

// Generates SQL migrations from db/schema. Never use `drizzle-kit push`: the
// telemetry table is partitioned by hand in the migration (see db/schema/telemetry.ts).
export default defineConfig({
  dialect: 'postgresql',
  schema: './db/schema/index.ts',
  out: './db/migrations',
  casing: 'snake_case',
});
