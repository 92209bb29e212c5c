/**
 * Turns one MQTT payload into validated samples and quarantine entries.
 * Never throws on bad input: every way a payload can be wrong ends as a
 * quarantine entry whose reason says what to fix. One bad sample in an array
 * does not reject its good neighbours.
 */
import { NO_FIELDS, describeValue, parseTelemetrySample, telemetrySampleSchema } from '@/lib/contract/telemetry';
import { EMPTY_BLOCK, appendSample, createSampleBlock, type SampleBlock } from './sample-block';

export { NO_FIELDS };

/** Largest payload the ingester reads, bytes (256 KiB). */
export const MAX_PAYLOAD_BYTES = 256 * 1024;

/** Deepest JSON nesting accepted; a sample is a flat object, so anything deep is a mistake. */
export const MAX_JSON_DEPTH = 32;

/** Characters of a payload kept in a quarantine row. */
export const QUARANTINE_PAYLOAD_CHARS = 4096;

/** Characters of one sample kept in a quarantine row. */
export const QUARANTINE_SAMPLE_CHARS = 1024;

const MS_PER_DAY = 86_400_000;

/** Something that could not be stored, and why. */
export interface QuarantineEntry {
  /** Index of the sample in an array payload; null for the whole payload or a single-object payload. */
  sampleIndex: number | null;
  /** The payload or sample as text, cut to a bounded size. */
  payload: string;
  /** Size of the whole payload or sample before cutting, bytes. */
  payloadBytes: number;
  /** What is wrong, in words a person can act on. */
  reason: string;
}

export interface DecodedTelemetry {
  /** The valid samples, compactly. */
  samples: SampleBlock;
  quarantined: QuarantineEntry[];
  /** Names of fields the contract does not know, seen in valid samples (kept nowhere). */
  unknownFields: string[];
}

/** Text PostgreSQL can hold: no NUL characters (they become the escape `\u0000`). */
export function pgSafeText(text: string): string {
  return text.includes('\u0000') ? text.replaceAll('\u0000', '\\u0000') : text;
}

/**
 * `text` cut to `maxChars`, saying how long the whole was when anything is
 * missing (`totalBytes` may say that `text` is already only the head).
 * @example boundText('abcdef', 3) // 'abc… (6 bytes in all)'
 */
export function boundText(text: string, maxChars: number, totalBytes = Buffer.byteLength(text)): string {
  const safe = pgSafeText(text);
  if (safe.length > maxChars) return `${safe.slice(0, maxChars)}… (${totalBytes} bytes in all)`;
  if (totalBytes > Buffer.byteLength(text)) return `${safe}… (${totalBytes} bytes in all)`;
  return safe;
}

function kib(bytes: number): string {
  return `${(bytes / 1024).toFixed(1)} KiB`;
}

/** Nesting depth of a JSON text, strings skipped; stops counting at `limit + 1`. */
export function jsonDepth(text: string, limit = MAX_JSON_DEPTH): number {
  let depth = 0;
  let max = 0;
  let inString = false;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (inString) {
      if (c === 92 /* \ */) i++;
      else if (c === 34 /* " */) inString = false;
    } else if (c === 34) inString = true;
    else if (c === 123 /* { */ || c === 91 /* [ */) {
      depth++;
      if (depth > max) {
        max = depth;
        if (max > limit) return max;
      }
    } else if (c === 125 /* } */ || c === 93 /* ] */) depth--;
  }
  return max;
}

const utf8 = new TextDecoder('utf-8', { fatal: true });
/** The shared empty list of quarantine entries (never written). */
export const NO_ENTRIES: QuarantineEntry[] = Object.freeze([]) as unknown as QuarantineEntry[];

export interface TelemetryDecoderOptions {
  /** Samples older than this many days are refused (they would be deleted at once by retention). */
  retentionDays: number;
}

