/**
 * `npx millrace energy --nameplate UNIT.json --log LOG.csv [--tz ZONE] [--json]`
 * (contract, section 4): energy yield of a log per calendar month.
 *
 * Samples without `kw` count toward no energy, coverage or availability;
 * samples without `windMs` (wind) or `flowM3s` (hydro) toward no expected
 * energy or availability. Each is counted in a note, as are bad rows, so the
 * reader sees what the figures rest on.
 */
import type { CliIo } from './main';
import { parseOptions } from './args';
import { readCsvLog } from './csv-log';
import { readNameplateFile } from './json-file';
import { AppError } from '@/lib/errors/app-error';
import { isIanaTimeZone, type Nameplate } from '@/lib/contract/nameplate';
import { describeValue } from '@/lib/contract/telemetry';
import { collectEnergySamples, type EnergySampleCounts } from '@/lib/energy/energy-samples';
import { monthlyEnergy, type MonthEnergy } from '@/lib/energy/monthly-energy';
import { energyFigures, type EnergyFigures } from '@/lib/energy/energy-figures';
import { sumEnergyTotals } from '@/lib/energy/energy-totals';
import { MAX_COVERED_INTERVAL_MS } from '@/lib/energy/integrate';
import { UTC_ZONE } from '@/lib/energy/zoned-time';

/** How many bad rows a note lists by line. */
const LISTED_BAD_ROWS = 5;

/** A note on what the figures rest on, shaped like a finding of `check`. */
export interface EnergyNote {
  code: string;
  severity: 'info' | 'warning';
  message: string;
}

/** One month as the contract writes it: null where a figure cannot be computed. */
export interface MonthReport {
  month: string;
  kwh: number | null;
  coveragePct: number;
  capacityFactorPct: number | null;
  availabilityPct: number | null;
  expectedKwh: number | null;
  performanceRatio: number | null;
}

/** The `--json` output: the contract's `months`, plus what the figures rest on. */
export interface EnergyReport {
  months: MonthReport[];
  timeZone: string;
  samplesUsed: number;
  rowsSkipped: { count: number; first: Array<{ line: number; problems: string[] }> };
  notes: EnergyNote[];
}

function round(value: number, decimals: number): number {
  const f = 10 ** decimals;
  const r = Math.round(value * f) / f;
  return r === 0 ? 0 : r;
}

const orNull = (value: number | undefined, decimals: number): number | null => (value === undefined ? null : round(value, decimals));

/** Rounds figures for output: kWh to the Wh, percentages to 0.01, ratios to 0.0001. */
function monthReport(month: string, f: EnergyFigures): MonthReport {
  return {
    month,
    kwh: orNull(f.kwh, 3),
    coveragePct: round(f.coveragePct, 2),
    capacityFactorPct: orNull(f.capacityFactorPct, 2),
    availabilityPct: orNull(f.availabilityPct, 2),
    expectedKwh: orNull(f.expectedKwh, 3),
    performanceRatio: orNull(f.performanceRatio, 4),
  };
}

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

interface NoteInputs {
  nameplate: Nameplate;
  /** Data rows of the log, good and bad. */
  rows: number;
  columns: readonly string[];
  unknownColumns: readonly string[];
  counts: EnergySampleCounts;
  badRows: EnergyReport['rowsSkipped'];
  months: readonly MonthEnergy[];
}

