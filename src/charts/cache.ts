/**
 * Content-addressed SVG cache on disk.
 *
 *   (renderer id, chartKey(spec), id key, title, description) ──SHA-256──▶ <dir>/<ab>/<hash>.svg
 *
 * The entry name is a hash of everything renderSvg's output depends on, so an entry never
 * goes stale: a changed spec, title or renderer version simply gives a new name. Entries are
 * written to a temporary name and renamed, so concurrent builds never read half a file.
 * Never point the cache inside a study folder or an output folder that gets swapped.
 */
import { createHash } from 'node:crypto';
import { closeSync, copyFileSync, fstatSync, mkdirSync, openSync, readFileSync, readSync, renameSync, statSync, writeFileSync, writeSync, writevSync } from 'node:fs';
import { homedir } from 'node:os';
import { join, resolve } from 'node:path';
import type { ChartSpec } from '../assays/types.js';
import { markUsed } from '../build/cache-prune.js';
import { CACHE } from '../defaults.js';
import { codeFingerprint } from '../fingerprint.js';
import { RENDERER_ID, chartKey, type RenderOptions } from './render.js';

/**
 * Default cache folder: the user's cache directory ($XDG_CACHE_HOME, else ~/.cache) under
 * myofolio/charts, so that a build never writes into the folder it is run from (which may be a
 * study folder). Entries are never stale (content-addressed); those unused for 30 days are pruned
 * (src/build/cache-prune.ts), and deleting the folder is always safe.
 */
export const DEFAULT_CHART_CACHE = join(process.env.XDG_CACHE_HOME || join(homedir(), '.cache'), 'myofolio', 'charts');

/**
 * Cache entry name for one render: SHA-256 (hex) over the renderer id, the render options that
 * reach the SVG (id key, title, description) and the spec's JSON. The spec is hashed as
 * JSON.stringify writes it (key order as built), not in chartKey's sorted form: specs come from
 * deterministic code, so equal charts give equal text, and an unequal text can only cost a
 * re-render, never a wrong SVG. Sorting keys cost ~3× more than the hash on large specs.
 */
export function cacheEntryKey(spec: ChartSpec, options: RenderOptions = {}): string {
  return createHash('sha256')
    .update(JSON.stringify([RENDERER_ID, options.key ?? chartKey(spec), options.title ?? null, options.description ?? null]))
    .update('\n')
    .update(JSON.stringify(spec))
    .digest('hex');
}

export class ChartCache {
  readonly dir: string;
  hits = 0;
  misses = 0;
  private made = new Set<string>();
  private scratch = Buffer.alloc(0);
  /** Modification time (ms) of the page readPage read last. */
  private pageModified = 0;

  constructor(dir: string = DEFAULT_CHART_CACHE) {
    this.dir = resolve(dir);
  }

  private file(key: string, ext = 'svg'): string {
    return join(this.dir, key.slice(0, 2), `${key}.${ext}`);
  }

  /** The cached SVG (or other text by extension), or undefined (a missing or unreadable entry counts as a miss). */
  get(key: string, ext = 'svg'): string | undefined {
    try {
      const file = this.file(key, ext);
      const text = readFileSync(file, 'utf8');
      markUsed(file);
      this.hits++;
      return text;
    } catch {
      this.misses++;
      return undefined;
    }
  }

  /**
   * Write a kept page to `dest` with `stamp` written over its placeholder and each slot filled
   * (see keepPage). A page without slots is copied by the kernel and patched in place, with no
   * decoding. False when not kept (or kept with a slot `slots` has no fill for).
   * `blocks`: the chart-block entries (blockEntryKey) the page shows, marked as used with it.
   */
  fetchPage(key: string, dest: string, stamp: Uint8Array, blocks: readonly string[] = [], slots?: PageSlots): boolean {
    let marks: PageMarks;
    let recent = false;
    try {
      marks = JSON.parse(readFileSync(this.file(key, 'offsets.json'), 'utf8')) as PageMarks;
      if (!Array.isArray(marks?.stamp) || !Array.isArray(marks?.slots)) throw new Error('not a page entry');
      if (marks.slots.some(([, , n]) => n >= (slots?.fills.length ?? 0))) throw new Error('a slot without its fill');
      let modified: number;
      if (marks.slots.length === 0) {
        modified = statSync(this.file(key, 'html')).mtimeMs;
        copyFileSync(this.file(key, 'html'), dest);
        patch(dest, marks.stamp, stamp);
      } else {
        writeFilled(dest, this.readPage(this.file(key, 'html')), marks, stamp, slots as PageSlots);
        modified = this.pageModified;
      }
      // The page and its blocks are marked together: if the page was, lately, so were they.
      recent = Date.now() - modified < CACHE.markAgainHours * 3600 * 1000;
    } catch {
      this.misses++;
      return false;
    }
    this.hits++;
    if (recent) return true;
    markUsed(this.file(key, 'offsets.json'));
    markUsed(this.file(key, 'html'));
    // The page's chart blocks are not read, but would be if it changed: they are in use too.
    for (const b of blocks) markUsed(this.file(b, 'json'));
    return true;
  }

