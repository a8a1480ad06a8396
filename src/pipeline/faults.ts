/**
 * Faults of the machine rather than of the input (a full disk, too few file descriptors, a folder
 * that may not be written, a read-only file system), said in one plain sentence with a fix.
 *
 * describeFault looks through an error and what it wraps (`cause`, Eleventy's `originalError`,
 * an AggregateError's `errors`) for a system error code it knows, and returns the message and fix,
 * or undefined for anything else (a fault of myofolio itself, which the caller reports as such).
 */
import { accessSync, constants, existsSync, lstatSync, readFileSync, readlinkSync } from 'node:fs';
import { dirname, isAbsolute, join } from 'node:path';

export interface Fault {
  /** The error code found (ENOSPC, EMFILE, ...). */
  code: string;
  /** One sentence naming what failed and where. */
  message: string;
  /** What the user can do. */
  fix: string;
}

/** Errors of the machine, by code: what happened (given the path, when known) and the fix. */
const KNOWN: Record<string, { what: (where: string) => string; fix: string }> = {
  ENOSPC: { what: (w) => `the disk is full: no space left on the device holding ${w}`, fix: 'Free some space on that disk, or choose a folder on another disk, and run the command again.' },
  EDQUOT: { what: (w) => `your disk quota is used up on the device holding ${w}`, fix: 'Free some space within your quota, or choose a folder on another disk, and run the command again.' },
  EFBIG: { what: (w) => `a file grew past the largest size allowed at ${w}`, fix: 'Choose a folder on another file system (or raise the file size limit, ulimit -f), and run the command again.' },
  EACCES: { what: (w) => `permission denied: you may not write or read ${w}`, fix: 'Choose a folder you may write to, or ask its owner for access (ls -ld shows who owns it).' },
  EPERM: { what: (w) => `the operation is not permitted on ${w}`, fix: 'Choose a folder you may write to, or ask its owner for access (ls -ld shows who owns it).' },
  EROFS: { what: (w) => `the file system holding ${w} is read-only`, fix: 'Choose a folder on a writable disk.' },
  ENOTDIR: { what: (w) => `a part of the path ${w} is a file, not a folder`, fix: 'Choose another path, or move that file away.' },
  EISDIR: { what: (w) => `${w} is a folder where a file was expected`, fix: 'Choose another path, or move that folder away.' },
  EEXIST: { what: (w) => `${w} already exists`, fix: 'Choose another path, or move what is there away.' },
  ELOOP: { what: (w) => `the path ${w} goes round a loop of symbolic links`, fix: 'Check the links along that path (ls -l), or choose another path.' },
  ENAMETOOLONG: { what: (w) => `the path ${w} is too long for the file system`, fix: 'Choose a shorter path.' },
  ENOENT: { what: (w) => `${w} does not exist (was it moved or removed while myofolio ran?)`, fix: 'Check the path, and that nothing else moves or removes files there, and run the command again.' },
  EIO: { what: (w) => `the disk holding ${w} reported an input/output error`, fix: 'Check the disk (or the network file system) and run the command again.' },
  EBUSY: { what: (w) => `${w} is in use (a mount point, or held by another program)`, fix: 'Choose another folder.' },
  EXDEV: { what: (w) => `${w} is on another file system than the folder next to it`, fix: 'Choose an output folder that is not a mount point.' },
  ENOMEM: { what: () => 'the machine ran out of memory', fix: 'Close other programs, or run on a machine with more memory.' },
};

const FD_CODES = new Set(['EMFILE', 'ENFILE']);

/**
 * The soft limit on open files of this process (`ulimit -n`), read from /proc/self/limits where
 * there is one (Linux); undefined elsewhere or when unlimited.
 */
export function openFileLimit(limits = '/proc/self/limits'): number | undefined {
  try {
    const m = /^Max open files\s+(\d+)/m.exec(readFileSync(limits, 'utf8'));
    return m ? Number(m[1]) : undefined;
  } catch {
    return undefined;
  }
}

type Coded = { code?: unknown; path?: unknown; dest?: unknown; message?: unknown; syscall?: unknown };

