/**
 * The statements of the ingest path. Every write takes whole columns as
 * array parameters and `unnest`s them: one statement per table per batch,
 * whatever the batch size, with no limit from the 65,534 parameters of a
 * statement, on postgres-js and PGlite alike. Times travel as epoch
 * milliseconds (float8) and come back the same way.
 */
import type { TelemetrySample } from '@/lib/contract/telemetry';
import { VALUE_FIELDS, columnOfField, type ValueField } from '@/lib/contract/telemetry';
import type { EnergyPoint, RollupDelta, Stat } from './rollups';
import { BLOCK_WIDTH, sampleBlockOf, type SampleBlock } from './sample-block';
import type { SqlRunner } from './sql';


/** Value fields and their columns, in block order. */
const SAMPLE_COLUMNS: ReadonlyArray<readonly [ValueField, string]> = VALUE_FIELDS.map((f) => [f, columnOfField(f)]);

const ms = (param: string) => `to_timestamp(${param} / 1000.0)`;
const epochMs = (column: string) => `(extract(epoch from ${column}) * 1000)::float8`;

const INSERT_SAMPLES = `
insert into telemetry_samples (unit_key, ts, ${SAMPLE_COLUMNS.map(([, c]) => c).join(', ')})
select k, ${ms('t')}, ${SAMPLE_COLUMNS.map(([, c]) => c).join(', ')}
from unnest($1::int4[], $2::float8[], ${SAMPLE_COLUMNS.map((_, i) => `$${i + 3}::float4[]`).join(', ')})
  as u(k, t, ${SAMPLE_COLUMNS.map(([, c]) => c).join(', ')})
on conflict do nothing
returning unit_key, ${epochMs('ts')} as t`;

/** A sample bound for one unit. */
export interface SampleRow {
  unitKey: number;
  sample: TelemetrySample;
}

/**
 * Rows as whole columns, the array parameters of the insert statement: unit
 * keys, times (epoch ms), then one array per value field (null where absent).
 * Not the diagnosis's SampleColumns store (one unit's samples in typed arrays).
 */
export interface SampleInsertColumns {
  unitKeys: number[];
  ts: number[];
  values: Array<Array<number | null>>;
}

/**
 * Inserts the rows, ignoring any (unit, ts) already stored; returns the keys
 * of the rows actually inserted.
 */
export async function insertSampleColumns({ tx, columns }: { tx: SqlRunner; columns: SampleInsertColumns }): Promise<Array<{ unitKey: number; ts: number }>> {
  if (columns.unitKeys.length === 0) return [];
  const inserted = await tx.query<{ unit_key: number; t: number }>(INSERT_SAMPLES, [columns.unitKeys, columns.ts, ...columns.values]);
  return inserted.map((r) => ({ unitKey: Number(r.unit_key), ts: Number(r.t) }));
}

/** {@link insertSampleColumns} for rows of sample objects (tools, tests, benchmarks). */
export async function insertSampleRows({ tx, rows }: { tx: SqlRunner; rows: readonly SampleRow[] }): Promise<Array<{ unitKey: number; ts: number }>> {
  const block = sampleBlockOf(rows.map((r) => r.sample));
  const refs: SampleRowRefs = {
    count: rows.length,
    unitKeys: Int32Array.from(rows, (r) => r.unitKey),
    blocks: new Array<SampleBlock>(rows.length).fill(block),
    index: Int32Array.from(rows, (_, i) => i),
  };
  return insertSampleColumns({ tx, columns: columnsOfRefs(refs) });
}

/** Advisory lock space of the ingest transactions (any fixed number unique to millrace). */
const UNIT_LOCK_SPACE = 7271502;
/** Units share this many locks; a transaction never holds more. */
const UNIT_LOCK_STRIPES = 1024;

/**
 * Serialises transactions that write the same units (several ingesters, or
 * overlapping batches), so that each reads the neighbours the other committed.
 * Locks are taken in one order, so two such transactions never deadlock.
 */
export async function lockUnitKeys({ tx, unitKeys }: { tx: SqlRunner; unitKeys: readonly number[] }): Promise<void> {
  if (unitKeys.length === 0) return;
  await tx.query(
    `select count(pg_advisory_xact_lock(${UNIT_LOCK_SPACE}, s))::int as n
     from (select distinct (k % ${UNIT_LOCK_STRIPES}) as s from unnest($1::int4[]) as u(k) order by 1) as o`,
    [unitKeys],
  );
}

