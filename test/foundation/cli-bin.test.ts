import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';

// package.json declares the `millrace` command; after `npm install`,
// `npx millrace` runs bin/millrace.mjs.
describe('the millrace command', () => {
  const pkg = JSON.parse(readFileSync('package.json', 'utf8')) as { bin: Record<string, string> };

  it('is declared as a bin of the package', () => {
    expect(pkg.bin.millrace).toBe('bin/millrace.mjs');
  });

  it('lists its commands with --help and exits 0', () => {
    const run = spawnSync(process.execPath, [pkg.bin.millrace!, '--help'], { encoding: 'utf8' });
    expect(run.status).toBe(0);
    for (const command of ['check --nameplate', 'energy --nameplate', 'units import FLEET.json', 'export --unit SITE/UNIT']) {
      expect(run.stdout).toContain(command);
    }
  });

  it('refuses an unknown command with exit status 2', () => {
    const run = spawnSync(process.execPath, [pkg.bin.millrace!, 'frobnicate'], { encoding: 'utf8' });
    expect(run.status).toBe(2);
    expect(run.stderr).toContain('unknown command "frobnicate"');
  });
});
