import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { main } from '@/lib/cli/main';
import { getUnits, getSites } from '@/lib/fleet/queries';
import { openDatabase, type DatabaseHandle } from '@/db/client';
import { createPostgresDatabase, realDatabaseUrl } from '@/test/support/backend';

// The contract's section 4 fixes this command: all or nothing, every problem
// printed with its path, exit status 2. The fleet below is invented.
const site = { id: 'ostrimmel-vay', name: 'Ostrimmel Vay', timezone: 'Europe/Oslo' };
const windUnit = {
  id: 'hm-w1',
  siteId: 'ostrimmel-vay',
  kind: 'wind',
  ratedKw: 6,
  ratedRpm: 280,
  maxRpm: 420,
  poles: 18,
  keVPerKrpm: 1100,
  magnet: 'ndfeb',
  phaseOhm: 0.55,
  phaseMh: 4.2,
  powerCurve: [
    { ms: 3, kw: 0.1 },
    { ms: 11, kw: 6 },
  ],
  cutInMs: 3,
  cutOutMs: 24,
  rotorDiameterM: 5.5,
};
const hydroUnit = {
  id: 'hm-h1',
  siteId: 'ostrimmel-vay',
  kind: 'hydro',
  ratedKw: 15,
  ratedRpm: 750,
  maxRpm: 1400,
  poles: 8,
  keVPerKrpm: 520,
  magnet: 'ferrite',
  phaseOhm: 0.2,
  designHeadM: 22,
  designFlowM3s: 0.09,
  efficiency: 0.72,
};

function capture() {
  let text = '';
  const stream = new Writable({
    write(chunk, _enc, done) {
      text += String(chunk);
      done();
    },
  });
  return { stream, text: () => text };
}

let dir: string;
let env: Record<string, string | undefined>;
let dropDb: (() => Promise<void>) | undefined;
const saved = { DATABASE_URL: process.env.DATABASE_URL, DATA_DIR: process.env.DATA_DIR };

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'millrace-import-'));
  if (realDatabaseUrl) {
    const created = await createPostgresDatabase(realDatabaseUrl);
    dropDb = created.drop;
    env = { DATABASE_URL: created.url };
  } else env = { DATA_DIR: join(dir, 'data') };
});
afterAll(async () => {
  rmSync(dir, { recursive: true, force: true });
  await dropDb?.();
});

async function run(fleet: unknown) {
  const file = join(dir, `fleet-${Math.random().toString(36).slice(2)}.json`);
  writeFileSync(file, typeof fleet === 'string' ? fleet : JSON.stringify(fleet));
  const out = capture();
  const err = capture();
  // The command reads its settings from the environment (once per process, as `npx millrace` does).
  process.env.DATABASE_URL = env.DATABASE_URL ?? '';
  process.env.DATA_DIR = env.DATA_DIR ?? '';
  const code = await main(['units', 'import', file], { stdout: out.stream, stderr: err.stream });
  process.env.DATABASE_URL = saved.DATABASE_URL ?? '';
  process.env.DATA_DIR = saved.DATA_DIR ?? '';
  return { code, stdout: out.text(), stderr: err.text(), file };
}

async function withDb<T>(fn: (handle: DatabaseHandle) => Promise<T>): Promise<T> {
  const handle = await openDatabase(env.DATABASE_URL ? { url: env.DATABASE_URL } : { dataDir: env.DATA_DIR });
  try {
    return await fn(handle);
  } finally {
    await handle.close();
  }
}

describe('npx millrace units import', () => {
  it('registers sites and units, then updates them matched by id', async () => {
    const first = await run({ sites: [site], units: [windUnit, hydroUnit] });
    expect(first.stderr).toBe('');
    expect(first.code).toBe(0);
    expect(first.stdout).toContain('sites 1 added, 0 updated; units 2 added, 0 updated');

    const second = await run({ units: [{ ...windUnit, ratedKw: 7.5 }] });
    expect(second.code).toBe(0);
    expect(second.stdout).toContain('units 0 added, 1 updated');

    await withDb(async ({ db }) => {
      const units = await getUnits({ db });
      expect(units.map((u) => [u.id, u.ratedKw])).toEqual([
        ['hm-h1', 15],
        ['hm-w1', 7.5],
      ]);
      expect(units.find((u) => u.id === 'hm-h1')?.keRefC).toBe(20);
      expect((await getSites({ db })).map((s) => s.timezone)).toEqual(['Europe/Oslo']);
    });
  });

  it('changes nothing when any entry is invalid, and prints every problem with its path', async () => {
    const result = await run({
      sites: [{ id: 'North Fell', name: 'North Fell', timezone: 'Europe/Atlantis' }],
      units: [windUnit, { ...hydroUnit, id: 'hm-h2', ratedKw: 99 }, { ...hydroUnit, id: 'hm-h3', poles: 7 }],
    });
    expect(result.code).toBe(2);
    expect(result.stderr).toContain('nothing was changed');
    expect(result.stderr).toContain('sites[0].id: must be 1 to 64 of a-z, 0-9 and -, got "North Fell"');
    expect(result.stderr).toContain('sites[0].timezone: must be an IANA time zone');
    expect(result.stderr).toContain('units[2].poles: must be an even number, got 7');
    await withDb(async ({ db }) => {
      expect((await getUnits({ db })).map((u) => u.id)).toEqual(['hm-h1', 'hm-w1']);
    });
  });

  it('refuses a unit whose site is nowhere to be found', async () => {
    const result = await run({ units: [{ ...hydroUnit, id: 'lost-1', siteId: 'no-such-site' }] });
    expect(result.code).toBe(2);
    expect(result.stderr).toContain('units[0].siteId: no site "no-such-site" in the file or the database');
  });

  it('names the file and line of a JSON syntax error, and a missing file', async () => {
    const broken = await run('{\n  "sites": [\n    { "id": "x", }\n  ]\n}');
    expect(broken.code).toBe(2);
    expect(broken.stderr).toMatch(new RegExp(`${broken.file.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}: line 3: not valid JSON`));
    const out = capture();
    const err = capture();
    const code = await main(['units', 'import', join(dir, 'absent.json')], { stdout: out.stream, stderr: err.stream });
    expect(code).toBe(2);
    expect(err.text()).toMatch(/cannot read fleet file \S*absent\.json: no such file\n$/);
  });
});