/** One unit's window of new samples, epoch ms. */
export interface EnergyWindow {
  unitKey: number;
  fromMs: number;
  toMs: number;
}

/** What is stored of one unit in and around a window. */
export interface StoredAround {
  /** Stored samples with `kw`: the last within 10 minutes before the window, all inside, the first within 10 minutes after. */
  energy: EnergyPoint[];
  /** Times of every sample stored inside the window (with `kw` or not). */
  existing: Set<number>;
}

/**
 * Reads, for each window, the stored samples that the new ones may meet:
 * those inside it (the new ones already stored are duplicates) and the
 * neighbours with `kw` that the energy intervals at its edges start or end on.
 */
export async function getStoredAround({
  tx,
  windows,
}: {
  tx: SqlRunner;
  windows: readonly EnergyWindow[];
}): Promise<Map<number, StoredAround>> {
  const out = new Map<number, StoredAround>();
  if (windows.length === 0) return out;
  const rows = await tx.query<{ k: number; t: number; kw: number | null; inside: boolean }>(
    `select w.k, ${epochMs('s.ts')} as t, s.kw::float8 as kw, s.inside
     from unnest($1::int4[], $2::float8[], $3::float8[]) as w(k, lo, hi)
     cross join lateral (
       (select p.ts, p.kw, false as inside from telemetry_samples p
         where p.unit_key = w.k and p.kw is not null
           and p.ts < ${ms('w.lo')} and p.ts >= ${ms('(w.lo - 600000)')}
         order by p.ts desc limit 1)
       union all
       (select p.ts, p.kw, true as inside from telemetry_samples p
         where p.unit_key = w.k and p.ts >= ${ms('w.lo')} and p.ts <= ${ms('w.hi')})
       union all
       (select p.ts, p.kw, false as inside from telemetry_samples p
         where p.unit_key = w.k and p.kw is not null
           and p.ts > ${ms('w.hi')} and p.ts <= ${ms('(w.hi + 600000)')}
         order by p.ts asc limit 1)
     ) as s`,
    [windows.map((w) => w.unitKey), windows.map((w) => w.fromMs), windows.map((w) => w.toMs)],
  );
  for (const r of rows) {
    const key = Number(r.k);
    let entry = out.get(key);
    if (!entry) out.set(key, (entry = { energy: [], existing: new Set() }));
    const ts = Number(r.t);
    if (r.inside) entry.existing.add(ts);
    if (r.kw !== null) entry.energy.push({ ts, kw: Number(r.kw) });
  }
  return out;
}

const COPY_SAMPLES = `copy telemetry_samples (unit_key, ts, ${SAMPLE_COLUMNS.map(([, c]) => c).join(', ')}) from stdin with (format binary)`;

const INSERT_NEW_SAMPLES = INSERT_SAMPLES.replace(/\nreturning .*$/s, '');

/**
 * New rows by reference into the batch's sample blocks: row r is sample
 * `index[r]` of `blocks[r]`, for unit `unitKeys[r]`.
 */
export interface SampleRowRefs {
  count: number;
  unitKeys: Int32Array;
  blocks: SampleBlock[];
  index: Int32Array;
}

/**
 * Writes rows known not to be stored yet (the caller holds their units'
 * locks and has read what exists): binary COPY on PostgreSQL, an unnest
 * insert on PGlite or when `byInsert` (a retry, for the database's own words
 * on what it refused). Throws when a row turns out to exist after all.
 */
export async function writeNewSamples({ tx, rows, byInsert = false }: { tx: SqlRunner; rows: SampleRowRefs; byInsert?: boolean }): Promise<void> {
  const n = rows.count;
  if (n === 0) return;
  if (tx.copyIn && !byInsert) {
    await tx.copyIn(COPY_SAMPLES, copyBinary(rows));
    return;
  }
  const columns = columnsOfRefs(rows);
  const count = tx.command ? await tx.command(INSERT_NEW_SAMPLES, [columns.unitKeys, columns.ts, ...columns.values]) : n;
  if (count !== n) {
    throw Object.assign(new Error(`${n - count} of ${n} rows were stored meanwhile by another writer`), { code: '40001' });
  }
}

