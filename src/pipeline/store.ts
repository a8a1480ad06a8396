/**
 * The store: one content-addressed folder for what is costly to recompute (a module's units of
 * one batch, a chart's SVG), shared by every build of every study.
 *
 *   (kind, fingerprint, key parts) ──SHA-256──▶ <dir>/<kind>/<a>/<hash>   (<a>: the hash's first hex digit)
 *   entry file: 'myofolio-store 2 <SHA-256 of kind, key and payload> <payload bytes>\n' + payload
 *
 * Every key includes the fingerprint of what computes the entries (src/pipeline/fingerprint.ts),
 * so an entry made by other code, schemas, templates or libraries is never found. Every entry is
 * checked on reading against the hash in its header, which covers the entry's kind and key as well
 * as its bytes: an entry that is not a regular file (a FIFO, a device, a link, such as one to
 * /dev/zero), cannot be read, is truncated, has other bytes (an edit that leaves valid content,
 * such as 'increased' made 'decreased' or one digit of a fit changed) or is another key's entry
 * (copied or moved there) is discarded, counted and recomputed by the caller; it is never served
 * and never stops a build. The header is read first and the file's size checked against it, so
 * a huge or endless file costs one small read. The hash guards against damage and mistakes, not
 * against someone who can write the store folder on purpose: the folder is made readable by its
 * owner only, and one that belongs to another user is not used (storeFolderProblem). Entries are written under
 * a temporary name and renamed, so a reader never sees half an entry. Entries not used for
 * CACHE.keepDays are removed (prune), at most once per CACHE.pruneEveryHours.
 */
import { createHash } from 'node:crypto';
import { closeSync, constants, fstatSync, lstatSync, openSync, readSync, readdirSync, realpathSync, renameSync, rmSync, statSync, utimesSync, writeFileSync, writeSync } from 'node:fs';
import { homedir } from 'node:os';
import { basename, dirname, isAbsolute, join, relative, resolve } from 'node:path';
import { CACHE } from '../defaults.js';
import { makeFolders } from './folders.js';

/** Version of the entry format and of the key layout; part of every key. */
const STORE_FORMAT = 2;
const MAGIC = 'myofolio-store';
/** Largest header line read (magic, format, hash, length). */
const HEADER_MAX = 128;
const DAY_MS = 24 * 3600 * 1000;
/** Name of the file whose modification time records the last pruning. */
const PRUNED_MARK = 'last-pruned';

/**
 * Default store folder: $XDG_CACHE_HOME/myofolio when XDG_CACHE_HOME is an absolute path (the
 * XDG Base Directory spec ignores a relative one), else ~/.cache/myofolio.
 * @example defaultStoreDir({ XDG_CACHE_HOME: '/var/cache/me' }, '/home/me') // → '/var/cache/me/myofolio'
 */
export function defaultStoreDir(env: NodeJS.ProcessEnv = process.env, home: string = homedir()): string {
  const xdg = env.XDG_CACHE_HOME;
  return join(xdg && isAbsolute(xdg) ? xdg : join(home, '.cache'), 'myofolio');
}

function inside(child: string, parent: string): boolean {
  const rel = relative(parent, child);
  return rel === '' || (!rel.startsWith('..') && !isAbsolute(rel));
}

/** The real path of `p` (links resolved) even when its last parts do not exist yet. */
function realPath(p: string): string {
  const rest: string[] = [];
  for (let cur = resolve(p); ; ) {
    try {
      return join(realpathSync(cur), ...rest.reverse());
    } catch {
      const parent = dirname(cur);
      if (parent === cur) return resolve(p);
      rest.push(basename(cur));
      cur = parent;
    }
  }
}

/** Is `dir` inside `folder` (or the same), by path or by real path? */
function within(dir: string, folder: string): boolean {
  return inside(resolve(dir), resolve(folder)) || inside(realPath(dir), realPath(folder));
}

export interface StoreLocation {
  /** The store folder, or false for none. */
  dir: string | false;
  /** A one-line note when the folder asked for (or the environment's) was not used, saying which is. */
  note?: string;
}

/**
 * The store folder for a build of `studyDir` writing to `outDir`: `requested` (default: the
 * default store folder), unless it is inside the study folder (myofolio never writes there) or
 * inside the output folder or its versions (which the next build replaces): then ~/.cache/myofolio,
 * with a note saying so; no store at all, with a note, when that is inside them too. A relative
 * XDG_CACHE_HOME is ignored, as the XDG Base Directory spec says, with a note.
 * @example storeDirFor('/data/study', undefined, undefined, { XDG_CACHE_HOME: '/data/study/.cache' }, '/home/me')
 *   // → { dir: '/home/me/.cache/myofolio', note: 'the cache folder /data/study/.cache/myofolio (from XDG_CACHE_HOME) is inside the study folder, …' }
 */
