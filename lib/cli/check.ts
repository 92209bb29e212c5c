/**
 * `npx millrace check --nameplate UNIT.json --log LOG.csv [--json]`
 * (contract, section 4): diagnoses a whole log against the unit's nameplate.
 * Exit 0 when the analysis ran, whatever the verdict; 2 when it could not,
 * with a message naming the file, the line and the field.
 */
import { statSync } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { basename } from 'node:path';
import { AppError } from '@/lib/errors/app-error';
import { formatIssues } from '@/lib/contract/telemetry';
import { nameplateSchema, type Nameplate } from '@/lib/contract/nameplate';
import { diagnoseSamples, type DiagnosisResult } from '@/lib/diagnosis/diagnose';
import { SAFETY_CAUTION, finding, num, splitFindingMessage, type Finding } from '@/lib/diagnosis/findings';
import { SEVERITY_LABEL, VERDICT_BASIS, VERDICT_LABEL, findingTitle } from '@/lib/diagnosis/vocabulary';
import { SampleColumns } from '@/lib/diagnosis/sample-columns';
import { parseOptions } from './args';
import { readCsvLog } from './csv-log';
import { readJsonFile } from './json-file';
import type { CliIo } from './main';

/** Bad rows named one by one in the rows-skipped finding; the rest are counted. */
const BAD_ROWS_LISTED = 5;
/** Rough bytes per CSV row, to size the column store from the file size once. */
const BYTES_PER_ROW_GUESS = 90;
/** Largest store allocated up front (it grows past that if needed). */
const MAX_INITIAL_ROWS = 4_000_000;
/** Milliseconds between progress updates on a terminal. */
const PROGRESS_EVERY_MS = 200;
/** Width the readable report wraps to. */
const REPORT_WIDTH = 80;

/** Runs `check`; returns the exit status. */
export async function run(args: string[], io: CliIo): Promise<number> {
  const { values } = parseOptions(args, {
    nameplate: { type: 'string', required: true },
    log: { type: 'string', required: true },
    json: { type: 'boolean' },
  });
  const nameplatePath = values.nameplate as string;
  const logPath = values.log as string;
  const nameplate = await loadNameplate(nameplatePath);

  const progress = io.stderr.isTTY === true ? progressLine(io.stderr, basename(logPath)) : undefined;
  const bad: Array<{ line: number; problems: readonly string[] }> = [];
  let badRows = 0;
  let rows = 0;
  const store = new SampleColumns(initialRows(logPath));
  const summary = await readCsvLog(logPath, {
    onSample(sample) {
      store.push(sample);
      rows++;
    },
    onBadRow(line, problems) {
      badRows++;
      rows++;
      if (bad.length < BAD_ROWS_LISTED) bad.push({ line, problems });
    },
    onProgress(bytesRead, totalBytes) {
      progress?.update(bytesRead, totalBytes, rows);
    },
  });
  progress?.done();

  const extraFindings: Finding[] = [];
  if (badRows > 0) {
    const listed = bad.map((b) => `line ${b.line}: ${b.problems.join('; ')}`).join(' | ');
    const more = badRows > bad.length ? ` | and ${num(badRows - bad.length)} more` : '';
    extraFindings.push(
      finding(
        'rows-skipped',
        'warning',
        `${num(badRows)} of ${num(summary.rows)} rows of ${logPath} were skipped as invalid and not analysed: ${listed}${more}.`,
      ),
    );
  }
  if (summary.unknownColumns.length > 0) {
    extraFindings.push(
      finding(
        'unknown-columns',
        'warning',
        `${logPath}: line 1: column${summary.unknownColumns.length > 1 ? 's' : ''} ${summary.unknownColumns.join(', ')} ` +
          `${summary.unknownColumns.length > 1 ? 'are' : 'is'} not a telemetry field and ${summary.unknownColumns.length > 1 ? 'were' : 'was'} ignored.`,
      ),
    );
  }

  const result = diagnoseSamples({ nameplate, samples: store, extraFindings });
  if (values.json) {
    const input = { unit: nameplate.id, site: nameplate.siteId, log: logPath, rows: summary.rows, rowsSkipped: badRows };
    io.stdout.write(`${JSON.stringify(roundForJson({ ...result, details: { ...result.details, input } }))}\n`);
  } else {
    io.stdout.write(readableReport(result, nameplate, logPath, summary.rows));
  }
  return 0;
}

/** Rows to make room for up front, from the file size; readCsvLog reports an unreadable file itself. */
function initialRows(path: string): number {
  try {
    return Math.max(1024, Math.min(MAX_INITIAL_ROWS, Math.ceil(statSync(path).size / BYTES_PER_ROW_GUESS)));
  } catch {
    return 1024;
  }
}

