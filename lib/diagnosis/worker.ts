/**
 * The diagnosis worker, the live diagnosis (lib/live is the pages' feed):
 * every `intervalS` seconds, every unit that received samples since its last
 * diagnosis is diagnosed over its most recent window (the same library as
 * `millrace check`), and its latest health, a history row and its Ke trend
 * are written.
 *
 * History is appended at most once per `historyEveryS` per unit (and always
 * when the verdict changes): successive windows overlap by all but a minute,
 * so more rows would add volume and no information to the trend.
 */
import type { Db } from '@/db/client';
import type { Logger } from '@/lib/log/logger';
import type { LivePublisher } from '@/lib/live/publisher';
import { diagnoseSamples, type DiagnosisResult, type Verdict } from './diagnose';
import { finding } from './findings';
import { DEFAULT_LIMITS } from './limits';
import {
  getKeHistoryByUnitKeys,
  getLastHistoryTimesByUnitKeys,
  getSampleWindowsByUnitKeys,
  getUnitsDueForDiagnosis,
  upsertUnitHealthBatch,
  type HealthWrite,
  type UnitDue,
} from './queries';
import { SampleColumns } from './sample-columns';
import { keTrend } from './trend';
import { repeatEvery } from '@/lib/timing/repeat';

/** Most samples read per unit and window: 6 h at one a second, with room (bounds memory and time). */
export const DEFAULT_MAX_SAMPLES = 25_000;
/** Units read and written together, at most. */
export const DEFAULT_BATCH_UNITS = 50;
/**
 * Most sample rows a pass may hold at once, over all batches in flight. The
 * pass runs inside the ingester, whose heap is bounded (package.json, the
 * ingest script): a row read costs some 300 bytes until it is packed, so
 * 200,000 rows stay near 60 MB. Batches shrink to fit: with the default
 * 25,000-sample cap and 4 in flight, 2 units a batch.
 */
export const DEFAULT_ROWS_IN_FLIGHT = 200_000;
/** Batches in flight at once (postgres-js pools connections; PGlite runs them in turn). */
export const DEFAULT_CONCURRENCY = 4;
/** Seconds between history rows of a unit. */
export const DEFAULT_HISTORY_EVERY_S = 3600;
/** Days of history the trend looks back over. */
export const TREND_DAYS = 180;

export interface DiagnosisPassOptions {
  readonly db: Db;
  /** Hours of samples per unit, unless its nameplate sets its own; default 6. */
  readonly windowHours?: number;
  readonly maxSamples?: number;
  readonly batchUnits?: number;
  readonly concurrency?: number;
  readonly historyEveryS?: number;
  /** "Now", epoch ms (tests). */
  readonly nowMs?: number;
  readonly log?: Logger;
  /** Where to tell open pages that units were diagnosed: once per written batch, one event a unit. */
  readonly live?: LivePublisher;
}

/** What one pass did. */
export interface DiagnosisPassResult {
  readonly units: number;
  readonly samples: number;
  readonly historyRows: number;
  readonly verdicts: Partial<Record<Verdict, number>>;
  readonly elapsedMs: number;
}

function chunks<T>(list: readonly T[], size: number): T[][] {
  const out: T[][] = [];
  for (let i = 0; i < list.length; i += size) out.push(list.slice(i, i + size));
  return out;
}

async function diagnoseBatch(
  batch: readonly UnitDue[],
  o: Required<Omit<DiagnosisPassOptions, 'log' | 'live'>> & { log?: Logger; live?: LivePublisher },
): Promise<{ samples: number; writes: HealthWrite[] }> {
  const windows = batch.map((u) => {
    const hours = u.nameplate.diagnosis?.windowHours ?? o.windowHours;
    return { unitKey: u.unitKey, fromMs: u.lastSampleMs - hours * 3_600_000, toMs: u.lastSampleMs };
  });
  const keys = batch.map((u) => u.unitKey);
  const [samplesByUnit, lastHistory] = await Promise.all([
    getSampleWindowsByUnitKeys({ db: o.db, windows, maxSamples: o.maxSamples }),
    getLastHistoryTimesByUnitKeys({ db: o.db, unitKeys: keys }),
  ]);
  let samples = 0;
  const results: Array<{ unit: UnitDue; result: DiagnosisResult; fromMs: number; toMs: number; history: boolean }> = [];
  for (let i = 0; i < batch.length; i++) {
    const unit = batch[i] as UnitDue;
    const window = windows[i] as (typeof windows)[number];
    const cols = samplesByUnit.get(unit.unitKey) ?? new SampleColumns(1);
    samples += cols.length;
    const extraFindings = [];
    if (unit.limitsProblem !== undefined) {
      extraFindings.push(
        finding('limits-invalid', 'warning', `The unit's stored diagnosis limits are invalid (${unit.limitsProblem}); the defaults were used.`),
      );
    }
    if (cols.length >= o.maxSamples) {
      extraFindings.push(
        finding('window-capped', 'info', `The window held more than ${o.maxSamples.toLocaleString('en-US')} samples; the newest ${o.maxSamples.toLocaleString('en-US')} were diagnosed.`),
      );
    }
    const result = diagnoseSamples({ nameplate: unit.nameplate, samples: cols, extraFindings });
    const fromMs = cols.length > 0 && cols.length >= o.maxSamples ? (cols.ts[0] as number) : window.fromMs;
    const last = lastHistory.get(unit.unitKey);
    const history = last === undefined || o.nowMs - last >= o.historyEveryS * 1000 || unit.lastVerdict !== result.verdict;
    results.push({ unit, result, fromMs, toMs: window.toMs, history });
  }

  // A fresh trend for the units that get a history row, from their stored days plus this result.
  const trendKeys = results.filter((r) => r.history).map((r) => r.unit.unitKey);
  const historyByUnit = await getKeHistoryByUnitKeys({ db: o.db, unitKeys: trendKeys, fromMs: o.nowMs - TREND_DAYS * 86_400_000 });
  const writes: HealthWrite[] = results.map((r) => {
    const write: HealthWrite = {
      unitKey: r.unit.unitKey,
      diagnosedAtMs: o.nowMs,
      windowFromMs: r.fromMs,
      windowToMs: r.toMs,
      result: r.result,
      history: r.history,
    };
    if (!r.history) return write;
    const points = [...(historyByUnit.get(r.unit.unitKey) ?? [])];
    if (r.result.verdict !== 'insufficient-data' && r.result.keRatio !== null) points.push({ tsMs: o.nowMs, keRatio: r.result.keRatio });
    const threshold = r.result.details.limits.keAlarmRatio;
    return { ...write, trend: keTrend(points, { thresholdRatio: threshold }) };
  });
  await upsertUnitHealthBatch({ db: o.db, writes });
  o.live?.publish(
    results.map((r) => ({
      type: 'diagnosis' as const,
      siteId: r.unit.siteId,
      unitId: r.unit.unitId,
      verdict: r.result.verdict,
      ...(r.unit.lastVerdict === undefined ? {} : { previousVerdict: r.unit.lastVerdict }),
    })),
  );
  return { samples, writes };
}

