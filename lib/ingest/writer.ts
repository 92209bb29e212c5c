/**
 * Commits one batch of decoded messages: samples, both rollups, quarantine
 * and unit status in one transaction.
 */
import { ensureMonthlyPartitions } from '../../db/partitions';
import type { QuarantineEntry } from './decode';
import {
  getStoredAround,
  insertQuarantineRows,
  writeNewSampleColumns,
  lockUnitKeys,
  upsertRollupDeltas,
  upsertUnitLastSeen,
  upsertUnitPresence,
  type EnergyWindow,
  type PresenceUpdate,
  type QuarantineRowInput,
  type SampleColumns,
  type UnitEntry,
  type UnitSeen,
} from './queries';
import { computeRollupDeltas, rollupSampleFromBlock, type RollupDelta, type RollupSample } from './rollups';
import { BLOCK_WIDTH, type SampleBlock } from './sample-block';
import type { IngestDatabase } from './sql';
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
}

/**
 * Writes `messages` in one transaction. Throws when the database refuses or
 * cannot be reached; nothing of the batch is then stored.
 */
export async function writeBatch({
  database,
  directory,
  messages,
}: {
  database: IngestDatabase;
  directory: UnitDirectory;
  messages: readonly DecodedMessage[];
}): Promise<BatchResult> {
  const pairs: Array<{ siteId: string; unitId: string }> = [];
  for (const m of messages) if (m.kind !== 'bad-topic' && m.siteId && m.unitId) pairs.push({ siteId: m.siteId, unitId: m.unitId });
  const resolved = await directory.resolve(pairs);

  const quarantine: QuarantineRowInput[] = [];
  const presenceByUnit = new Map<number, PresenceUpdate>();
  const seen = new Map<number, UnitSeen>();
  const unitByKey = new Map<number, UnitEntry>();
  const unknownFieldsByUnit = new Map<string, Set<string>>();
  /** Rows to insert as (message index, sample index), with each message's unit key. */
  const refs: number[] = [];
  const unitOfMessage = new Int32Array(messages.length);
  const taken = new Map<number, Set<number>>();
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
    let times = taken.get(unit.key);
    if (!times) taken.set(unit.key, (times = new Set()));
    const block = m.samples;
    for (let i = 0; i < block.count; i++) {
      const ts = block.ts[i]!;
      if (times.has(ts)) {
        duplicates++;
        continue;
      }
      times.add(ts);
      refs.push(mi * MAX_SAMPLES_PER_MESSAGE + i);
      if (ts < minTs) minTs = ts;
      if (ts > maxTs) maxTs = ts;
      if (!unitSeen) seen.set(unit.key, (unitSeen = { unitKey: unit.key, lastSampleTsMs: ts, lastReceivedAtMs: m.receivedAtMs }));
      if (ts > unitSeen.lastSampleTsMs) unitSeen.lastSampleTsMs = ts;
      if (m.receivedAtMs > unitSeen.lastReceivedAtMs) unitSeen.lastReceivedAtMs = m.receivedAtMs;
    }
  });

  const blockOf = (ref: number) => messages[Math.floor(ref / MAX_SAMPLES_PER_MESSAGE)]!.samples;
  const unitOf = (ref: number) => unitOfMessage[Math.floor(ref / MAX_SAMPLES_PER_MESSAGE)]!;
  const tsOf = (ref: number) => blockOf(ref).ts[ref % MAX_SAMPLES_PER_MESSAGE]!;
  // Index order: neighbouring rows land on the same index pages.
  refs.sort((a, b) => unitOf(a) - unitOf(b) || tsOf(a) - tsOf(b));
  if (refs.length > 0) await ensureMonthlyPartitions({ db: database.db(), fromMs: minTs, toMs: maxTs });

  // One window per unit over all its new samples (refs are sorted by unit, then time).
  const windows: EnergyWindow[] = [];
  for (let r = 0; r < refs.length; ) {
    const unitKey = unitOf(refs[r]!);
    const fromMs = tsOf(refs[r]!);
    while (r + 1 < refs.length && unitOf(refs[r + 1]!) === unitKey) r++;
    windows.push({ unitKey, fromMs, toMs: tsOf(refs[r]!) });
    r++;
  }

  const result = await database.transaction(async (tx) => {
    if (database.backend === 'postgres') await lockUnitKeys({ tx, unitKeys: [...taken.keys()] });
    const stored = await getStoredAround({ tx, windows });
    // What is already stored is a duplicate (a redelivery): only the rest is written.
    const fresh = refs.filter((ref) => !stored.get(unitOf(ref))?.existing.has(tsOf(ref)));
    const columns: SampleColumns = { unitKeys: new Array(fresh.length), ts: new Array(fresh.length), values: [] };
    for (let f = 0; f < BLOCK_WIDTH; f++) columns.values.push(new Array<number | null>(fresh.length));
    const insertedByUnit = new Map<number, RollupSample[]>();
    let newestTsMs: number | undefined;
    fresh.forEach((ref, r) => {
      const block = blockOf(ref);
      const i = ref % MAX_SAMPLES_PER_MESSAGE;
      const unitKey = unitOf(ref);
      const ts = block.ts[i]!;
      columns.unitKeys[r] = unitKey;
      columns.ts[r] = ts;
      const row = i * BLOCK_WIDTH;
      for (let f = 0; f < BLOCK_WIDTH; f++) {
        const v = block.values[row + f]!;
        columns.values[f]![r] = Number.isNaN(v) ? null : v;
      }
      let list = insertedByUnit.get(unitKey);
      if (!list) insertedByUnit.set(unitKey, (list = []));
      list.push(rollupSampleFromBlock(block, i, unitByKey.get(unitKey)!.kind));
      if (newestTsMs === undefined || ts > newestTsMs) newestTsMs = ts;
    });
    await writeNewSampleColumns({ tx, columns });

    const tenMinute: RollupDelta[] = [];
    const daily: RollupDelta[] = [];
    for (const [unitKey, list] of insertedByUnit) {
      const deltas = computeRollupDeltas({ unitKey, inserted: list, stored: stored.get(unitKey)?.energy ?? [] });
      tenMinute.push(...deltas.tenMinute);
      daily.push(...deltas.daily);
    }
    await upsertRollupDeltas({ tx, table: 'telemetry_rollups_10m', deltas: tenMinute });
    await upsertRollupDeltas({ tx, table: 'telemetry_rollups_daily', deltas: daily });
    await insertQuarantineRows({ tx, rows: quarantine });
    await upsertUnitLastSeen({ tx, units: [...seen.values()] });
    await upsertUnitPresence({ tx, updates: [...presenceByUnit.values()] });
    return { inserted: fresh.length, newestTsMs };
  });

  return {
    inserted: result.inserted,
    duplicates: duplicates + (refs.length - result.inserted),
    quarantined: quarantine.length,
    presence: presenceByUnit.size,
    unknownFieldsByUnit,
    newestTsMs: result.newestTsMs,
  };
}