/** The rows as whole columns, in block order (null where a value is absent). */
function columnsOfRefs(rows: SampleRowRefs): SampleInsertColumns {
  const n = rows.count;
  const columns: SampleInsertColumns = { unitKeys: new Array(n), ts: new Array(n), values: [] };
  for (let f = 0; f < BLOCK_WIDTH; f++) columns.values.push(new Array<number | null>(n));
  for (let r = 0; r < n; r++) {
    const block = rows.blocks[r]!;
    const i = rows.index[r]!;
    columns.unitKeys[r] = rows.unitKeys[r]!;
    columns.ts[r] = block.ts[i]!;
    for (let f = 0; f < BLOCK_WIDTH; f++) {
      const v = block.values[i * BLOCK_WIDTH + f]!;
      columns.values[f]![r] = Number.isNaN(v) ? null : v;
    }
  }
  return columns;
}

/** Milliseconds from 1970 to PostgreSQL's epoch, 2000-01-01 UTC. */
const PG_EPOCH_MS = Date.UTC(2000, 0, 1);
const TWO_32 = 2 ** 32;
/** Bytes of one row: field count, then unit key (int4), ts (int8), each value (float4), each with its length. */
const ROW_BYTES = 2 + (4 + 4) + (4 + 8) + BLOCK_WIDTH * (4 + 4);
const ROWS_PER_CHUNK = 2048;
const COPY_SIGNATURE = Buffer.from('PGCOPY\n\xff\r\n\0', 'latin1');

/**
 * The rows in PostgreSQL's binary COPY format, in chunks of
 * {@link ROWS_PER_CHUNK} rows. Values go as float4, as the `real` columns
 * hold them (Math.fround, which the rollups use too); times as microseconds
 * since 2000 (the table keeps whole milliseconds); an absent value as NULL.
 * See the PostgreSQL manual, COPY, "Binary Format".
 */
export function* copyBinary(rows: SampleRowRefs): Generator<Uint8Array> {
  const header = Buffer.alloc(COPY_SIGNATURE.length + 8);
  COPY_SIGNATURE.copy(header, 0); // then flags (0) and header extension length (0)
  yield header;
  const fields = 2 + BLOCK_WIDTH;
  for (let start = 0; start < rows.count; start += ROWS_PER_CHUNK) {
    const end = Math.min(rows.count, start + ROWS_PER_CHUNK);
    const last = end === rows.count;
    const buf = Buffer.allocUnsafe((end - start) * ROW_BYTES + (last ? 2 : 0));
    const view = new DataView(buf.buffer, buf.byteOffset, buf.byteLength);
    let o = 0;
    for (let r = start; r < end; r++) {
      const block = rows.blocks[r]!;
      const i = rows.index[r]!;
      view.setInt16(o, fields);
      view.setInt32(o + 2, 4);
      view.setInt32(o + 6, rows.unitKeys[r]!);
      view.setInt32(o + 10, 8);
      const us = (block.ts[i]! - PG_EPOCH_MS) * 1000;
      const high = Math.floor(us / TWO_32);
      view.setInt32(o + 14, high);
      view.setUint32(o + 18, us - high * TWO_32);
      o += 22;
      const row = i * BLOCK_WIDTH;
      for (let f = 0; f < BLOCK_WIDTH; f++) {
        const v = block.values[row + f]!;
        if (Number.isNaN(v)) {
          view.setInt32(o, -1);
          o += 4;
        } else {
          view.setInt32(o, 4);
          view.setFloat32(o + 4, v);
          o += 8;
        }
      }
    }
    if (last) {
      view.setInt16(o, -1);
      o += 2;
    }
    yield buf.subarray(0, o);
  }
  if (rows.count === 0) yield Buffer.from([0xff, 0xff]);
}

const STATS = ['rpm', 'vll', 'amps', 'kw', 'statorC', 'resource'] as const;
const STAT_COLUMN: Record<(typeof STATS)[number], string> = {
  rpm: 'rpm',
  vll: 'vll',
  amps: 'amps',
  kw: 'kw',
  statorC: 'stator_c',
  resource: 'resource',
};
/** Stats whose count is the sample count (the field is required). */
const COUNTED_BY_SAMPLES = new Set(['rpm', 'vll']);

