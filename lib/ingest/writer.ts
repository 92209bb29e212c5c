/**
 * Commits one batch of decoded messages: samples, both rollups, quarantine
 * and unit status in one transaction.
 */
import { ensureMonthlyPartitions } from '@/db/partitions';
import type { QuarantineEntry } from './decode';
import {
  getStoredAround,
  insertQuarantineRows,
  writeNewSamples,
  lockUnitKeys,
  upsertRollupDeltas,
  upsertUnitLastSeen,
  upsertUnitPresence,
  type EnergyWindow,
  type PresenceUpdate,
  type QuarantineRowInput,
  type SampleRowRefs,
  type StoredAround,
  type UnitEntry,
  type UnitSeen,
} from './queries';
import { appendRollupRow, computeRollupDeltas, createRollupRows, type RollupDelta, type RollupRows } from './rollups';
import type { SampleBlock } from './sample-block';
import type { IngestDatabase, SqlRunner } from './sql';
import { pairKey, type UnitDirectory } from './unit-directory';

/** A message as the batch holds it, decoded at arrival. */
export interface DecodedMessage {
  topic: string;
  /** Site and unit from the topic, when it could be split. */
  siteId?: string;
  unitId?: string;
  kind: 'telemetry' | 'presence' | 'bad-topic';
  receivedAtMs: number;
  retained: boolean;
  /** Its valid samples, compactly. */
  samples: SampleBlock;
  quarantined: QuarantineEntry[];
  /** Presence state (presence messages); null when the retained presence was cleared. */
  presence?: 'online' | 'offline' | null;
  unknownFields: string[];
  /**
   * The payload as text, cut to a bounded size, for a whole-message
   * quarantine row; empty when the unit was known on arrival (not needed).
   */
  preview: string;
  payloadBytes: number;
  /** Why the topic could not be used (bad-topic messages). */
  topicProblem?: string;
}

/**
 * Runs the statements in order: issued together where the runner pipelines
 * them (one round trip; the first refusal is the one reported), else one
 * after another. Each function must issue all its statements at once, not
 * one after another's result: what comes after it is already sent.
 */
async function inOrder<T extends readonly (() => Promise<unknown>)[]>(
  tx: SqlRunner,
  statements: T,
): Promise<{ -readonly [K in keyof T]: Awaited<ReturnType<T[K]>> }> {
  type Results = { -readonly [K in keyof T]: Awaited<ReturnType<T[K]>> };
  if (tx.pipelines) return (await Promise.all(statements.map((s) => s()))) as Results;
  const results: unknown[] = [];
  for (const s of statements) results.push(await s());
  return results as Results;
}

/**
 * Sorts `refs` by unit, then time, and drops repeats of a (unit, time), as a
 * redelivery makes them: the first in arrival order is kept. `units` and
 * `times` give each ref's keys by its position in arrival order. Returns how
 * many were dropped.
 *
 * A batch holds tens of thousands of rows from a few hundred units, and one
 * unit's samples mostly arrive in time order: so the rows are first grouped
 * by unit (a counting sort, which keeps arrival order), and only a unit whose
 * rows are out of time order is sorted further.
 */
export function sortUniqueRefs(refs: number[], units: readonly number[], times: readonly number[]): number {
  const n = refs.length;
  const distinct = [...new Set(units)].sort((a, b) => a - b);
  const rank = new Map(distinct.map((u, k) => [u, k]));
  const start = new Int32Array(distinct.length + 1);
  const rankAt = new Int32Array(n);
  for (let i = 0; i < n; i++) start[(rankAt[i] = rank.get(units[i]!)!) + 1]!++;
  for (let k = 0; k < distinct.length; k++) start[k + 1]! += start[k]!;
  const order = new Uint32Array(n);
  const fill = start.slice(0, distinct.length);
  for (let i = 0; i < n; i++) order[fill[rankAt[i]!]!++] = i;
  for (let k = 0; k < distinct.length; k++) {
    const from = start[k]!;
    const to = start[k + 1]!;
    let sorted = true;
    for (let r = from + 1; r < to && sorted; r++) sorted = times[order[r - 1]!]! <= times[order[r]!]!;
    if (!sorted) order.subarray(from, to).sort((a, b) => times[a]! - times[b]! || a - b);
  }
  const arrived = refs.slice();
  let kept = 0;
  for (let r = 0; r < n; r++) {
    const o = order[r]!;
    // Same unit (same group) and same time as the row before: a repeat, arrived later.
    if (r > 0 && rankAt[o] === rankAt[order[r - 1]!] && times[o] === times[order[r - 1]!]) continue;
    refs[kept++] = arrived[o]!;
  }
  refs.length = kept;
  return n - kept;
}