/**
 * Builds a decoder. `decode(payload, receivedAtMs)` validates against the
 * contract schema with "now" = the time the message was received.
 * @example createTelemetryDecoder({ retentionDays: 90 }).decode(Buffer.from('{"ts":1767225600000,"rpm":300,"vab":120}'), 1767225600000).samples.count // 1
 */
export function createTelemetryDecoder({ retentionDays }: TelemetryDecoderOptions) {
  let nowMs = Date.now();
  const schema = telemetrySampleSchema(() => nowMs);

  function decode(payload: Uint8Array, receivedAtMs: number): DecodedTelemetry {
    nowMs = receivedAtMs;
    const read = readSamplesPayload(payload);
    if (!read.ok) return read.decoded;
    return validateSamples(read, { schema, oldestMs: receivedAtMs - retentionDays * MS_PER_DAY, retentionDays });
  }

  return { decode };
}

/** A payload quarantined whole, with why. */
function wholePayload(payload: string, payloadBytes: number, reason: string): DecodedTelemetry {
  return {
    samples: EMPTY_BLOCK,
    quarantined: [{ sampleIndex: null, payload: boundText(payload, QUARANTINE_PAYLOAD_CHARS, payloadBytes), payloadBytes, reason }],
    unknownFields: NO_FIELDS,
  };
}

/** The answer of {@link readSamplesPayload} for a payload of `bytes` refused whole. */
function refused(bytes: number, text: string, reason: string): { ok: false; decoded: DecodedTelemetry } {
  return { ok: false, decoded: wholePayload(text, bytes, reason) };
}

/** A payload read as JSON: its samples still unchecked, `single` when it was one object rather than an array. */
interface ReadPayload {
  ok: true;
  text: string;
  bytes: number;
  raws: unknown[];
  single: boolean;
}

/** Reads a payload as JSON holding one sample object or an array of them; anything else is quarantined whole. */
function readSamplesPayload(payload: Uint8Array): ReadPayload | { ok: false; decoded: DecodedTelemetry } {
  const bytes = payload.byteLength;
  if (bytes > MAX_PAYLOAD_BYTES) {
    const head = Buffer.from(payload.buffer, payload.byteOffset, Math.min(bytes, QUARANTINE_PAYLOAD_CHARS)).toString('utf8');
    return refused(bytes, head, `payload of ${kib(bytes)} is over the ${kib(MAX_PAYLOAD_BYTES)} limit of one message; send fewer samples per message`);
  }
  if (bytes === 0) return refused(bytes, '', 'payload is empty; expected a JSON sample object or an array of them');
  let text: string;
  try {
    text = utf8.decode(payload);
  } catch {
    const head = Buffer.from(payload.buffer, payload.byteOffset, Math.min(bytes, 3000)).toString('base64');
    return refused(bytes, `base64:${head}`, 'payload is not UTF-8 text; expected a JSON sample object or an array of them');
  }
  if (jsonDepth(text) > MAX_JSON_DEPTH) {
    return refused(
      bytes,
      text,
      `payload nests more than ${MAX_JSON_DEPTH} levels deep; a sample is a flat JSON object and a payload one sample or an array of them`,
    );
  }
  let parsed: unknown;
  try {
    parsed = JSON.parse(text);
  } catch (error) {
    return refused(bytes, text, `payload is not JSON (${(error as Error).message}); expected a sample object or an array of them`);
  }
  if (Array.isArray(parsed)) {
    if (parsed.length === 0) return refused(bytes, text, 'payload is an empty array: it holds no samples');
    return { ok: true, text, bytes, raws: parsed, single: false };
  }
  if (parsed !== null && typeof parsed === 'object') return { ok: true, text, bytes, raws: [parsed], single: true };
  return refused(bytes, text, `payload must be a JSON sample object or an array of them, got ${describeValue(parsed)}`);
}

/**
 * Checks each sample of a read payload against the contract schema, the
 * retention and the samples before it in the message (a time may appear
 * once); a bad sample is quarantined on its own, its good neighbours kept.
 */
