/**
 * `millrace check` end to end through the command-line entry (lib/cli/main.ts),
 * on CSV logs written from synthetic telemetry.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import { TELEMETRY_FIELDS, type TelemetrySample } from '@/lib/contract/telemetry';
import { main, type CliIo } from './main';
import { lineOfJsonPath } from './check';
import { SAFETY_CAUTION } from '@/lib/diagnosis/findings';
import { TEST_NAMEPLATE, syntheticSamples } from '@/test/support/synthetic-unit';

let dir: string;

function capture(isTTY = false): { io: CliIo; out: () => string; err: () => string } {
  let out = '';
  let err = '';
  const stdout = new Writable({ write: (chunk, _enc, done) => ((out += String(chunk)), done()) });
  const stderr = Object.assign(new Writable({ write: (chunk, _enc, done) => ((err += String(chunk)), done()) }), { isTTY });
  return { io: { stdout, stderr }, out: () => out, err: () => err };
}

function csv(samples: readonly TelemetrySample[], fields: readonly string[] = TELEMETRY_FIELDS): string {
  const lines = [fields.join(',')];
  for (const s of samples) {
    lines.push(
      fields
        .map((f) => {
          const v = (s as Record<string, unknown>)[f];
          if (f === 'ts') return new Date(v as number).toISOString();
          return v === undefined ? '' : String(v);
        })
        .join(','),
    );
  }
  return `${lines.join('\n')}\n`;
}

function file(name: string, text: string): string {
  const path = join(dir, name);
  writeFileSync(path, text);
  return path;
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'millrace-check-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('millrace check', () => {
  it('analyses a good log and prints the contract JSON', async () => {
    const unit = file('unit.json', JSON.stringify(TEST_NAMEPLATE, null, 2));
    const log = file('good.csv', csv(syntheticSamples({ ratedLoadKw: 6, statorC: 35 })));
    const c = capture();
    expect(await main(['check', '--nameplate', unit, '--log', log, '--json'], c.io)).toBe(0);
    const result = JSON.parse(c.out());
    expect(Object.keys(result).slice(0, 8)).toEqual(['samplesUsed', 'keRatio', 'keRatioLow', 'keRatioHigh', 'unbalancePct', 'speedRatio', 'verdict', 'findings']);
    expect(result.verdict).toBe('healthy');
    expect(result.samplesUsed).toBe(720);
    expect(result.keRatio).toBeCloseTo(1, 2);
    expect(result.details.input.rows).toBe(720);
    for (const f of result.findings) expect(Object.keys(f)).toEqual(['code', 'severity', 'message']);
    expect(c.err()).toBe('');
  });

  it('prints a readable report: verdict first, numbers, findings with the caution', async () => {
    const unit = file('unit.json', JSON.stringify(TEST_NAMEPLATE));
    const log = file('demag.csv', csv(syntheticSamples({ fluxFactor: 0.9 })));
    const c = capture();
    expect(await main(['check', '--nameplate', unit, '--log', log], c.io)).toBe(0);
    const lines = c.out().split('\n');
    expect(lines[0]).toBe('Verdict: Magnets weakened (corrected Ke low on all phases alike)');
    const ke = lines.findIndex((l) => l.includes('Ke ratio'));
    const findings = lines.indexOf('Findings');
    expect(ke).toBeGreaterThan(0);
    expect(findings).toBeGreaterThan(ke);
    expect(lines).toContain('  ALARM: Magnets weakened');
    expect(lines.some((l) => l.startsWith('    Next steps: '))).toBe(true);
    expect(c.out().replace(/\s+/g, ' ')).toContain(SAFETY_CAUTION);
    // A crew member reads the report on a small terminal: no line past 80 columns.
    for (const line of lines) expect(line.length, line).toBeLessThanOrEqual(80);
  });

  it('reports speeds above maxRpm as an overspeed alarm, in JSON and in the report', async () => {
    const unit = file('unit.json', JSON.stringify(TEST_NAMEPLATE));
    // TEST_NAMEPLATE.maxRpm is 420 (ratedRpm 300): samples 50–59 at 1.5 of rated, 450 rpm.
    const log = file('overspeed.csv', csv(syntheticSamples({ speedShare: (i) => (i >= 50 && i < 60 ? 1.5 : 0.3 + (0.9 * i) / 719), noise: 0 })));
    const j = capture();
    expect(await main(['check', '--nameplate', unit, '--log', log, '--json'], j.io)).toBe(0);
    const result = JSON.parse(j.out()) as { verdict: string; findings: Array<{ code: string; severity: string; message: string }> };
    const f = result.findings.find((x) => x.code === 'overspeed');
    expect(f?.severity).toBe('alarm');
    expect(f!.message).toContain('10 samples above the 420 rpm overspeed limit');
    expect(result.verdict).toBe('healthy');
    const r = capture();
    expect(await main(['check', '--nameplate', unit, '--log', log], r.io)).toBe(0);
    const lines = r.out().split('\n');
    expect(lines[1]).toBe('Also alarmed: Overspeed');
    expect(lines).toContain('  ALARM: Overspeed');
  });

  it('skips bad rows, counting them with line numbers and reasons', async () => {
    const unit = file('unit.json', JSON.stringify(TEST_NAMEPLATE));
    const text = csv(syntheticSamples()).split('\n');
    text.splice(3, 0, '2026-03-01T00:00:05Z,abc,60,400,400,400,0,0,0,0,20,10');
    text.splice(10, 0, '2026-03-01T00:00:06Z,-5,60,400,400,400,0,0,0,0,20,10');
    text.splice(20, 0, 'not-a-time,300,60,400,400,400,0,0,0,0,20,10');
    const log = file('bad-rows.csv', text.join('\n'));
    const c = capture();
    expect(await main(['check', '--nameplate', unit, '--log', log, '--json'], c.io)).toBe(0);
    const result = JSON.parse(c.out());
    const skipped = result.findings.find((f: { code: string }) => f.code === 'rows-skipped');
    expect(skipped.severity).toBe('warning');
    expect(skipped.message).toContain('3 of 723 rows');
    expect(skipped.message).toContain('line 4: rpm');
    expect(skipped.message).toContain('line 11: rpm');
    expect(skipped.message).toContain('line 21: ts');
    expect(result.samplesUsed).toBe(720);
  });

  it('reports unknown columns once as a warning', async () => {
    const unit = file('unit.json', JSON.stringify(TEST_NAMEPLATE));
    const samples = syntheticSamples({ count: 100 }).map((s) => ({ ...s, yawDeg: 12 }));
    const log = file('extra.csv', csv(samples as never, [...TELEMETRY_FIELDS, 'yawDeg']));
    const c = capture();
    expect(await main(['check', '--nameplate', unit, '--log', log, '--json'], c.io)).toBe(0);
    const unknown = JSON.parse(c.out()).findings.filter((f: { code: string }) => f.code === 'unknown-columns');
    expect(unknown).toHaveLength(1);
    expect(unknown[0].message).toContain('yawDeg');
  });

  it('exits 2 naming the file, line 1 and the field when a required column is absent', async () => {
    const unit = file('unit.json', JSON.stringify(TEST_NAMEPLATE));
    const log = file('no-vab.csv', csv(syntheticSamples({ count: 40 }), ['ts', 'rpm', 'hz', 'vbc']));
    const c = capture();
    expect(await main(['check', '--nameplate', unit, '--log', log], c.io)).toBe(2);
    expect(c.err()).toContain(log);
    expect(c.err()).toContain('line 1');
    expect(c.err()).toContain('vab');
    expect(c.out()).toBe('');
  });

  it('exits 2 naming the file, the line and the field of a bad nameplate', async () => {
    const text = JSON.stringify({ ...TEST_NAMEPLATE, poles: 7 }, null, 2);
    const unit = file('bad-unit.json', text);
    const log = file('good2.csv', csv(syntheticSamples({ count: 40 })));
    const c = capture();
    expect(await main(['check', '--nameplate', unit, '--log', log], c.io)).toBe(2);
    const polesLine = text.split('\n').findIndex((l) => l.includes('"poles"')) + 1;
    expect(c.err()).toContain(`${unit}: line ${polesLine}: poles: must be an even number, got 7`);
  });

  it('exits 2 for a missing log or nameplate, naming the file', async () => {
    const unit = file('unit.json', JSON.stringify(TEST_NAMEPLATE));
    const c = capture();
    expect(await main(['check', '--nameplate', unit, '--log', join(dir, 'absent.csv')], c.io)).toBe(2);
    expect(c.err()).toContain('absent.csv');
    const d = capture();
    expect(await main(['check', '--nameplate', join(dir, 'absent.json'), '--log', unit], d.io)).toBe(2);
    expect(d.err()).toContain('absent.json');
    const e = capture();
    expect(await main(['check', '--log', unit], e.io)).toBe(2);
    expect(e.err()).toContain('--nameplate');
  });

  it('writes a progress line only when standard error is a terminal', async () => {
    const unit = file('unit.json', JSON.stringify(TEST_NAMEPLATE));
    const log = file('progress.csv', csv(syntheticSamples({ count: 50 })));
    const tty = capture(true);
    expect(await main(['check', '--nameplate', unit, '--log', log, '--json'], tty.io)).toBe(0);
    expect(tty.err()).toContain('reading progress.csv');
    const pipe = capture(false);
    expect(await main(['check', '--nameplate', unit, '--log', log, '--json'], pipe.io)).toBe(0);
    expect(pipe.err()).toBe('');
  });
});

describe('lineOfJsonPath', () => {
  const text = '{\n  "id": "a",\n  "curve": [\n    { "ms": 3 },\n    { "ms": "x" }\n  ],\n  "poles": 7\n}';
  it('finds fields, array items and falls back to the parent of an absent field', () => {
    expect(lineOfJsonPath(text, ['id'])).toBe(2);
    expect(lineOfJsonPath(text, ['poles'])).toBe(7);
    expect(lineOfJsonPath(text, ['curve', 1, 'ms'])).toBe(5);
    expect(lineOfJsonPath(text, ['kind'])).toBe(1);
    expect(lineOfJsonPath(text, ['curve', 5])).toBe(3);
  });
});
