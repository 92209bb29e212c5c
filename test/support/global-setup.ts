import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { TestProject } from 'vitest/node';
import { backendDescription } from './backend';
import { ensureBuild } from '../../bin/ensure-build.mjs';

/**
 * Says once which backend the integration tests use, and builds the web app
 * once (the product tests start it; two builds at once would collide). At the
 * end, lists the tests skipped for a missing service (test/support/services.ts)
 * and what would run them.
 */
export default function setup(project: TestProject) {
  process.stdout.write(`\nmillrace tests: backend ${backendDescription()}\n\n`);
  const dir = mkdtempSync(join(tmpdir(), 'millrace-skips-'));
  const log = join(dir, 'skips.log');
  writeFileSync(log, '');
  project.provide('millraceSkipLog', log);
  ensureBuild({ log: (line: string) => process.stdout.write(line) });
  return () => {
    const lines = [...new Set(readFileSync(log, 'utf8').split('\n').filter(Boolean))].sort();
    rmSync(dir, { recursive: true, force: true });
    const skipped = lines.filter((l) => l.startsWith('skipped:'));
    const failed = lines.filter((l) => l.startsWith('failed:'));
    if (skipped.length > 0) {
      process.stdout.write(`\nmillrace tests: ${skipped.length} skipped for a missing service (MILLRACE_REQUIRE_SERVICES=1 makes these failures):\n`);
      for (const line of skipped) process.stdout.write(`  ${line}\n`);
    }
    if (failed.length > 0) {
      process.stdout.write(`\nmillrace tests: ${failed.length} failed for a missing service (MILLRACE_REQUIRE_SERVICES=1):\n`);
      for (const line of failed) process.stdout.write(`  ${line}\n`);
    }
    if (lines.length === 0) process.stdout.write('\nmillrace tests: nothing skipped for a missing service\n');
  };
}
