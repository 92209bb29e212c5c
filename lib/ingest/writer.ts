/**
 * Commits one batch of decoded messages: samples, both rollups, quarantine
 * and unit status in one transaction.
 */
import { ensureMonthlyPartitions } from '../../db/partitions';
import type { TelemetrySample } from '../contract/telemetry';
import type { QuarantineEntry } from './decode';
import {
  getEnergyNeighbours,
  insertQuarantineRows,
  insertSampleRows,
  lockUnitKeys,
  upsertRollupDeltas,
  upsertUnitLastSeen,
  upsertUnitPresence,
  type EnergyWindow,
  type PresenceUpdate,
  type QuarantineRowInput,
  type SampleRow,
  type UnitEntry,
  type UnitSeen,
} from './queries';
import { computeRollupDeltas, rollupSampleOf, type RollupDelta, type RollupSample } from './rollups';
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
  samples: TelemetrySample[];
  quarantined: QuarantineEntry[];
  /** Presence state (presence messages); null when the retained presence was cleared. */
  presence?: 'online' | 'offline' | null;
  unknownFields: string[];
  /** The payload as text, cut to a bounded size, for a whole-message quarantine row. */
  preview: string;
  payloadBytes: number;
  /** Why the topic could not be used (bad-topic messages). */
  topicProblem?: string;
}

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

  const rows: SampleRow[] = [];
  const quarantine: QuarantineRowInput[] = [];
  const presenceByUnit = new Map<number, PresenceUpdate>();
  const seen = new Map<number, UnitSeen>();
  const unitByKey = new Map<number, UnitEntry>();
  const unknownFieldsByUnit = new Map<string, Set<string>>();
  const keyed = new Set<string>();
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
      payload: m.preview,
      payloadBytes: m.payloadBytes,
      reason,
    });

  for (const m of messages) {
    if (m.kind === 'bad-topic') {
      quarantineWhole(m, m.topicProblem ?? 'topic is not a millrace unit topic');
      continue;
    }
    const resolution = resolved.get(pairKey(m.siteId!, m.unitId!));
    if (!resolution || !resolution.ok) {
      const count = m.kind === 'telemetry' ? m.samples.length + m.quarantined.length : 0;
      quarantineWhole(m, `${resolution?.reason ?? 'unit could not be resolved'}${count > 1 ? ` (${count} samples in this message)` : ''}`);
      continue;
    }
    const unit = resolution.unit;
    unitByKey.set(unit.key, unit);
    for (const q of m.quarantined) {
      quarantine.push({ receivedAtMs: m.receivedAtMs, topic: m.topic, siteId: m.siteId!, unitId: m.unitId!, ...q });
    }
    if (m.kind === 'presence') {
      if (m.presence) presenceByUnit.set(unit.key, { unitKey: unit.key, presence: m.presence, receivedAtMs: m.receivedAtMs, retained: m.retained });
      continue;
    }
    if (m.unknownFields.length > 0) {
      let set = unknownFieldsByUnit.get(unit.id);
      if (!set) unknownFieldsByUnit.set(unit.id, (set = new Set()));
      for (const f of m.unknownFields) set.add(f);
    }
    let unitSeen = seen.get(unit.key);
    for (const sample of m.samples) {
      const key = `${unit.key}:${sample.ts}`;
      if (keyed.has(key)) {
        duplicates++;
        continue;
      }
      keyed.add(key);
      rows.push({ unitKey: unit.key, sample });
      if (sample.ts < minTs) minTs = sample.ts;
      if (sample.ts > maxTs) maxTs = sample.ts;
      if (!unitSeen) seen.set(unit.key, (unitSeen = { unitKey: unit.key, lastSampleTsMs: sample.ts, lastReceivedAtMs: m.receivedAtMs }));
      if (sample.ts > unitSeen.lastSampleTsMs) unitSeen.lastSampleTsMs = sample.ts;
      if (m.receivedAtMs > unitSeen.lastReceivedAtMs) unitSeen.lastReceivedAtMs = m.receivedAtMs;
    }
  }

  // Index order: neighbouring rows land on the same index pages.
  rows.sort((a, b) => a.unitKey - b.unitKey || a.sample.ts - b.sample.ts);
  if (rows.length > 0) await ensureMonthlyPartitions({ db: database.db(), fromMs: minTs, toMs: maxTs });

  const windows: EnergyWindow[] = [];
  for (let i = 0; i < rows.length; ) {
    const unitKey = rows[i]!.unitKey;
    let lo = Infinity;
    let hi = -Infinity;
    for (; i < rows.length && rows[i]!.unitKey === unitKey; i++) {
      const s = rows[i]!.sample;
      if (s.kw !== undefined) {
        if (s.ts < lo) lo = s.ts;
        if (s.ts > hi) hi = s.ts;
      }
    }
    if (lo <= hi) windows.push({ unitKey, fromMs: lo, toMs: hi });
  }

  const result = await database.transaction(async (tx) => {
    if (database.backend === 'postgres') await lockUnitKeys({ tx, unitKeys: [...new Set(rows.map((r) => r.unitKey))] });
    const neighbours = await getEnergyNeighbours({ tx, windows });
    const inserted = await insertSampleRows({ tx, rows });

    const byKey = new Map<string, SampleRow>();
    for (const r of rows) byKey.set(`${r.unitKey}:${r.sample.ts}`, r);
    const insertedByUnit = new Map<number, RollupSample[]>();
    let newestTsMs: number | undefined;
    for (const { unitKey, ts } of inserted) {
      const row = byKey.get(`${unitKey}:${ts}`);
      if (!row) throw new Error(`the database returned a row (${unitKey}, ${ts}) this batch did not send`);
      let list = insertedByUnit.get(unitKey);
      if (!list) insertedByUnit.set(unitKey, (list = []));
      list.push(rollupSampleOf(row.sample, unitByKey.get(unitKey)!.kind));
      if (newestTsMs === undefined || ts > newestTsMs) newestTsMs = ts;
    }
    const tenMinute: RollupDelta[] = [];
    const daily: RollupDelta[] = [];
    for (const [unitKey, list] of insertedByUnit) {
      const deltas = computeRollupDeltas({ unitKey, inserted: list, stored: neighbours.get(unitKey) ?? [] });
      tenMinute.push(...deltas.tenMinute);
      daily.push(...deltas.daily);
    }
    await upsertRollupDeltas({ tx, table: 'telemetry_rollups_10m', deltas: tenMinute });
    await upsertRollupDeltas({ tx, table: 'telemetry_rollups_daily', deltas: daily });
    await insertQuarantineRows({ tx, rows: quarantine });
    await upsertUnitLastSeen({ tx, units: [...seen.values()] });
    await upsertUnitPresence({ tx, updates: [...presenceByUnit.values()] });
    return { inserted: inserted.length, newestTsMs };
  });

  return {
    inserted: result.inserted,
    duplicates: duplicates + (rows.length - result.inserted),
    quarantined: quarantine.length,
    presence: presenceByUnit.size,
    unknownFieldsByUnit,
    newestTsMs: result.newestTsMs,
  };
}