  /**
   * Keep the page at `file`, which holds `placeholder` where each build writes its own text (of
   * the same length) and slots (`slots.stem`, a number n, '~') where each build writes its n-th
   * fill; then write `stamp` and the fills into `file`. Best effort, as set.
   */
  keepPage(key: string, file: string, placeholder: Uint8Array, stamp: Uint8Array, slots?: PageSlots): void {
    const bytes = this.readPage(file);
    const marks: PageMarks = { stamp: [], slots: [] };
    for (let at = bytes.indexOf(placeholder); at >= 0; at = bytes.indexOf(placeholder, at + placeholder.length)) marks.stamp.push(at);
    if (slots) {
      const stem = slots.stem;
      for (let at = bytes.indexOf(stem); at >= 0; at = bytes.indexOf(stem, at + 1)) {
        let end = at + stem.length;
        let n = 0;
        while (end < bytes.length && bytes[end] >= 0x30 && bytes[end] <= 0x39) n = n * 10 + bytes[end++] - 0x30;
        // Not a slot (no digits, or no closing '~'): left as it is.
        if (end === at + stem.length || bytes[end] !== 0x7e) continue;
        marks.slots.push([at, end + 1 - at, n]);
      }
    }
    // The page first, its marks last: a marks entry always has its page.
    this.set(key, bytes, 'html');
    this.set(key, JSON.stringify(marks), 'offsets.json');
    if (marks.slots.length === 0) patch(file, marks.stamp, stamp);
    else writeFilled(file, bytes, marks, stamp, slots as PageSlots);
  }

  /** A kept page's bytes, read into a buffer reused from page to page (valid until the next call). */
  private readPage(file: string): Buffer {
    const fd = openSync(file, 'r');
    try {
      const st = fstatSync(fd);
      const size = st.size;
      this.pageModified = st.mtimeMs;
      if (this.scratch.length < size) this.scratch = Buffer.allocUnsafe(Math.ceil(size * 1.25));
      let got = 0;
      while (got < size) {
        const n = readSync(fd, this.scratch, got, size - got, got);
        if (n === 0) break;
        got += n;
      }
      return this.scratch.subarray(0, got);
    } finally {
      closeSync(fd);
    }
  }

  /** Store an SVG (or other text by extension; best effort: a cache that cannot be written only costs time). */
  set(key: string, text: string | Uint8Array, ext = 'svg'): void {
    const sub = join(this.dir, key.slice(0, 2));
    try {
      if (!this.made.has(sub)) {
        mkdirSync(sub, { recursive: true });
        this.made.add(sub);
      }
      const tmp = `${this.file(key, ext)}.${process.pid}.tmp`;
      writeFileSync(tmp, text);
      renameSync(tmp, this.file(key, ext));
    } catch {
      // read-only or full disk: carry on without caching
    }
  }
}

/** Slots of a kept page: the bytes each starts with, and the text (as it goes into the HTML) of slot n. */
export interface PageSlots {
  stem: Uint8Array;
  fills: readonly string[];
}

/** Where a kept page takes the build time (offsets of the placeholder) and its fills ([offset, length, n]). */
interface PageMarks {
  stamp: number[];
  slots: Array<[number, number, number]>;
}

/**
 * Write a kept page to `file` with the stamp over each placeholder and each slot replaced by its
 * fill: its pieces are written as they stand (one writev), never joined into a new buffer.
 */
function writeFilled(file: string, bytes: Buffer, marks: PageMarks, stamp: Uint8Array, slots: PageSlots): void {
  const edits: Array<[number, number, Uint8Array]> = [
    ...marks.stamp.map((at): [number, number, Uint8Array] => [at, stamp.length, stamp]),
    ...marks.slots.map(([at, length, n]): [number, number, Uint8Array] => [at, length, Buffer.from(slots.fills[n], 'utf8')]),
  ].sort((a, b) => a[0] - b[0]);
  const parts: Uint8Array[] = [];
  let from = 0;
  for (const [at, length, bytesIn] of edits) {
    parts.push(bytes.subarray(from, at), bytesIn);
    from = at + length;
  }
  parts.push(bytes.subarray(from));
  const fd = openSync(file, 'w');
  try {
    const total = parts.reduce((n, p) => n + p.length, 0);
    const written = writevSync(fd, parts);
    // A short write (rare on a regular file): the rest in one buffer.
    if (written < total) {
      const rest = Buffer.concat(parts).subarray(written);
      for (let at = 0; at < rest.length; at += writeSync(fd, rest, at));
    }
  } finally {
    closeSync(fd);
  }
}

/** Write `bytes` at each offset of a file, in place. */
function patch(file: string, offsets: readonly number[], bytes: Uint8Array): void {
  if (offsets.length === 0) return;
  const fd = openSync(file, 'r+');
  try {
    for (const at of offsets) writeSync(fd, bytes, 0, bytes.length, at);
  } finally {
    closeSync(fd);
  }
}

/**
 * Entry name of a chart block (SVG, description and numbers table of one assay chart) found by
 * the chart's input key instead of its spec: SHA-256 over the renderer id, the code fingerprint
 * (the spec is made by code, so other code must not be served this entry) and the caller's key
 * parts (input key, id key, title).
 */
export function blockEntryKey(parts: readonly string[]): string {
  return createHash('sha256').update(JSON.stringify([RENDERER_ID, codeFingerprint(), ...parts])).digest('hex');
}