/** Samples one message may hold (a 256 KiB payload holds far fewer). */
const MAX_SAMPLES_PER_MESSAGE = 65_536;

export interface BatchResult {
  inserted: number;
  duplicates: number;
  quarantined: number;
  presence: number;
  /** Unit ids with unknown fields in this batch, with those fields. */
  unknownFieldsByUnit: Map<string, Set<string>>;
  /** Newest sample time among the inserted, epoch ms (undefined when none). */
  newestTsMs?: number;
  /** Each unit with samples in the batch and its newest sample time, epoch ms (for the live feed: one entry a unit). */
  sampledUnits: Array<{ siteId: string; unitId: string; lastTsMs: number }>;
  /** Milliseconds spent in each step, for the debug log. */
  phases: Record<string, number>;
}

/**
 * A batch made ready for the database: units resolved, quarantine rows and
 * unit status gathered, rows sorted and de-duplicated. Made from the
 * messages alone, so it can be made while the batch before it is still in
 * the database.
 */
export interface PreparedBatch {
  messages: readonly DecodedMessage[];
  quarantine: QuarantineRowInput[];
  presenceByUnit: Map<number, PresenceUpdate>;
  seen: Map<number, UnitSeen>;
  unitByKey: Map<number, UnitEntry>;
  unknownFieldsByUnit: Map<string, Set<string>>;
  /** Rows to insert as message index × MAX_SAMPLES_PER_MESSAGE + sample index, by unit then time, one per (unit, time). */
  refs: number[];
  /** Unit key of each message (0 where none). */
  unitOfMessage: Int32Array;
  /** Units with samples in this batch (their locks are taken). */
  sampledUnits: Set<number>;
  /** Repeats of a (unit, time) within the batch. */
  duplicates: number;
  minTs: number;
  maxTs: number;
  phases: Record<string, number>;
}

/** Times the steps of a batch into `phases` (the debug log's `phases`). */
function phaseClock(phases: Record<string, number>) {
  let mark = performance.now();
  return (name: string) => {
    const t = performance.now();
    phases[name] = Math.round((t - mark) * 10) / 10;
    mark = t;
  };
}

/**
 * Writes `messages` in one transaction. Throws when the database refuses or
 * cannot be reached; nothing of the batch is then stored.
 */
export async function writeBatch({
  database,
  directory,
  messages,
  byInsert = false,
}: {
  database: IngestDatabase;
  directory: UnitDirectory;
  messages: readonly DecodedMessage[];
  /** Write samples by INSERT rather than COPY (a retry after a refusal: INSERT reports why). */
  byInsert?: boolean;
}): Promise<BatchResult> {
  return writePrepared({ database, batch: await prepareBatch({ directory, messages }), byInsert });
}