function buildNotes({ nameplate, rows, columns, unknownColumns, counts, badRows, months }: NoteInputs): EnergyNote[] {
  const notes: EnergyNote[] = [];
  const resourceField = nameplate.kind === 'wind' ? 'windMs' : 'flowM3s';
  const gapMinutes = MAX_COVERED_INTERVAL_MS / 60_000;

  if (badRows.count > 0) {
    const listed = badRows.first.map((row) => `line ${row.line} (${row.problems.join('; ')})`).join(', ');
    const more = badRows.count > badRows.first.length ? ` and ${badRows.count - badRows.first.length} more` : '';
    notes.push({
      code: 'rows-skipped',
      severity: 'warning',
      message: `${badRows.count} of ${plural(rows, 'row')} skipped as invalid, not counted: ${listed}${more}`,
    });
  }
  if (counts.samples === 0) {
    notes.push({ code: 'no-samples', severity: 'warning', message: 'the log holds no valid sample: there is no month to report' });
    return notes;
  }
  if (!columns.includes('kw')) {
    notes.push({
      code: 'no-kw-column',
      severity: 'warning',
      message: 'the log has no kw column: energy, capacity factor, availability and performance ratio cannot be computed',
    });
  } else if (counts.withoutKw > 0) {
    notes.push({
      code: 'samples-without-kw',
      severity: 'warning',
      message:
        `${counts.withoutKw} of ${plural(counts.samples, 'sample')} have no kw: they count toward no energy, coverage or availability ` +
        `(time across them is covered only where the samples with kw on either side are at most ${gapMinutes} minutes apart)`,
    });
  }
  if (!columns.includes(resourceField)) {
    notes.push({
      code: 'no-resource-column',
      severity: 'warning',
      message: `the log has no ${resourceField} column: expected energy, availability and performance ratio cannot be computed`,
    });
  } else if (counts.withoutResource > 0) {
    notes.push({
      code: 'samples-without-resource',
      severity: 'info',
      message: `${counts.withoutResource} of ${plural(counts.samples, 'sample')} have no ${resourceField}: no expected power and no availability for them`,
    });
  }
  if (nameplate.kind === 'wind' && columns.includes('windMs') && !columns.includes('airKgM3')) {
    notes.push({
      code: 'no-air-density',
      severity: 'info',
      message: 'the log has no airKgM3 column: expected power read at the wind speed as measured, not normalised to 1.225 kg/m³',
    });
  }
  if (nameplate.kind === 'hydro' && columns.includes('flowM3s') && !columns.includes('headM')) {
    notes.push({
      code: 'design-head',
      severity: 'info',
      message: `the log has no headM column: expected power taken at the design head of ${nameplate.designHeadM} m`,
    });
  }
  for (const m of months) {
    const t = m.totals;
    if (m.performanceRatio !== undefined && t.pairedCoveredHours < t.coveredHours * 0.999) {
      notes.push({
        code: 'partial-performance-ratio',
        severity: 'info',
        message:
          `${m.month}: performance ratio taken over the ${round((t.pairedCoveredHours / t.coveredHours) * 100, 1)} % ` +
          `of measured time whose samples carry both kw and ${resourceField}`,
      });
    }
  }
  if (counts.outOfOrder > 0) {
    notes.push({
      code: 'out-of-order',
      severity: 'info',
      message: `${plural(counts.outOfOrder, 'sample')} came earlier than the row before; the log was sorted by ts before integrating`,
    });
  }
  if (counts.repeatedTimes > 0) {
    notes.push({
      code: 'repeated-times',
      severity: 'info',
      message: `${plural(counts.repeatedTimes, 'sample')} repeat the ts of another; the zero-length interval between them counts for nothing`,
    });
  }
  if (unknownColumns.length > 0) {
    notes.push({
      code: 'unknown-columns',
      severity: 'info',
      message: `columns that are not telemetry fields were ignored: ${unknownColumns.join(', ')}`,
    });
  }
  return notes;
}

function cell(value: number | null, decimals: number): string {
  return value === null ? '–' : value.toFixed(decimals);
}