/** The error and everything it wraps, outermost first (at most 20, so a cycle ends). */
function chain(err: unknown): Coded[] {
  const out: Coded[] = [];
  const queue: unknown[] = [err];
  while (queue.length > 0 && out.length < 20) {
    const e = queue.shift();
    if (!e || typeof e !== 'object' || out.includes(e as Coded)) continue;
    out.push(e as Coded);
    const o = e as { cause?: unknown; originalError?: unknown; errors?: unknown };
    queue.push(o.cause, o.originalError);
    if (Array.isArray(o.errors)) queue.push(...o.errors);
  }
  return out;
}

/**
 * The machine fault behind `err`, if any. `where`: what to name when the error carries no path
 * (a write to an open file names none), e.g. 'the output folder /data/site'.
 * @example describeFault(Object.assign(new Error('x'), { code: 'ENOSPC' }), { where: 'the output folder site' })
 *   // → { code: 'ENOSPC', message: 'the disk is full: no space left on the device holding the output folder site', fix: … }
 */
export function describeFault(err: unknown, options: { where?: string; fileLimit?: number } = {}): Fault | undefined {
  const errors = chain(err);
  const located = (e: Coded) => (typeof e.path === 'string' ? e.path : typeof e.dest === 'string' ? e.dest : options.where ?? 'the folder being written');
  for (const e of errors) {
    const code = typeof e.code === 'string' ? e.code : '';
    if (FD_CODES.has(code)) return fdFault(code, options.fileLimit);
  }
  for (const e of errors) {
    const code = typeof e.code === 'string' ? e.code : '';
    const known = KNOWN[code];
    const dangling = typeof e.path === 'string' ? danglingTarget(e.path) : undefined;
    if (known && dangling !== undefined) return { code, message: `${e.path} is a symbolic link to ${dangling}, which does not exist.`, fix: 'Remove the link or make what it leads to, or choose another path.' };
    // Node's recursive mkdir can answer ENOENT for a folder whose parent exists (read-only or
    // special file systems): the parent tells why.
    if (code === 'ENOENT' && e.syscall === 'mkdir' && typeof e.path === 'string' && existsSync(dirname(e.path))) {
      const why = writeProblem(dirname(e.path));
      if (why && KNOWN[why]) return { code: why, message: `${capital(KNOWN[why].what(e.path))}.`, fix: KNOWN[why].fix };
      return { code, message: `The folder ${e.path} cannot be made: the file system holding ${dirname(e.path)} does not allow it.`, fix: 'Choose a folder on an ordinary, writable disk.' };
    }
    if (known) return { code, message: `${capital(known.what(located(e)))}.`, fix: known.fix };
    // Node's module loader reports a file it could not open (too many open files) as not found,
    // or, when it could not open a package's package.json, looks for an index.js that need not
    // exist: a module whose file or folder is there was not missing. One that is really missing
    // means a broken installation.
    if (code === 'ERR_MODULE_NOT_FOUND' && typeof e.message === 'string') {
      const named = /Cannot find (?:package|module) '([^']+)'/.exec(e.message)?.[1];
      if (named && isAbsolute(named) && (existsSync(named) || existsSync(join(dirname(named), 'package.json')))) return fdFault('EMFILE', options.fileLimit);
      return { code, message: `Part of myofolio's installation is missing${named ? ` (${named})` : ''}.`, fix: "Reinstall myofolio's dependencies (npm ci in its folder) and run the command again." };
    }
  }
  return undefined;
}

/** Why a folder cannot be written (EROFS, EACCES, …), or undefined when it can. */
function writeProblem(dir: string): string | undefined {
  try {
    accessSync(dir, constants.W_OK);
    return undefined;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code;
  }
}

/** Where a link that leads nowhere leads, or undefined when `p` is not such a link. */
function danglingTarget(p: string): string | undefined {
  try {
    if (!lstatSync(p).isSymbolicLink() || existsSync(p)) return undefined;
    return readlinkSync(p);
  } catch {
    return undefined;
  }
}

function fdFault(code: string, limit = openFileLimit()): Fault {
  if (code === 'ENFILE') return { code, message: "The system's table of open files is full.", fix: 'Close other programs (or raise the system limit, fs.file-max) and run the command again.' };
  return {
    code,
    message: `Too many open files: this process may open only ${limit ?? 'a few'} files at once (ulimit -n), fewer than myofolio needs.`,
    fix: "Raise the limit in this shell, e.g. 'ulimit -n 4096', and run the command again.",
  };
}

function capital(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
