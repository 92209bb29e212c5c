/**
 * A lock file that keeps a second process out of the embedded PGlite folder.
 * PGlite gives a second process no error, and that process's commits are
 * silently lost; this lock turns that into a clear refusal.
 */
import { closeSync, mkdirSync, openSync, readFileSync, rmSync, writeSync } from 'node:fs';
import { join } from 'node:path';
import { AppError } from '@/lib/errors/app-error';

export const LOCK_FILE = 'millrace.lock';

interface LockInfo {
  pid: number;
  startedAt: string;
  command: string;
}

function isAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}

function readLock(path: string): LockInfo | undefined {
  try {
    return JSON.parse(readFileSync(path, 'utf8')) as LockInfo;
  } catch {
    return undefined;
  }
}

/**
 * Takes the lock of `dir`, or throws AppError (`unavailable:db`) saying which
 * process holds it. A lock left by a process that no longer runs is taken over.
 * Returns the function that releases it.
 */
export function acquireDataDirLock(dir: string): () => void {
  mkdirSync(dir, { recursive: true });
  const path = join(dir, LOCK_FILE);
  const info: LockInfo = { pid: process.pid, startedAt: new Date().toISOString(), command: process.argv.slice(1).join(' ') };
  for (let attempt = 0; attempt < 2; attempt++) {
    try {
      const fd = openSync(path, 'wx');
      writeSync(fd, JSON.stringify(info));
      closeSync(fd);
      let released = false;
      const release = () => {
        if (released) return;
        released = true;
        const current = readLock(path);
        if (current?.pid === process.pid) rmSync(path, { force: true });
        process.off('exit', release);
      };
      process.on('exit', release);
      return release;
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code !== 'EEXIST') throw error;
      const holder = readLock(path);
      if (holder && holder.pid !== process.pid && isAlive(holder.pid)) {
        throw new AppError(
          'unavailable',
          'db',
          `the embedded database in ${dir} is in use by process ${holder.pid} (${holder.command || 'millrace'}, since ${holder.startedAt}); ` +
            'stop that process first, or set DATABASE_URL to use a PostgreSQL server',
          { expose: true },
        );
      }
      if (holder?.pid === process.pid) {
        throw new AppError('conflict', 'db', `the embedded database in ${dir} is already open in this process`);
      }
      rmSync(path, { force: true });
    }
  }
  throw new AppError('unavailable', 'db', `could not take the lock ${path}`, { expose: true });
}