function rollupUpsert(table: string): string {
  const cols: string[] = ['unit_key', 'bucket_start', 'samples', 'first_ts', 'last_ts', 'covered_s', 'kwh'];
  const types: string[] = ['int4', 'float8', 'int4', 'float8', 'float8', 'float8', 'float8'];
  const sets: string[] = [
    'samples = r.samples + excluded.samples',
    'first_ts = least(r.first_ts, excluded.first_ts)',
    'last_ts = greatest(r.last_ts, excluded.last_ts)',
    'covered_s = r.covered_s + excluded.covered_s',
    'kwh = r.kwh + excluded.kwh',
  ];
  for (const stat of STATS) {
    const c = STAT_COLUMN[stat];
    cols.push(`${c}_min`, `${c}_max`, `${c}_sum`);
    types.push('float4', 'float4', 'float8');
    sets.push(
      `${c}_min = least(r.${c}_min, excluded.${c}_min)`,
      `${c}_max = greatest(r.${c}_max, excluded.${c}_max)`,
      `${c}_sum = coalesce(r.${c}_sum + excluded.${c}_sum, r.${c}_sum, excluded.${c}_sum)`,
    );
    if (!COUNTED_BY_SAMPLES.has(stat)) {
      cols.push(`${c}_count`);
      types.push('int4');
      sets.push(`${c}_count = r.${c}_count + excluded.${c}_count`);
    }
  }
  const isTime = new Set(['bucket_start', 'first_ts', 'last_ts']);
  const select = cols.map((c) => (isTime.has(c) ? ms(`u.${c}`) : `u.${c}`)).join(', ');
  return `insert into ${table} as r (${cols.join(', ')})
select ${select}
from unnest(${types.map((t, i) => `$${i + 1}::${t}[]`).join(', ')}) as u(${cols.join(', ')})
on conflict (unit_key, bucket_start) do update set ${sets.join(', ')}`;
}

const UPSERT_ROLLUPS = {
  telemetry_rollups_10m: rollupUpsert('telemetry_rollups_10m'),
  telemetry_rollups_daily: rollupUpsert('telemetry_rollups_daily'),
};

/** Adds the deltas to a rollup table (at most one delta per unit and bucket). */
export async function upsertRollupDeltas({
  tx,
  table,
  deltas,
}: {
  tx: SqlRunner;
  table: keyof typeof UPSERT_ROLLUPS;
  deltas: readonly RollupDelta[];
}): Promise<void> {
  if (deltas.length === 0) return;
  const params: unknown[][] = [[], [], [], [], [], [], []];
  for (const stat of STATS) {
    params.push([], [], []);
    if (!COUNTED_BY_SAMPLES.has(stat)) params.push([]);
  }
  for (const d of deltas) {
    let p = 0;
    params[p++]!.push(d.unitKey);
    params[p++]!.push(d.bucketStartMs);
    params[p++]!.push(d.samples);
    params[p++]!.push(d.firstTsMs);
    params[p++]!.push(d.lastTsMs);
    params[p++]!.push(d.coveredS);
    params[p++]!.push(d.kwh);
    for (const stat of STATS) {
      const s: Stat = d[stat];
      params[p++]!.push(s.min ?? null);
      params[p++]!.push(s.max ?? null);
      params[p++]!.push(s.count > 0 ? s.sum : null);
      if (!COUNTED_BY_SAMPLES.has(stat)) params[p++]!.push(s.count);
    }
  }
  await tx.query(UPSERT_ROLLUPS[table], params);
}

/** One row for the quarantine table. */
export interface QuarantineRowInput {
  receivedAtMs: number;
  topic: string;
  siteId: string | null;
  unitId: string | null;
  sampleIndex: number | null;
  payload: string;
  payloadBytes: number;
  reason: string;
}

