import { describe, expect, it } from 'vitest';
import { createLogger } from '@/lib/log/logger';
import { decodedMessage } from '@/test/support/ingest';
import { BatchLedger } from './batch-ledger';
import type { PendingMessage } from './batch-queue';
import type { BatchResult } from './writer';

const T0 = 1_767_225_600_000;

function message(samples: number, receivedAtMs: number, unknownFields: string[] = []): PendingMessage {
  const decoded = decodedMessage({ siteId: 'karrow-fell', id: 'wt-01' }, Array.from({ length: samples }, (_, i) => ({ ts: T0 + i * 1000, rpm: 250, vab: 230 })));
  return { ...decoded, receivedAtMs, unknownFields, qos: 1, receipt: { ack: () => {}, alive: () => true } };
}

function result(over: Partial<BatchResult> = {}): BatchResult {
  return { inserted: 0, duplicates: 0, quarantined: 0, presence: 0, unknownFieldsByUnit: new Map(), sampledUnits: [], phases: {}, ...over };
}

function ledger(nowMs: () => number) {
  const lines: string[] = [];
  const book = new BatchLedger(createLogger('ingest', 'debug', (line) => lines.push(line)), nowMs);
  const warnings = () => lines.map((l) => JSON.parse(l) as { level: string; msg: string; unit?: string }).filter((l) => l.level === 'warn');
  return { book, warnings };
}

describe('BatchLedger', () => {
  it('counts messages in, their samples, and those with fields the contract does not know', () => {
    const { book } = ledger(() => T0);
    book.received(message(10, T0));
    book.received(message(5, T0, ['humidity']));
    expect(book.counters).toMatchObject({ messages: 2, samplesIn: 15, unknownFieldMessages: 1 });
  });

  it('adds up what each committed batch stored', () => {
    const { book } = ledger(() => T0);
    book.committed(result({ inserted: 8, duplicates: 2, quarantined: 1, presence: 1 }), [message(10, T0)], T0, 0);
    book.committed(result({ inserted: 4 }), [message(4, T0)], T0, 0);
    expect(book.counters).toMatchObject({ batches: 2, rowsCommitted: 12, duplicates: 2, quarantined: 1, presenceUpdates: 1 });
  });

  it('takes the last batch time from its start, its wait from its oldest message, its lag from its newest sample', () => {
    const end = T0 + 10_000;
    const { book } = ledger(() => end);
    book.committed(result({ inserted: 15, newestTsMs: end - 2500 }), [message(10, T0 + 4000), message(5, T0 + 1000)], end - 300, 0);
    expect(book.lastBatch).toEqual({ samples: 15, rows: 15, ms: 300, lagMs: 2500, waitMs: 9000, atMs: end });
  });

  it('keeps the lag of the last batch that stored samples when one stores none (presence, redeliveries)', () => {
    const { book } = ledger(() => T0 + 10_000);
    book.committed(result({ inserted: 1, newestTsMs: T0 + 9000 }), [message(1, T0)], T0, 0);
    book.committed(result(), [message(0, T0)], T0, 0);
    expect(book.lastBatch?.lagMs).toBe(1000);
  });

  it('warns of unknown fields once per unit, however many batches carry them', () => {
    const { book, warnings } = ledger(() => T0);
    const unknown = (units: string[]) => result({ unknownFieldsByUnit: new Map(units.map((u) => [u, new Set(['humidity'])])) });
    book.committed(unknown(['wt-01']), [message(1, T0)], T0, 0);
    book.committed(unknown(['wt-01', 'wt-02']), [message(1, T0)], T0, 0);
    book.committed(unknown(['wt-02']), [message(1, T0)], T0, 0);
    expect(warnings().map((w) => w.unit)).toEqual(['wt-01', 'wt-02']);
  });
});