function textReport(report: EnergyReport, nameplate: Nameplate, logPath: string, total: MonthReport | undefined): string {
  const lines: string[] = [];
  const name = nameplate.name ? `${nameplate.name} (${nameplate.id})` : nameplate.id;
  lines.push(`Energy yield of ${name}: ${nameplate.kind} unit, ${nameplate.ratedKw} kW rated`);
  lines.push(`Log ${logPath}: ${plural(report.samplesUsed, 'sample')} used; calendar months in ${report.timeZone}`);
  lines.push('');
  if (report.months.length > 0) {
    const header = ['month', 'kWh', 'coverage %', 'capacity factor %', 'availability %', 'expected kWh', 'performance ratio'];
    const rows = report.months.map((m) => [
      m.month,
      cell(m.kwh, 1),
      cell(m.coveragePct, 1),
      cell(m.capacityFactorPct, 1),
      cell(m.availabilityPct, 1),
      cell(m.expectedKwh, 1),
      cell(m.performanceRatio, 3),
    ]);
    if (total !== undefined && report.months.length > 1) {
      rows.push([
        'all',
        cell(total.kwh, 1),
        cell(total.coveragePct, 1),
        cell(total.capacityFactorPct, 1),
        cell(total.availabilityPct, 1),
        cell(total.expectedKwh, 1),
        cell(total.performanceRatio, 3),
      ]);
    }
    const widths = header.map((h, c) => Math.max(h.length, ...rows.map((r) => (r[c] as string).length)));
    const format = (r: readonly string[]) =>
      r.map((v, c) => (c === 0 ? v.padEnd(widths[c] as number) : v.padStart(widths[c] as number))).join('  ');
    lines.push(format(header));
    for (const r of rows) lines.push(format(r));
    lines.push('');
    lines.push(`coverage: time with samples at most ${MAX_COVERED_INTERVAL_MS / 60_000} minutes apart, over the month's time`);
    lines.push(
      `availability: time delivering (kW above 0) over time with ${nameplate.kind === 'wind' ? 'the wind between cut-in and cut-out' : 'water flowing'}`,
    );
    lines.push('–: the figure cannot be computed from this log');
  }
  if (report.notes.length > 0) {
    lines.push('');
    lines.push('Notes:');
    for (const n of report.notes) lines.push(`  ${n.severity} ${n.code}: ${n.message}`);
  }
  return `${lines.join('\n')}\n`;
}

/** Runs the command; returns the exit status (AppError for a run that cannot start). */
export async function run(args: string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseOptions(args, {
    nameplate: { type: 'string', required: true },
    log: { type: 'string', required: true },
    tz: { type: 'string' },
    json: { type: 'boolean' },
  });
  if (positionals.length > 0) throw new AppError('bad-input', 'cli', `unexpected argument ${describeValue(positionals[0])}`);
  const nameplatePath = values.nameplate as string;
  const logPath = values.log as string;
  let timeZone = UTC_ZONE;
  if (values.tz !== undefined) {
    if (!isIanaTimeZone(values.tz)) {
      throw new AppError('bad-input', 'cli', `--tz: must be an IANA time zone such as Europe/Oslo, got ${describeValue(values.tz)}`);
    }
    timeZone = new Intl.DateTimeFormat('en-US', { timeZone: values.tz }).resolvedOptions().timeZone;
  }

  const nameplate = await readNameplateFile(nameplatePath);
  const collector = collectEnergySamples(nameplate);
  const rowsSkipped: EnergyReport['rowsSkipped'] = { count: 0, first: [] };
  const showProgress = io.stderr.isTTY === true;
  let shownPct = -1;
  const summary = await readCsvLog(logPath, {
    onSample: (sample) => collector.add(sample),
    onBadRow: (line, problems) => {
      rowsSkipped.count++;
      if (rowsSkipped.first.length < LISTED_BAD_ROWS) rowsSkipped.first.push({ line, problems: [...problems] });
    },
    onProgress: (bytesRead, totalBytes) => {
      if (!showProgress || totalBytes === 0) return;
      const pct = Math.floor((bytesRead / totalBytes) * 100);
      if (pct >= shownPct + 5) {
        shownPct = pct;
        io.stderr.write(`\rreading ${logPath}: ${pct} %`);
      }
    },
  });
  if (showProgress && shownPct >= 0) io.stderr.write('\r\x1b[K');

  const { samples, counts } = collector.finish();
  const months = monthlyEnergy(samples, { ratedKw: nameplate.ratedKw, timeZone });
  const notes = buildNotes({
    nameplate,
    rows: summary.rows,
    columns: summary.columns,
    unknownColumns: summary.unknownColumns,
    counts,
    badRows: rowsSkipped,
    months,
  });
  const report: EnergyReport = {
    months: months.map((m) => monthReport(m.month, m)),
    timeZone,
    samplesUsed: counts.samples,
    rowsSkipped,
    notes,
  };
  if (values.json) {
    io.stdout.write(`${JSON.stringify(report, null, 2)}\n`);
  } else {
    const total = months.length > 0 ? monthReport('all', energyFigures(sumEnergyTotals(months.map((m) => m.totals)), nameplate.ratedKw)) : undefined;
    io.stdout.write(textReport(report, nameplate, logPath, total));
  }
  return 0;
}