/** Makes `messages` ready for {@link writePrepared}; reads the database only for units not known yet. */
export async function prepareBatch({ directory, messages }: { directory: UnitDirectory; messages: readonly DecodedMessage[] }): Promise<PreparedBatch> {
  const phases: Record<string, number> = {};
  const phase = phaseClock(phases);
  const pairs: Array<{ siteId: string; unitId: string }> = [];
  for (const m of messages) if (m.kind !== 'bad-topic' && m.siteId && m.unitId) pairs.push({ siteId: m.siteId, unitId: m.unitId });
  const resolved = await directory.resolve(pairs);
  phase('resolve');

  const quarantine: QuarantineRowInput[] = [];
  const presenceByUnit = new Map<number, PresenceUpdate>();
  const seen = new Map<number, UnitSeen>();
  const unitByKey = new Map<number, UnitEntry>();
  const unknownFieldsByUnit = new Map<string, Set<string>>();
  /** Rows to insert as (message index, sample index), with each message's unit key. */
  const refs: number[] = [];
  /** Unit key and time of each of `refs`, in arrival order. */
  const refUnits: number[] = [];
  const refTimes: number[] = [];
  const unitOfMessage = new Int32Array(messages.length);
  /** Units with samples in this batch (their locks are taken). */
  const sampledUnits = new Set<number>();
  let duplicates = 0;
  let minTs = Infinity;
  let maxTs = -Infinity;

  const quarantineWhole = (m: DecodedMessage, reason: string) =>
    quarantine.push({
      receivedAtMs: m.receivedAtMs,
      topic: m.topic,
      siteId: m.siteId ?? null,
      unitId: m.unitId ?? null,
      sampleIndex: null,
      payload: m.preview || '(payload not kept: the unit was registered when the message arrived)',
      payloadBytes: m.payloadBytes,
      reason,
    });

  messages.forEach((m, mi) => {
    if (m.kind === 'bad-topic') {
      quarantineWhole(m, m.topicProblem ?? 'topic is not a millrace unit topic');
      return;
    }
    const resolution = resolved.get(pairKey(m.siteId!, m.unitId!));
    if (!resolution || !resolution.ok) {
      const count = m.kind === 'telemetry' ? m.samples.count + m.quarantined.length : 0;
      quarantineWhole(m, `${resolution?.reason ?? 'unit could not be resolved'}${count > 1 ? ` (${count} samples in this message)` : ''}`);
      return;
    }
    const unit = resolution.unit;
    unitByKey.set(unit.key, unit);
    unitOfMessage[mi] = unit.key;
    for (const q of m.quarantined) {
      quarantine.push({ receivedAtMs: m.receivedAtMs, topic: m.topic, siteId: m.siteId!, unitId: m.unitId!, ...q });
    }
    if (m.kind === 'presence') {
      if (m.presence) presenceByUnit.set(unit.key, { unitKey: unit.key, presence: m.presence, receivedAtMs: m.receivedAtMs, retained: m.retained });
      return;
    }
    if (m.unknownFields.length > 0) {
      let set = unknownFieldsByUnit.get(unit.id);
      if (!set) unknownFieldsByUnit.set(unit.id, (set = new Set()));
      for (const f of m.unknownFields) set.add(f);
    }
    let unitSeen = seen.get(unit.key);
    const block = m.samples;
    if (block.count > 0) sampledUnits.add(unit.key);
    for (let i = 0; i < block.count; i++) {
      const ts = block.ts[i]!;
      refs.push(mi * MAX_SAMPLES_PER_MESSAGE + i);
      refUnits.push(unit.key);
      refTimes.push(ts);
      if (ts < minTs) minTs = ts;
      if (ts > maxTs) maxTs = ts;
      if (!unitSeen) seen.set(unit.key, (unitSeen = { unitKey: unit.key, lastSampleTsMs: ts, lastReceivedAtMs: m.receivedAtMs }));
      if (ts > unitSeen.lastSampleTsMs) unitSeen.lastSampleTsMs = ts;
      if (m.receivedAtMs > unitSeen.lastReceivedAtMs) unitSeen.lastReceivedAtMs = m.receivedAtMs;
    }
  });

  // Index order: neighbouring rows land on the same index pages.
  duplicates += sortUniqueRefs(refs, refUnits, refTimes);
  phase('prepare');
  return {
    messages,
    quarantine,
    presenceByUnit,
    seen,
    unitByKey,
    unknownFieldsByUnit,
    refs,
    unitOfMessage,
    sampledUnits,
    duplicates,
    minTs,
    maxTs,
    phases,
  };
}

/** The message block, unit key and time of a row of a prepared batch (see `PreparedBatch.refs`). */
const refBlock = (batch: PreparedBatch, ref: number) => batch.messages[Math.floor(ref / MAX_SAMPLES_PER_MESSAGE)]!.samples;
const refUnit = (batch: PreparedBatch, ref: number) => batch.unitOfMessage[Math.floor(ref / MAX_SAMPLES_PER_MESSAGE)]!;
const refTs = (batch: PreparedBatch, ref: number) => refBlock(batch, ref).ts[ref % MAX_SAMPLES_PER_MESSAGE]!;

/**
 * Writes a prepared batch in one transaction. Throws when the database
 * refuses or cannot be reached; nothing of the batch is then stored.
 */