/**
 * Reads and validates the nameplate. Problems throw AppError naming the file,
 * the line of the offending field in the JSON text and the field.
 */
async function loadNameplate(path: string): Promise<Nameplate> {
  const result = await readJsonFile(path, nameplateSchema);
  if (result.ok) return result.value;
  // readJsonFile has parsed the text once already, so it is readable and valid JSON.
  const text = await readFile(path, 'utf8');
  const parsed = nameplateSchema.safeParse(JSON.parse(text));
  const issues = parsed.success ? [] : parsed.error.issues;
  const lines = issues.map((issue) => {
    const line = lineOfJsonPath(text, issue.path as ReadonlyArray<string | number>);
    return `  ${path}: line ${line}: ${formatIssues([issue])[0]}`;
  });
  throw new AppError('bad-input', 'cli', `${path}: invalid nameplate\n${lines.join('\n')}`);
}

/**
 * Line (1-based) where the value at `path` starts in JSON `text`, or where
 * its nearest existing parent starts when the field is absent.
 */
export function lineOfJsonPath(text: string, path: ReadonlyArray<string | number>): number {
  let pos = 0;
  let line = 1;
  const skipSpace = () => {
    while (pos < text.length && /\s/.test(text[pos] as string)) {
      if (text[pos] === '\n') line++;
      pos++;
    }
  };
  const readString = (): string => {
    const start = pos;
    pos++;
    while (pos < text.length && text[pos] !== '"') pos += text[pos] === '\\' ? 2 : 1;
    pos++;
    return JSON.parse(text.slice(start, pos)) as string;
  };
  const skipValue = () => {
    skipSpace();
    const ch = text[pos];
    if (ch === '"') readString();
    else if (ch === '{' || ch === '[') {
      const close = ch === '{' ? '}' : ']';
      pos++;
      skipSpace();
      if (text[pos] === close) {
        pos++;
        return;
      }
      for (;;) {
        if (ch === '{') {
          skipSpace();
          readString();
          skipSpace();
          pos++; // colon
        }
        skipValue();
        skipSpace();
        if (text[pos] === ',') pos++;
        else {
          pos++;
          return;
        }
      }
    } else {
      while (pos < text.length && !/[\s,\]}]/.test(text[pos] as string)) pos++;
    }
  };
  skipSpace();
  let found = line;
  for (const key of path) {
    found = line;
    const ch = text[pos];
    if (ch === '{' && typeof key === 'string') {
      pos++;
      let hit = false;
      for (;;) {
        skipSpace();
        if (text[pos] !== '"') break;
        const name = readString();
        skipSpace();
        pos++; // colon
        skipSpace();
        if (name === key) {
          hit = true;
          break;
        }
        skipValue();
        skipSpace();
        if (text[pos] === ',') pos++;
        else break;
      }
      if (!hit) return found;
    } else if (ch === '[' && typeof key === 'number') {
      pos++;
      for (let i = 0; i < key; i++) {
        skipValue();
        skipSpace();
        if (text[pos] === ',') pos++;
        else return found;
      }
      skipSpace();
    } else return found;
  }
  return line;
}

/** Rounds every number to 6 decimals so the JSON carries no float noise (0.981 not 0.98100000000001). */
function roundForJson(value: unknown): unknown {
  if (typeof value === 'number') return Number.isInteger(value) ? value : Math.round(value * 1e6) / 1e6;
  if (Array.isArray(value)) return value.map(roundForJson);
  if (value !== null && typeof value === 'object') {
    return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, roundForJson(v)]));
  }
  return value;
}

/** A single progress line on a terminal, rewritten in place. */
function progressLine(stream: NodeJS.WritableStream, name: string) {
  let last = 0;
  return {
    update(bytesRead: number, totalBytes: number, rows: number) {
      const now = Date.now();
      if (now - last < PROGRESS_EVERY_MS) return;
      last = now;
      const pct = totalBytes > 0 ? Math.min(100, (100 * bytesRead) / totalBytes) : 0;
      stream.write(`\rmillrace check: reading ${name} ${pct.toFixed(0)} % (${num(rows)} rows)\x1b[K`);
    },
    done() {
      stream.write('\r\x1b[K');
    },
  };
}

/** Word-wraps `text` to the report width, the first line after `first`, the others after `rest`. */
function wrap(text: string, first: string, rest: string, width: number = REPORT_WIDTH): string[] {
  const lines: string[] = [];
  let current = first;
  let fresh = true;
  for (const word of text.split(/\s+/).filter(Boolean)) {
    if (!fresh && current.length + 1 + word.length > width) {
      lines.push(current);
      current = rest;
      fresh = true;
    }
    current += fresh ? word : ` ${word}`;
    fresh = false;
  }
  if (!fresh) lines.push(current);
  return lines;
}

