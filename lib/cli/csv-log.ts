/**
 * Reads a CSV telemetry log (contract, section 4): a header of telemetry
 * field names in any order, one sample a row. Rows are validated with the
 * contract schema; a bad row is reported with its line number and reason and
 * never stops the read. Streams, so a log of millions of rows does not sit in
 * memory as text.
 */
import { createReadStream, statSync } from 'node:fs';
import { AppError } from '@/lib/errors/app-error';
import { describeFileError } from './file-errors';
import {
  REQUIRED_TELEMETRY_FIELDS,
  TELEMETRY_FIELDS,
  parseTelemetrySample,
  type TelemetrySample,
} from '@/lib/contract/telemetry';

export interface CsvLogHandlers {
  /** A valid sample and its 1-based line number. */
  onSample(sample: TelemetrySample, line: number): void;
  /** A row that failed validation: line number and "field: reason" lines. */
  onBadRow?(line: number, problems: readonly string[]): void;
  /** Bytes read so far and the file size, for a progress line. */
  onProgress?(bytesRead: number, totalBytes: number): void;
}

export interface CsvLogSummary {
  /** Columns of the header that are telemetry fields. */
  columns: string[];
  /** Header columns that are not telemetry fields (ignored, reported once). */
  unknownColumns: string[];
  rows: number;
  goodRows: number;
  badRows: number;
}

/** Splits one CSV line, honouring double quotes (RFC 4180). */
export function splitCsvLine(line: string): string[] {
  if (!line.includes('"')) return line.split(',');
  const cells: string[] = [];
  let cell = '';
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const ch = line[i];
    if (quoted) {
      if (ch === '"') {
        if (line[i + 1] === '"') {
          cell += '"';
          i++;
        } else quoted = false;
      } else cell += ch;
    } else if (ch === '"') quoted = true;
    else if (ch === ',') {
      cells.push(cell);
      cell = '';
    } else cell += ch;
  }
  cells.push(cell);
  return cells;
}

/** Turns a CSV cell into a value for the schema: empty is absent, numeric text a number. */
function cellValue(field: string, text: string): unknown {
  const trimmed = text.trim();
  if (trimmed === '') return undefined;
  if (field === 'ts') return trimmed;
  const n = Number(trimmed);
  return Number.isNaN(n) && trimmed.toLowerCase() !== 'nan' ? trimmed : n;
}

/**
 * Reads `path` and calls the handlers for every row.
 * Throws AppError (`bad-input:cli`) naming the file when it cannot be read or
 * a required column is absent.
 */
export async function readCsvLog(path: string, handlers: CsvLogHandlers): Promise<CsvLogSummary> {
  let totalBytes: number;
  try {
    totalBytes = statSync(path).size;
  } catch (cause) {
    throw new AppError('bad-input', 'cli', describeFileError(cause, 'log', path), { cause });
  }
  const stream = createReadStream(path, { encoding: 'utf8', highWaterMark: 1 << 20 });
  let header: string[] | undefined;
  let fieldIndex: Array<string | undefined> = [];
  const summary: CsvLogSummary = { columns: [], unknownColumns: [], rows: 0, goodRows: 0, badRows: 0 };
  let lineNo = 0;
  let rest = '';
  let bytesRead = 0;

  const handleLine = (raw: string) => {
    lineNo++;
    const line = raw.endsWith('\r') ? raw.slice(0, -1) : raw;
    if (header === undefined) {
      const names = splitCsvLine(line.replace(/^\uFEFF/, '')).map((n) => n.trim());
      header = names;
      fieldIndex = names.map((n) => ((TELEMETRY_FIELDS as readonly string[]).includes(n) ? n : undefined));
      summary.columns = names.filter((n, i) => fieldIndex[i] !== undefined);
      summary.unknownColumns = names.filter((n, i) => fieldIndex[i] === undefined && n !== '');
      const missing = REQUIRED_TELEMETRY_FIELDS.filter((f) => !names.includes(f));
      if (missing.length > 0) {
        throw new AppError(
          'bad-input',
          'cli',
          `${path}: line 1: required column${missing.length > 1 ? 's' : ''} ${missing.join(', ')} absent from the header`,
        );
      }
      return;
    }
    if (line.trim() === '') return;
    summary.rows++;
    const cells = splitCsvLine(line);
    const raw2: Record<string, unknown> = {};
    for (let i = 0; i < fieldIndex.length; i++) {
      const field = fieldIndex[i];
      if (field === undefined) continue;
      const value = cellValue(field, cells[i] ?? '');
      if (value !== undefined) raw2[field] = value;
    }
    if (cells.length > header.length) {
      summary.badRows++;
      handlers.onBadRow?.(lineNo, [`row has ${cells.length} cells, the header ${header.length}`]);
      return;
    }
    const parsed = parseTelemetrySample(raw2);
    if (parsed.ok) {
      summary.goodRows++;
      handlers.onSample(parsed.sample, lineNo);
    } else {
      summary.badRows++;
      handlers.onBadRow?.(lineNo, parsed.problems);
    }
  };

  try {
    for await (const chunk of stream) {
      const text = rest + (chunk as string);
      bytesRead += Buffer.byteLength(chunk as string);
      let start = 0;
      let nl = text.indexOf('\n', start);
      while (nl !== -1) {
        handleLine(text.slice(start, nl));
        start = nl + 1;
        nl = text.indexOf('\n', start);
      }
      rest = text.slice(start);
      handlers.onProgress?.(bytesRead, totalBytes);
    }
    if (rest.length > 0) handleLine(rest);
  } catch (error) {
    stream.destroy();
    if (error instanceof AppError) throw error;
    throw new AppError('bad-input', 'cli', describeFileError(error, 'log', path), { cause: error });
  }
  if (header === undefined) {
    throw new AppError('bad-input', 'cli', `${path}: line 1: the log is empty, expected a header of telemetry field names`);
  }
  return summary;
}
