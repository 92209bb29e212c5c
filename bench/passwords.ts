/**
 * What a password costs here: scrypt at the stored parameters (N = 2^17,
 * r = 8, p = 1), hashing and checking, and one whole sign-in (throttle rows,
 * the hash check, a session) on an in-memory PGlite. Prints median and worst
 * of a few runs; no target, figures for DEVELOPERS.md.
 */
import { openDatabase } from '@/db/client';
import { hashPassword, verifyPassword } from '@/lib/auth/passwords';
import { addPerson } from '@/lib/auth/people';
import { signIn } from '@/lib/auth/sign-in';

const RUNS = 5;

async function time(what: string, fn: () => Promise<unknown>): Promise<void> {
  const ms: number[] = [];
  for (let i = 0; i < RUNS; i++) {
    const started = performance.now();
    await fn();
    ms.push(performance.now() - started);
  }
  ms.sort((a, b) => a - b);
  process.stdout.write(`${what.padEnd(44)} median ${ms[Math.floor(RUNS / 2)]!.toFixed(0)} ms, worst ${ms.at(-1)!.toFixed(0)} ms (${RUNS} runs)\n`);
}

const password = 'tailrace sluice gate keeper';
const stored = await hashPassword(password);
await time('hashPassword (scrypt N=2^17, r=8, p=1)', () => hashPassword(password));
await time('verifyPassword, right password', () => verifyPassword(password, stored));
const handle = await openDatabase({ dataDir: 'memory://' });
await addPerson({ db: handle.db, actor: { label: 'bench' }, person: { email: 'bench@bench.invalid', role: 'admin', password } });
await time('signIn on PGlite (throttle, check, session)', () =>
  signIn({ db: handle.db, email: 'bench@bench.invalid', password, ip: '127.0.0.1', times: { idleHours: 12, maxDays: 7 } }),
);
process.stdout.write(`memory per hash: 128·N·r = ${(128 * 2 ** 17 * 8) / 2 ** 20} MiB; rss now ${(process.memoryUsage().rss / 2 ** 20).toFixed(0)} MiB\n`);
await handle.close();