/**
 * Units a batch so that the batches in flight hold at most {@link DEFAULT_ROWS_IN_FLIGHT} rows.
 * @example defaultBatchUnits(25_000, 4) // 2
 */
export function defaultBatchUnits(maxSamples: number, concurrency: number): number {
  return Math.max(1, Math.min(DEFAULT_BATCH_UNITS, Math.floor(DEFAULT_ROWS_IN_FLIGHT / (maxSamples * concurrency))));
}

/**
 * Diagnoses every unit that is due, once.
 * @example await runDiagnosisPass({ db }) // { units: 1000, samples: 2160000, ... }
 */
export async function runDiagnosisPass(options: DiagnosisPassOptions): Promise<DiagnosisPassResult> {
  const started = Date.now();
  const o = {
    db: options.db,
    windowHours: options.windowHours ?? DEFAULT_LIMITS.windowHours,
    maxSamples: options.maxSamples ?? DEFAULT_MAX_SAMPLES,
    batchUnits: options.batchUnits ?? defaultBatchUnits(options.maxSamples ?? DEFAULT_MAX_SAMPLES, options.concurrency ?? DEFAULT_CONCURRENCY),
    concurrency: options.concurrency ?? DEFAULT_CONCURRENCY,
    historyEveryS: options.historyEveryS ?? DEFAULT_HISTORY_EVERY_S,
    nowMs: options.nowMs ?? Date.now(),
    log: options.log,
    live: options.live,
  };
  if (!(o.windowHours > 0)) throw new RangeError(`windowHours must be above 0, got ${o.windowHours}`);
  if (!Number.isInteger(o.batchUnits) || o.batchUnits < 1) throw new RangeError(`batchUnits must be a whole number of at least 1, got ${o.batchUnits}`);
  if (!Number.isInteger(o.concurrency) || o.concurrency < 1) throw new RangeError(`concurrency must be a whole number of at least 1, got ${o.concurrency}`);
  const due = await getUnitsDueForDiagnosis({ db: o.db });
  const queue = chunks(due, o.batchUnits);
  const verdicts: Partial<Record<Verdict, number>> = {};
  let samples = 0;
  let historyRows = 0;
  const worker = async () => {
    for (let batch = queue.shift(); batch !== undefined; batch = queue.shift()) {
      const done = await diagnoseBatch(batch, o);
      samples += done.samples;
      for (const w of done.writes) {
        verdicts[w.result.verdict] = (verdicts[w.result.verdict] ?? 0) + 1;
        if (w.history) historyRows++;
      }
    }
  };
  await Promise.all(Array.from({ length: Math.min(o.concurrency, Math.max(1, queue.length)) }, worker));
  return { units: due.length, samples, historyRows, verdicts, elapsedMs: Date.now() - started };
}

/** Options of {@link startDiagnosisWorker}. */
export interface DiagnosisWorkerOptions {
  readonly db: Db;
  /** Seconds from the start of one pass to the start of the next. */
  readonly intervalS: number;
  /** Hours of samples per unit. */
  readonly windowHours: number;
  readonly log: Logger;
  readonly maxSamples?: number;
  readonly historyEveryS?: number;
  /** See {@link DiagnosisPassOptions.live}. */
  readonly live?: LivePublisher;
}

/**
 * Starts the loop; the first pass runs at once. Returns a stop function that
 * resolves when the pass in flight (if any) has finished. A failed pass is
 * logged and the loop goes on.
 */
export function startDiagnosisWorker(options: DiagnosisWorkerOptions): () => Promise<void> {
  if (!(options.intervalS > 0)) throw new RangeError(`intervalS must be above 0, got ${options.intervalS}`);
  if (!(options.windowHours > 0)) throw new RangeError(`windowHours must be above 0, got ${options.windowHours}`);
  return repeatEvery(
    (elapsedMs) => options.intervalS * 1000 - elapsedMs,
    async () => {
      try {
        const r = await runDiagnosisPass({
          db: options.db,
          windowHours: options.windowHours,
          maxSamples: options.maxSamples,
          historyEveryS: options.historyEveryS,
          log: options.log,
          live: options.live,
        });
        if (r.units > 0) options.log.info('diagnosis pass', { ...r });
        else options.log.debug('diagnosis pass: no unit due', { elapsedMs: r.elapsedMs });
      } catch (error) {
        options.log.error('diagnosis pass failed', { error });
      }
    },
  );
}