function validateSamples(
  { text, bytes, raws, single }: ReadPayload,
  { schema, oldestMs, retentionDays }: { schema: ReturnType<typeof telemetrySampleSchema>; oldestMs: number; retentionDays: number },
): DecodedTelemetry {
  const samples = createSampleBlock(raws.length);
  let quarantined: QuarantineEntry[] = NO_ENTRIES;
  let unknown: Set<string> | undefined;
  // Repeated times: a scan of the few kept so far, a map for a long array.
  const seenTs = raws.length > 32 ? new Map<number, number>() : undefined;
  /** Index in the payload of each sample kept in the block. */
  const keptIndex: number[] = [];
  const firstWithTs = (ts: number): number | undefined => {
    if (seenTs) return seenTs.get(ts);
    for (let k = 0; k < samples.count; k++) if (samples.ts[k] === ts) return keptIndex[k];
    return undefined;
  };
  const rejectSample = (index: number, raw: unknown, reason: string) => {
    const sampleText = single ? text : (JSON.stringify(raw) ?? String(raw));
    if (quarantined === NO_ENTRIES) quarantined = [];
    quarantined.push({
      sampleIndex: single ? null : index,
      payload: boundText(sampleText, single ? QUARANTINE_PAYLOAD_CHARS : QUARANTINE_SAMPLE_CHARS),
      payloadBytes: single ? bytes : Buffer.byteLength(sampleText),
      reason,
    });
  };
  for (let index = 0; index < raws.length; index++) {
    const raw = raws[index];
    const result = parseTelemetrySample(raw, schema);
    if (!result.ok) {
      rejectSample(index, raw, result.problems.join('; '));
      continue;
    }
    const sample = result.sample;
    // The column keeps whole milliseconds; rounding here keeps keys and rows alike.
    sample.ts = Math.round(sample.ts);
    if (sample.ts < oldestMs) {
      rejectSample(
        index,
        raw,
        `ts: ${new Date(sample.ts).toISOString()} is older than the ${retentionDays}-day retention (RETENTION_DAYS); it would be deleted at once`,
      );
      continue;
    }
    const first = firstWithTs(sample.ts);
    if (first !== undefined) {
      rejectSample(index, raw, `ts: ${new Date(sample.ts).toISOString()} repeats sample [${first}] of this message; only the first was kept`);
      continue;
    }
    seenTs?.set(sample.ts, index);
    keptIndex.push(index);
    for (const field of result.unknownFields) (unknown ??= new Set()).add(field);
    appendSample(samples, sample);
  }
  return { samples, quarantined, unknownFields: unknown ? [...unknown] : NO_FIELDS };
}

export type TelemetryDecoder = ReturnType<typeof createTelemetryDecoder>;

export type DecodedPresence =
  | { ok: true; presence: 'online' | 'offline' }
  /** An empty payload: someone cleared the retained presence; it carries no state. */
  | { ok: true; presence: null }
  | { ok: false; entry: QuarantineEntry };

/**
 * Reads a presence payload: `online` or `offline` (surrounding white space allowed).
 * @example decodePresencePayload(Buffer.from('offline')) // { ok: true, presence: 'offline' }
 */
export function decodePresencePayload(payload: Uint8Array): DecodedPresence {
  if (payload.byteLength === 0) return { ok: true, presence: null };
  const text = Buffer.from(payload.buffer, payload.byteOffset, Math.min(payload.byteLength, QUARANTINE_PAYLOAD_CHARS)).toString('utf8');
  const value = text.trim();
  if (payload.byteLength <= 64 && (value === 'online' || value === 'offline')) return { ok: true, presence: value };
  return {
    ok: false,
    entry: {
      sampleIndex: null,
      payload: boundText(text, QUARANTINE_PAYLOAD_CHARS, payload.byteLength),
      payloadBytes: payload.byteLength,
      reason: `presence must be "online" or "offline", got ${describeValue(value)}`,
    },
  };
}
