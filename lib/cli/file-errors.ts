/**
 * File errors of the command line in words: "cannot read nameplate file
 * x.json: no such file", never a bare ENOENT, EACCES or EISDIR. The same for
 * a connection to a database server (ECONNREFUSED and its kin).
 */

/** The system's error codes a user meets with files, in words. */
const WORDS: Record<string, string> = {
  ENOENT: 'no such file',
  EACCES: 'permission denied',
  EPERM: 'operation not permitted',
  EISDIR: 'it is a folder, not a file',
  ENOTDIR: 'a part of the path is not a folder',
  ELOOP: 'too many symbolic links in the path',
  ENAMETOOLONG: 'the name is too long',
  EMFILE: 'too many files open in this process',
  ENFILE: 'too many files open on this machine',
  ENOSPC: 'no space left on the device',
  EDQUOT: 'disk quota exceeded',
  EROFS: 'the file system is read-only',
  EBUSY: 'the file is busy',
  EIO: 'an input/output error of the device',
  EFBIG: 'the file is too large',
  ETXTBSY: 'the file is in use',
  EEXIST: 'it exists already',
  ENXIO: 'no such device',
  ENODEV: 'no such device',
};

/** Connection errors, in words; `at` is the address the error names. */
const NETWORK_WORDS: Record<string, (at: string) => string> = {
  ECONNREFUSED: (at) => `connection refused${at ? ` at ${at}` : ''} (is the server running there?)`,
  ENOTFOUND: (at) => `no such host${at ? ` ${at}` : ''}`,
  EAI_AGAIN: (at) => `the host name${at ? ` ${at}` : ''} could not be looked up now`,
  ETIMEDOUT: (at) => `no answer${at ? ` from ${at}` : ''} (timed out)`,
  EHOSTUNREACH: (at) => `no route to the host${at ? ` ${at}` : ''}`,
  ENETUNREACH: (at) => `the network${at ? ` of ${at}` : ''} is unreachable`,
  ECONNRESET: (at) => `the connection${at ? ` to ${at}` : ''} was closed by the other side`,
};

/**
 * `message` with a connection error of `cause` in words: "cannot prepare the
 * database at …: connect ECONNREFUSED 127.0.0.1:1" → "…: connection refused
 * at 127.0.0.1:1 (is the server running there?)". Other messages unchanged.
 */
export function withNetworkWords(message: string, cause: unknown): string {
  const e = cause as (NodeJS.ErrnoException & { address?: string; port?: number; hostname?: string }) | undefined;
  if (!e || typeof e.code !== 'string' || !NETWORK_WORDS[e.code] || !(cause instanceof Error) || !message.includes(e.message)) return message;
  const at = e.hostname ?? (e.address ? `${e.address}${e.port ? `:${e.port}` : ''}` : (/\s(\S+:\d+)$/.exec(e.message)?.[1] ?? ''));
  return message.replace(e.message, NETWORK_WORDS[e.code]!(at));
}

/** A Node.js system error about a file (it carries a code such as ENOENT). */
export function isFileError(error: unknown): error is NodeJS.ErrnoException {
  if (!(error instanceof Error)) return false;
  const e = error as NodeJS.ErrnoException;
  return typeof e.code === 'string' && /^E[A-Z0-9]+$/.test(e.code) && (e.path !== undefined || e.syscall !== undefined);
}

/** What went wrong, in words ("no such file"); an unlisted code gives the system's own words, without the code. */
export function fileErrorWords(error: unknown): string {
  const e = error as NodeJS.ErrnoException;
  if (typeof e?.code === 'string' && WORDS[e.code]) return WORDS[e.code]!;
  const message = error instanceof Error ? error.message : String(error);
  // "EXDEV: cross-device link not permitted, rename 'a' -> 'b'" → "cross-device link not permitted"
  return message.replace(/^E[A-Z0-9]+:\s*/, '').replace(/,\s*\w+\s+'.*$/s, '') || 'an error of the system';
}

const WRITING = new Set(['write', 'mkdir', 'rename', 'unlink', 'rmdir', 'copyfile', 'symlink', 'link', 'chmod', 'chown', 'truncate', 'ftruncate', 'utime', 'futime', 'fsync']);

/**
 * "cannot read nameplate file x.json: no such file". `what` names the file's
 * role ("nameplate file", "log"); `path` defaults to the error's own.
 */
export function describeFileError(error: unknown, what: string, path?: string): string {
  const e = error as NodeJS.ErrnoException;
  const where = path ?? e?.path ?? '';
  if (e?.syscall === 'mkdir') {
    const words = e.code === 'EEXIST' || e.code === 'ENOTDIR' ? 'a file of that name is in the way' : fileErrorWords(error);
    return `cannot create folder${where ? ` ${where}` : ''}: ${words}`;
  }
  const verb = e?.syscall && WRITING.has(e.syscall) ? 'write' : 'read';
  return `cannot ${verb} ${what}${where ? ` ${where}` : ''}: ${fileErrorWords(error)}`;
}
