/**
 * The alerts migration: alerts kept under the first schema's states (open,
 * acknowledged, resolved) come out in the contract's (active, acknowledged,
 * cleared: contract section 7), and the old tables are gone. Runs the
 * committed SQL files in order on an embedded database, with rows of the
 * first schema written between them, as an installation that upgrades.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { PGlite } from '@electric-sql/pglite';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { migrationsFolder } from '@/db/client';

const folder = migrationsFolder();
const journal = JSON.parse(readFileSync(join(folder, 'meta', '_journal.json'), 'utf8')) as { entries: Array<{ tag: string }> };
let pg: PGlite;

async function apply(tag: string): Promise<void> {
  for (const statement of readFileSync(join(folder, `${tag}.sql`), 'utf8').split('--> statement-breakpoint')) {
    if (statement.trim()) await pg.exec(statement);
  }
}

beforeAll(async () => {
  pg = new PGlite();
  const tags = journal.entries.map((e) => e.tag);
  const alertsAt = tags.indexOf('0003_alerts');
  expect(alertsAt).toBeGreaterThan(0);
  for (const tag of tags.slice(0, alertsAt)) await apply(tag);
  await pg.exec(`
    insert into sites (id, name, timezone) values ('north', 'North', 'UTC');
    insert into units (id, site_id, kind, rated_kw, rated_rpm, max_rpm, poles, ke_v_per_krpm, ke_ref_c, magnet, phase_ohm, phase_mh)
      values ('n-1', 'north', 'wind', 10, 250, 300, 24, 1800, 20, 'ndfeb', 0.6, 18);
    insert into alerts (unit_key, code, severity, state, message, opened_at, updated_at, resolved_at) values
      ((select key from units where id = 'n-1'), 'overspeed', 'alarm', 'open', 'over the limit', '2026-11-01T10:00:00Z', '2026-11-01T10:05:00Z', null),
      ((select key from units where id = 'n-1'), 'offline', 'warning', 'resolved', 'no sample', '2026-11-02T10:00:00Z', '2026-11-02T11:00:00Z', '2026-11-02T11:00:00Z'),
      ((select key from units where id = 'n-1'), 'shorted-turns', 'alarm', 'acknowledged', 'unbalance', '2026-11-03T10:00:00Z', '2026-11-03T10:30:00Z', null),
      ((select key from units where id = 'n-1'), 'ke-low', 'warning', 'open', 'a code no contract condition has', '2026-11-04T10:00:00Z', '2026-11-04T10:00:00Z', null);
  `);
  for (const tag of tags.slice(alertsAt)) await apply(tag);
}, 60_000);

afterAll(async () => {
  await pg?.close();
});

describe('alerts migration (contract section 7 states)', () => {
  it('carries each alert of a contract condition over in the contract’s state', async () => {
    const { rows } = await pg.query<{ condition: string; state: string; cleared_at: Date | null; changed_at: Date }>(
      'select condition::text, state::text, cleared_at, changed_at from unit_alerts order by opened_at',
    );
    expect(rows.map((r) => [r.condition, r.state])).toEqual([
      ['overspeed', 'active'],
      ['offline', 'cleared'],
      ['shorted-turns', 'acknowledged'],
    ]);
    expect(rows[1]!.cleared_at?.toISOString()).toBe('2026-11-02T11:00:00.000Z');
    expect(rows[0]!.cleared_at).toBeNull();
    expect(rows[0]!.changed_at.toISOString()).toBe('2026-11-01T10:05:00.000Z');
  });

  it('drops the first schema’s tables and state type', async () => {
    const { rows } = await pg.query<{ name: string }>("select tablename as name from pg_tables where schemaname = 'public' and tablename in ('alerts', 'alert_events')");
    expect(rows).toEqual([]);
    const types = await pg.query<{ n: number }>("select count(*)::int as n from pg_type where typname = 'alert_state'");
    expect(types.rows[0]!.n).toBe(0);
  });

  it('allows one alert not yet cleared per unit and condition', async () => {
    const key = (await pg.query<{ key: number }>("select key from units where id = 'n-1'")).rows[0]!.key;
    const insert = `insert into unit_alerts (unit_key, condition, severity, state, message, opened_at, changed_at) values (${key}, 'overspeed', 'alarm', 'active', 'again', now(), now())`;
    await expect(pg.exec(insert)).rejects.toThrow(/unit_alerts_open_one/);
    await pg.exec(`update unit_alerts set state = 'cleared', cleared_at = now() where condition = 'overspeed'`);
    await pg.exec(insert);
  });
});