/** Stores quarantine rows. */
export async function insertQuarantineRows({ tx, rows }: { tx: SqlRunner; rows: readonly QuarantineRowInput[] }): Promise<void> {
  if (rows.length === 0) return;
  await tx.query(
    `insert into quarantine (received_at, topic, site_id, unit_id, sample_index, payload, payload_bytes, reason)
     select ${ms('r')}, topic, site, unit, idx, payload, bytes, reason
     from unnest($1::float8[], $2::text[], $3::text[], $4::text[], $5::int4[], $6::text[], $7::int4[], $8::text[])
       as q(r, topic, site, unit, idx, payload, bytes, reason)`,
    [
      rows.map((r) => r.receivedAtMs),
      rows.map((r) => r.topic),
      rows.map((r) => r.siteId),
      rows.map((r) => r.unitId),
      rows.map((r) => r.sampleIndex),
      rows.map((r) => r.payload),
      rows.map((r) => r.payloadBytes),
      rows.map((r) => r.reason),
    ],
  );
}

/** Newest sample time and receipt time of one unit in a batch. */
export interface UnitSeen {
  unitKey: number;
  lastSampleTsMs: number;
  lastReceivedAtMs: number;
}

/** Moves each unit's last sample and receipt time forward (never back). */
export async function upsertUnitLastSeen({ tx, units }: { tx: SqlRunner; units: readonly UnitSeen[] }): Promise<void> {
  if (units.length === 0) return;
  await tx.query(
    `insert into unit_status as s (unit_key, last_sample_ts, last_received_at)
     select k, ${ms('t')}, ${ms('r')} from unnest($1::int4[], $2::float8[], $3::float8[]) as u(k, t, r)
     on conflict (unit_key) do update set
       last_sample_ts = greatest(s.last_sample_ts, excluded.last_sample_ts),
       last_received_at = greatest(s.last_received_at, excluded.last_received_at)`,
    [units.map((u) => u.unitKey), units.map((u) => u.lastSampleTsMs), units.map((u) => u.lastReceivedAtMs)],
  );
}

/** The latest presence message of one unit in a batch. */
export interface PresenceUpdate {
  unitKey: number;
  presence: 'online' | 'offline';
  receivedAtMs: number;
  /** Delivered as the retained message on subscribing: its time is unknown. */
  retained: boolean;
}

/**
 * Stores presence. A retained message that repeats the stored state keeps
 * the stored time (it says nothing new); any change takes the receipt time.
 */
export async function upsertUnitPresence({ tx, updates }: { tx: SqlRunner; updates: readonly PresenceUpdate[] }): Promise<void> {
  // Both statements are issued at once (a unit has one update a batch, so they touch different rows):
  // the caller may already have sent what follows (writer.ts, inOrder).
  const statements: Array<Promise<unknown>> = [];
  for (const retained of [false, true]) {
    const some = updates.filter((u) => u.retained === retained);
    if (some.length === 0) continue;
    statements.push(tx.query(
      `insert into unit_status as s (unit_key, presence, presence_at)
       select k, p::presence_state, ${ms('r')} from unnest($1::int4[], $2::text[], $3::float8[]) as u(k, p, r)
       on conflict (unit_key) do update set
         presence = excluded.presence,
         presence_at = ${
           retained
             ? 'case when s.presence is distinct from excluded.presence or s.presence_at is null then excluded.presence_at else s.presence_at end'
             : 'excluded.presence_at'
         }`,
      [some.map((u) => u.unitKey), some.map((u) => u.presence), some.map((u) => u.receivedAtMs)],
    ));
  }
  await Promise.all(statements);
}

/** A registered unit as the ingester needs it. */
export interface UnitEntry {
  key: number;
  id: string;
  siteId: string;
  kind: 'wind' | 'hydro';
}

/** Registered units by id; all of them, or those named. */
export async function getUnitEntries({ db, unitIds }: { db: SqlRunner; unitIds?: readonly string[] }): Promise<UnitEntry[]> {
  const rows = await db.query<{ key: number; id: string; site_id: string; kind: 'wind' | 'hydro' }>(
    unitIds
      ? 'select key, id, site_id, kind::text as kind from units where id = any($1::text[])'
      : 'select key, id, site_id, kind::text as kind from units',
    unitIds ? [unitIds] : [],
  );
  return rows.map((r) => ({ key: Number(r.key), id: r.id, siteId: r.site_id, kind: r.kind }));
}
