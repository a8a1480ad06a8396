/**
 * The store: one content-addressed folder for what is costly to recompute (a module's units of
 * one batch, a file's reading, a chart's SVG), shared by every build of every study.
 *
 *   (kind, fingerprint, key parts) ──SHA-256──▶ <dir>/<kind>/<a>/<hash>   (<a>: the hash's first hex digit)
 *   entry file: 'myofolio-store 1 <SHA-256 of payload> <payload bytes>\n' + payload
 *
 * Every key includes the fingerprint of what computes the entries (src/pipeline/fingerprint.ts),
 * so an entry made by other code, schemas, templates or libraries is never found. Every entry is
 * checked on reading against the hash in its header: an entry that is not a regular file (a FIFO,
 * a device, a link), cannot be read, is truncated or has other bytes is discarded, counted and
 * recomputed by the caller; it is never served and never stops a build. Entries are written under
 * a temporary name and renamed, so a reader never sees half an entry. Entries not used for
 * CACHE.keepDays are removed (prune), at most once per CACHE.pruneEveryHours.
 */
import { createHash } from 'node:crypto';
import { closeSync, constants, fstatSync, lstatSync, mkdirSync, openSync, readFileSync, readdirSync, renameSync, rmSync, statSync, utimesSync, writeFileSync, writeSync } from 'node:fs';
import { homedir } from 'node:os';
import { isAbsolute, join, relative, resolve } from 'node:path';
import { CACHE } from '../defaults.js';

/** Version of the entry format and of the key layout; part of every key. */
const STORE_FORMAT = 1;
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

/**
 * The store folder for a build of `studyDir`: `requested` (default: defaultStoreDir()), unless it
 * is inside the study folder, which myofolio never writes into: then the default, with a note.
 * A default that is itself inside the study folder gives no store (false).
 */
export function storeDirFor(studyDir: string, requested?: string): { dir: string | false; note?: string } {
  const study = resolve(studyDir);
  const fallback = defaultStoreDir();
  if (requested !== undefined && !inside(resolve(requested), study)) return { dir: resolve(requested) };
  const note = requested !== undefined ? `the cache folder ${requested} is inside the study folder, which myofolio never writes into; the default cache folder is used instead.` : undefined;
  if (inside(resolve(fallback), study)) return { dir: false, note: 'the default cache folder is inside the study folder; this build uses no cache.' };
  return { dir: resolve(fallback), ...(note ? { note } : {}) };
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
    const payload = st.isFile() ? readEntry(file) : undefined;
    if (payload === undefined) {
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
    return payload;
  }

  /** Store a payload under a key (best effort: a store that cannot be written is not an error). */
  put(kind: string, key: string, payload: Uint8Array | string): void {
    const file = this.path(kind, key);
    const bytes = typeof payload === 'string' ? Buffer.from(payload, 'utf8') : payload;
    const header = `${MAGIC} ${STORE_FORMAT} ${createHash('sha256').update(bytes).digest('hex')} ${bytes.byteLength}\n`;
    const tmp = `${file}.tmp-${process.pid}-${Math.random().toString(36).slice(2)}`;
    try {
      const sub = join(file, '..');
      if (!this.made.has(sub)) {
        mkdirSync(sub, { recursive: true });
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
      mkdirSync(this.dir, { recursive: true });
      writeFileSync(mark, '');
    } catch {
      // pruned again next time
    }
    return removed;
  }
}

/**
 * The payload of an entry file, or undefined when it is not a regular file (checked again on the
 * open descriptor, opened without following links and without blocking), cannot be read, or
 * does not match its header.
 */
function readEntry(file: string): Buffer | undefined {
  let fd: number;
  try {
    fd = openSync(file, constants.O_RDONLY | (constants.O_NONBLOCK ?? 0) | (constants.O_NOFOLLOW ?? 0));
  } catch {
    return undefined;
  }
  try {
    if (!fstatSync(fd).isFile()) return undefined;
    const bytes = readFileSync(fd);
    const end = bytes.subarray(0, HEADER_MAX).indexOf(0x0a);
    if (end < 0) return undefined;
    const [magic, format, hash, length, ...rest] = bytes.subarray(0, end).toString('ascii').split(' ');
    if (magic !== MAGIC || format !== String(STORE_FORMAT) || rest.length > 0 || !/^[0-9a-f]{64}$/.test(hash ?? '')) return undefined;
    const payload = bytes.subarray(end + 1);
    if (String(payload.byteLength) !== length) return undefined;
    if (createHash('sha256').update(payload).digest('hex') !== hash) return undefined;
    return payload;
  } catch {
    return undefined;
  } finally {
    closeSync(fd);
  }
}