export async function writePrepared({
  database,
  batch,
  byInsert = false,
}: {
  database: IngestDatabase;
  batch: PreparedBatch;
  /** Write samples by INSERT rather than COPY (a retry after a refusal: INSERT reports why). */
  byInsert?: boolean;
}): Promise<BatchResult> {
  const { quarantine, presenceByUnit, seen, unitByKey, unknownFieldsByUnit, refs, sampledUnits, minTs, maxTs } = batch;
  const phases: Record<string, number> = { ...batch.phases };
  const phase = phaseClock(phases);
  if (refs.length > 0) await ensureMonthlyPartitions({ db: database.db(), fromMs: minTs, toMs: maxTs });
  phase('partitions');
  const windows = energyWindowsOf(batch);

  const result = await database.transaction(async (tx) => {
    // The lock and the read go out together (one round trip on PostgreSQL); the server takes the
    // lock before it runs the read, which therefore sees what another writer committed first.
    const [, stored] = await inOrder(tx, [
      () => (database.backend === 'postgres' ? lockUnitKeys({ tx, unitKeys: [...sampledUnits] }) : Promise.resolve()),
      () => getStoredAround({ tx, windows }),
    ] as const);
    phase('read');
    // What is already stored is a duplicate (a redelivery): only the rest is written.
    const fresh = refs.filter((ref) => !stored.get(refUnit(batch, ref))?.existing.has(refTs(batch, ref)));
    const { rows, rollupRows, newestTsMs } = freshRowsOf(batch, fresh);
    phase('columns');
    // The deltas are worked out before the samples go out: what they need is known.
    const { tenMinute, daily } = rollupDeltasOf(rows, rollupRows, stored);
    phase('deltas');
    await writeNewSamples({ tx, rows, byInsert });
    phase('samples');
    await inOrder(tx, [
      () => upsertRollupDeltas({ tx, table: 'telemetry_rollups_10m', deltas: tenMinute }),
      () => upsertRollupDeltas({ tx, table: 'telemetry_rollups_daily', deltas: daily }),
      () => insertQuarantineRows({ tx, rows: quarantine }),
      () => upsertUnitLastSeen({ tx, units: [...seen.values()] }),
      () => upsertUnitPresence({ tx, updates: [...presenceByUnit.values()] }),
    ]);
    phase('rollups');
    return { inserted: fresh.length, newestTsMs };
  });
  phase('commit');

  const sampled: BatchResult['sampledUnits'] = [];
  for (const u of seen.values()) {
    const unit = unitByKey.get(u.unitKey);
    if (unit) sampled.push({ siteId: unit.siteId, unitId: unit.id, lastTsMs: u.lastSampleTsMs });
  }

  return {
    inserted: result.inserted,
    sampledUnits: sampled,
    duplicates: batch.duplicates + (refs.length - result.inserted),
    quarantined: quarantine.length,
    presence: presenceByUnit.size,
    unknownFieldsByUnit,
    newestTsMs: result.newestTsMs,
    phases,
  };
}

/** One window per unit over all its new samples (refs are sorted by unit, then time). */
function energyWindowsOf(batch: PreparedBatch): EnergyWindow[] {
  const { refs } = batch;
  const windows: EnergyWindow[] = [];
  for (let r = 0; r < refs.length; ) {
    const unitKey = refUnit(batch, refs[r]!);
    const fromMs = refTs(batch, refs[r]!);
    while (r + 1 < refs.length && refUnit(batch, refs[r + 1]!) === unitKey) r++;
    windows.push({ unitKey, fromMs, toMs: refTs(batch, refs[r]!) });
    r++;
  }
  return windows;
}

/** The rows to write (`fresh` of the batch's refs) for the samples table and for the rollups, and the newest time among them. */
function freshRowsOf(batch: PreparedBatch, fresh: readonly number[]): { rows: SampleRowRefs; rollupRows: RollupRows; newestTsMs?: number } {
  const rows: SampleRowRefs = {
    count: fresh.length,
    unitKeys: new Int32Array(fresh.length),
    blocks: new Array<SampleBlock>(fresh.length),
    index: new Int32Array(fresh.length),
  };
  // Rows in `fresh` order: by unit, then time, as the rollups want them.
  const rollupRows = createRollupRows(fresh.length);
  let newestTsMs: number | undefined;
  fresh.forEach((ref, r) => {
    const block = refBlock(batch, ref);
    const i = ref % MAX_SAMPLES_PER_MESSAGE;
    const unitKey = refUnit(batch, ref);
    const ts = block.ts[i]!;
    rows.unitKeys[r] = unitKey;
    rows.blocks[r] = block;
    rows.index[r] = i;
    appendRollupRow(rollupRows, block, i, batch.unitByKey.get(unitKey)!.kind);
    if (newestTsMs === undefined || ts > newestTsMs) newestTsMs = ts;
  });
  return { rows, rollupRows, newestTsMs };
}

/** The ten-minute and daily rollup deltas of the rows to write, unit by unit, against what is stored around them. */
function rollupDeltasOf(
  rows: SampleRowRefs,
  rollupRows: RollupRows,
  stored: ReadonlyMap<number, StoredAround>,
): { tenMinute: RollupDelta[]; daily: RollupDelta[] } {
  const tenMinute: RollupDelta[] = [];
  const daily: RollupDelta[] = [];
  for (let from = 0; from < rows.count; ) {
    const unitKey = rows.unitKeys[from]!;
    let to = from + 1;
    while (to < rows.count && rows.unitKeys[to] === unitKey) to++;
    const deltas = computeRollupDeltas({ unitKey, rows: rollupRows, from, to, stored: stored.get(unitKey)?.energy ?? [] });
    for (const d of deltas.tenMinute) tenMinute.push(d);
    for (const d of deltas.daily) daily.push(d);
    from = to;
  }
  return { tenMinute, daily };
}