export function storeDirFor(studyDir: string, requested?: string, outDir?: string, env: NodeJS.ProcessEnv = process.env, home: string = homedir()): StoreLocation {
  const forbidden = [
    { dir: studyDir, name: 'the study folder, which myofolio never writes into' },
    ...(outDir ? [{ dir: outDir, name: 'the output folder, which the next build replaces' }, { dir: `${outDir}.versions`, name: 'the output folder, which the next build replaces' }] : []),
  ];
  const why = (dir: string) => forbidden.find((f) => within(dir, f.dir))?.name;
  const fallback = join(home, '.cache', 'myofolio');
  const xdg = env.XDG_CACHE_HOME;
  const asked = requested ?? defaultStoreDir(env, home);
  const source = requested !== undefined ? '' : ' (from XDG_CACHE_HOME)';
  const relativeNote = requested === undefined && xdg && !isAbsolute(xdg) ? `XDG_CACHE_HOME is a relative path (${xdg}), which the XDG Base Directory spec says to ignore; the cache folder is ${fallback}.` : undefined;
  const refused = why(asked);
  if (!refused) return { dir: resolve(asked), ...(relativeNote ? { note: relativeNote } : {}) };
  const shown = requested !== undefined || (xdg && isAbsolute(xdg)) ? `the cache folder ${asked}${source}` : `the default cache folder ${asked}`;
  if (resolve(asked) !== resolve(fallback) && !why(fallback)) return { dir: resolve(fallback), note: `${shown} is inside ${refused}; the cache folder ${fallback} is used instead.` };
  return { dir: false, note: `${shown} is inside ${refused}; this build uses no cache.` };
}

/**
 * Why an existing store folder is not used, or undefined when it may be: it must be a folder
 * (a link to one is fine) that belongs to this user, so that no one else can put entries in it.
 */
export function storeFolderProblem(dir: string): string | undefined {
  let st;
  try {
    st = statSync(dir);
  } catch {
    return undefined; // made on first use
  }
  if (!st.isDirectory()) return `the cache folder ${dir} is not a folder; this build uses no cache.`;
  const uid = process.getuid?.();
  if (uid !== undefined && st.uid !== uid) return `the cache folder ${dir} belongs to another user; this build uses no cache.`;
  return undefined;
}

export interface StoreCounts {
  hits: number;
  misses: number;
  /** Entries found damaged (or not regular files) and discarded, by path. */
  discarded: string[];
}

export class Store {
  readonly dir: string;
  readonly counts: StoreCounts = { hits: 0, misses: 0, discarded: [] };
  private readonly made = new Set<string>();

  constructor(dir: string, readonly fingerprint: string) {
    this.dir = resolve(dir);
  }

  /** Entry key of a kind and its key parts (any JSON value), with the store format and fingerprint. */
  key(kind: string, parts: unknown): string {
    return createHash('sha256').update(JSON.stringify([STORE_FORMAT, this.fingerprint, kind, parts])).digest('hex');
  }

  /** Path of an entry. */
  path(kind: string, key: string): string {
    return join(this.dir, kind, key.slice(0, 1), key);
  }

  /** The payload stored under a key, checked against its hash; undefined when absent or discarded. */
  get(kind: string, key: string): Buffer | undefined {
    const file = this.path(kind, key);
    let st;
    try {
      st = lstatSync(file);
    } catch {
      this.counts.misses++;
      return undefined;
    }
    const read = st.isFile() ? readEntry(file, entryHash(kind, key)) : 'damaged';
    if (read === 'unavailable') {
      // Not readable now for a reason that says nothing of the entry (too many open files): a miss.
      this.counts.misses++;
      return undefined;
    }
    if (read === 'damaged') {
      this.discard(file);
      return undefined;
    }
    this.counts.hits++;
    // Marked as used for pruning, at most once a day.
    if (Date.now() - st.mtimeMs > DAY_MS) {
      try {
        const now = new Date();
        utimesSync(file, now, now);
      } catch {
        // a store that cannot be marked is pruned earlier: no harm
      }
    }
    return read;
  }

  /** Store a payload under a key (best effort: a store that cannot be written is not an error). */
  put(kind: string, key: string, payload: Uint8Array | string): void {
    const file = this.path(kind, key);
    const bytes = typeof payload === 'string' ? Buffer.from(payload, 'utf8') : payload;
    const header = `${MAGIC} ${STORE_FORMAT} ${entryHash(kind, key).update(bytes).digest('hex')} ${bytes.byteLength}\n`;
    const tmp = `${file}.tmp-${process.pid}-${Math.random().toString(36).slice(2)}`;
    try {
      const sub = join(file, '..');
      if (!this.made.has(sub)) {
        // The store folder itself readable by its owner only (a cache can hold unpublished results).
        makeFolders(this.dir, 0o700);
        makeFolders(sub);
        this.made.add(sub);
      }
      const fd = openSync(tmp, 'w');
      try {
        writeSync(fd, header);
        writeSync(fd, bytes);
      } finally {
        closeSync(fd);
      }
      renameSync(tmp, file);
    } catch {
      rmSync(tmp, { force: true });
    }
  }

