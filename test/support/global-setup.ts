import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { TestProject } from 'vitest/node';
import { backendDescription } from './backend';
import type { SkipRecord } from './services';
import { ensureBuild } from '@/bin/ensure-build.mjs';

/** The end-of-run summary of tests skipped (or, under MILLRACE_REQUIRE_SERVICES=1, failed) for a missing service. */
export function skipSummary(records: readonly SkipRecord[]): string {
  if (records.length === 0) return '\nmillrace tests: nothing skipped for a missing service\n';
  const out: string[] = [];
  const needs = new Map<string, string>();
  for (const outcome of ['skipped', 'failed'] as const) {
    const these = records.filter((r) => r.outcome === outcome);
    if (these.length === 0) continue;
    out.push(
      outcome === 'skipped'
        ? `millrace tests: ${these.length} group(s) skipped for a missing service (MILLRACE_REQUIRE_SERVICES=1 makes them fail):`
        : `millrace tests: ${these.length} group(s) failed for a missing service (MILLRACE_REQUIRE_SERVICES=1):`,
    );
    for (const r of these) {
      out.push(`  ${outcome}: ${r.file} (${r.what}): needs ${r.services.map((s) => s.name).join(' and ')}`);
      for (const s of r.services) needs.set(s.name, s.missing);
    }
  }
  out.push('what would run them:');
  for (const [name, missing] of [...needs].sort()) out.push(`  ${name}: ${missing}`);
  return `\n${out.join('\n')}\n`;
}

/**
 * Says once which backend the integration tests use, and builds the web app
 * once (the product tests start it; two builds at once would collide). At the
 * end, lists the tests skipped for a missing service (test/support/services.ts)
 * and what would run them.
 */
export default function setup(project: TestProject) {
  process.stdout.write(`\nmillrace tests: backend ${backendDescription()}\n\n`);
  const dir = mkdtempSync(join(tmpdir(), 'millrace-skips-'));
  const log = join(dir, 'skips.jsonl');
  writeFileSync(log, '');
  project.provide('millraceSkipLog', log);
  // MILLRACE_SKIP_BUILD=1: a run of unit tests only (no product test), while sources are being edited.
  if (process.env.MILLRACE_SKIP_BUILD === '1') process.stdout.write('millrace tests: MILLRACE_SKIP_BUILD=1, the web app is not built (product tests would use a stale build)\n');
  else ensureBuild({ log: (line: string) => process.stdout.write(line) });
  return () => {
    const seen = new Set<string>();
    const records: SkipRecord[] = [];
    for (const line of readFileSync(log, 'utf8').split('\n')) {
      if (!line || seen.has(line)) continue;
      seen.add(line);
      records.push(JSON.parse(line) as SkipRecord);
    }
    records.sort((a, b) => a.file.localeCompare(b.file) || a.what.localeCompare(b.what));
    rmSync(dir, { recursive: true, force: true });
    process.stdout.write(skipSummary(records));
  };
}