const MAGNET_NAMES: Record<Nameplate['magnet'], string> = { ndfeb: 'NdFeB', smco: 'SmCo', ferrite: 'ferrite' };

const TEMPERATURE_SOURCE: Record<NonNullable<DiagnosisResult['details']['magnetTempSource']>, string> = {
  statorC: 'the stator temperature',
  ambientC: 'the ambient temperature',
  keRefC: "the nameplate's reference (no reading)",
  mixed: 'stator or ambient temperature, sample by sample',
};

/** The report without --json: verdict first, then the numbers, then the findings with their next steps. */
function readableReport(result: DiagnosisResult, nameplate: Nameplate, logPath: string, rows: number): string {
  const d = result.details;
  const out: string[] = [];
  out.push(`Verdict: ${VERDICT_LABEL[result.verdict]} (${VERDICT_BASIS[result.verdict]})`);
  const alarms = result.findings.filter((f) => f.severity === 'alarm' && f.code !== result.verdict).map((f) => findingTitle(f.code));
  if (alarms.length > 0) out.push(`Also alarmed: ${alarms.join(', ')}`);
  out.push(...wrap(`Unit ${nameplate.siteId}/${nameplate.id}, log ${logPath}`, '', '  '));
  out.push('');
  const row = (label: string, value: string) => out.push(...wrap(value, `  ${label.padEnd(16)}`, ' '.repeat(18)));
  row(
    'Ke ratio',
    result.keRatio === null
      ? 'unknown'
      : `${num(result.keRatio, 3)} of nameplate (95 % interval ${num(result.keRatioLow ?? result.keRatio, 3)} to ${num(result.keRatioHigh ?? result.keRatio, 3)})`,
  );
  if (d.keMeasuredVPerKrpm !== null) {
    row('Ke measured', `${num(d.keMeasuredVPerKrpm, 1)} V per 1000 rpm at ${num(nameplate.keRefC)} °C (nameplate ${num(d.keNameplateVPerKrpm, 1)})`);
  }
  row(
    'Unbalance',
    result.unbalancePct === null
      ? 'unknown (needs vab, vbc and vca)'
      : `${num(result.unbalancePct, 2)} % line voltage (NEMA MG 1)` +
          (d.negativeSequencePct === null ? '' : `, ${num(d.negativeSequencePct, 2)} % negative sequence (IEC 61000-4-30)`),
  );
  if (d.phaseKeRatio !== null) row('Phase Ke', `a ${num(d.phaseKeRatio.a, 3)}, b ${num(d.phaseKeRatio.b, 3)}, c ${num(d.phaseKeRatio.c, 3)}`);
  row(
    'Speed ratio',
    `${result.speedRatio === null ? 'unknown' : `${num(result.speedRatio, 3)} (frequency over poles × rpm / 120)`}; Ke fitted on speed from ${d.speedSource === 'hz' ? 'the terminal frequency' : 'the speed sensor'}`,
  );
  row('Samples used', `${num(result.samplesUsed)} of ${num(rows)} rows`);
  if (d.speedMinRpm !== null && d.speedMaxRpm !== null) row('Speed range', `${num(d.speedMinRpm)} to ${num(d.speedMaxRpm)} rpm (rated ${num(nameplate.ratedRpm)})`);
  if (d.magnetMeanC !== null) {
    row('Magnets', `mean ${num(d.magnetMeanC, 1)} °C from ${d.magnetTempSource === null ? 'no reading' : TEMPERATURE_SOURCE[d.magnetTempSource]}; ${MAGNET_NAMES[nameplate.magnet]}, ${num(d.magnetCoeffPctPerC, 3)} % per °C`);
  }
  if (d.loadedSharePct !== null) {
    row('Load', `${num(d.loadedSharePct)} % of used samples under load` + (d.loadCorrectionPct === null ? '' : `, EMF ${num(d.loadCorrectionPct, 1)} % above terminal voltage on average`));
  }
  if (d.naiveKeRatio !== null) row('Plain V/rpm', `${num(d.naiveKeRatio, 3)} of nameplate (no corrections, for comparison)`);
  if (d.fromTs !== null && d.toTs !== null) row('Time range', `${d.fromTs} to ${d.toTs}`);
  out.push('');
  out.push('Findings');
  for (const f of result.findings) {
    const parts = splitFindingMessage(f.message);
    out.push('');
    out.push(...wrap(`${SEVERITY_LABEL[f.severity].toUpperCase()}: ${findingTitle(f.code)}`, '  ', '    '));
    out.push(...wrap(parts.observation, '    ', '    '));
    if (parts.nextSteps !== undefined) out.push(...wrap(`Next steps: ${parts.nextSteps}`, '    ', '    '));
    if (parts.caution) out.push(...wrap(SAFETY_CAUTION, '    ! ', '      '));
  }
  out.push('');
  return out.join('\n');
}