  /** Remove what is at an entry's path (it is ours: the store folder is myofolio's) and count it. */
  private discard(file: string): void {
    this.counts.discarded.push(file);
    try {
      rmSync(file, { recursive: true, force: true });
    } catch {
      // left in place: it is discarded again next time, and a put renames over it
    }
  }

  /**
   * Remove entries not used (modification time) for CACHE.keepDays, if the store was not pruned
   * within CACHE.pruneEveryHours. Only files in the store's own layout (<kind>/<a>/<64 hex>, and
   * temporary files left by killed builds) are removed.
   */
  prune(nowMs: number = Date.now()): number {
    const mark = join(this.dir, PRUNED_MARK);
    try {
      if (nowMs - statSync(mark).mtimeMs < CACHE.pruneEveryHours * 3600 * 1000) return 0;
    } catch {
      // never pruned
    }
    let removed = 0;
    const cutoff = nowMs - CACHE.keepDays * DAY_MS;
    const list = (dir: string) => {
      try {
        return readdirSync(dir, { withFileTypes: true });
      } catch {
        return [];
      }
    };
    for (const kind of list(this.dir)) {
      if (!kind.isDirectory()) continue;
      for (const sub of list(join(this.dir, kind.name))) {
        if (!sub.isDirectory() || !/^[0-9a-f]$/.test(sub.name)) continue;
        for (const entry of list(join(this.dir, kind.name, sub.name))) {
          if (!/^[0-9a-f]{64}(\.tmp-\d+-[0-9a-z]+)?$/.test(entry.name) || !entry.name.startsWith(sub.name)) continue;
          const file = join(this.dir, kind.name, sub.name, entry.name);
          try {
            if (lstatSync(file).mtimeMs < cutoff) {
              rmSync(file, { force: true });
              removed++;
            }
          } catch {
            // gone meanwhile
          }
        }
      }
    }
    try {
      makeFolders(this.dir, 0o700);
      writeFileSync(mark, '');
    } catch {
      // pruned again next time
    }
    return removed;
  }
}

/** The hash of an entry's payload begins with its kind and key: another key's entry does not match. */
function entryHash(kind: string, key: string) {
  return createHash('sha256').update(`${kind}\0${key}\0`);
}

const AVAILABLE_LATER = new Set(['EMFILE', 'ENFILE', 'ENOMEM', 'EINTR', 'EAGAIN']);

/**
 * The payload of an entry file; 'damaged' when it is not a regular file (checked again on the
 * open descriptor, opened without following links and without blocking), cannot be read, or does
 * not match its header and hash; 'unavailable' when it cannot be opened for now (too many open
 * files), which says nothing about the entry. `hash`: the entry's kind and key, hashed so far.
 */
function readEntry(file: string, hash: ReturnType<typeof createHash>): Buffer | 'damaged' | 'unavailable' {
  let fd: number;
  try {
    fd = openSync(file, constants.O_RDONLY | (constants.O_NONBLOCK ?? 0) | (constants.O_NOFOLLOW ?? 0));
  } catch (err) {
    return AVAILABLE_LATER.has((err as NodeJS.ErrnoException).code ?? '') ? 'unavailable' : 'damaged';
  }
  try {
    const st = fstatSync(fd);
    if (!st.isFile()) return 'damaged';
    const head = Buffer.alloc(HEADER_MAX);
    const got = readSync(fd, head, 0, HEADER_MAX, 0);
    const end = head.subarray(0, got).indexOf(0x0a);
    if (end < 0) return 'damaged';
    const [magic, format, sum, length, ...rest] = head.subarray(0, end).toString('ascii').split(' ');
    if (magic !== MAGIC || format !== String(STORE_FORMAT) || rest.length > 0 || !/^[0-9a-f]{64}$/.test(sum ?? '') || !/^(0|[1-9]\d{0,9})$/.test(length ?? '')) return 'damaged';
    const size = Number(length);
    if (st.size !== end + 1 + size) return 'damaged';
    const payload = Buffer.alloc(size);
    for (let at = 0; at < size; ) {
      const n = readSync(fd, payload, at, size - at, end + 1 + at);
      if (n === 0) return 'damaged'; // shrank while read
      at += n;
    }
    if (hash.update(payload).digest('hex') !== sum) return 'damaged';
    return payload;
  } catch (err) {
    return AVAILABLE_LATER.has((err as NodeJS.ErrnoException).code ?? '') ? 'unavailable' : 'damaged';
  } finally {
    closeSync(fd);
  }
}
