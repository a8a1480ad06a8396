/**
 * Cache of unit analyses per module and batch (or per unit, for a module whose units are
 * independent), so that a rebuild after one batch changed re-fits only that batch's units of the
 * assays whose files changed, and after one unit changed only that unit where it can.
 *
 *   Study ──each module's rows split by group (a batch; a unit, for AssayModule.independentUnits)──▶
 *         per (module, group): context = (code fingerprint, module ids, study settings), then two
 *         keys (SHA-256):
 *           file key    — context, and for each file holding the group's rows its path, SHA-256,
 *                         settings, manifest entry, the variant labels it uses (with their
 *                         variants: InputFile.variantLabels) and row count of the group
 *                         (cheap: unchanged files read the same way give unchanged rows)
 *           content key — context, how those files were read, and the group's rows in order
 *                         (exact; tried when the file key misses)
 *         ──hit──▶ UnitResult[] from the file of its module and batch, <dir>/<ab>/s<hash>.bin
 *                  (v8 serialisation: exact numbers, NaN kept; each plot as its JSON text,
 *                  parsed only if read: see StoredUnit and openSlot)
 *         ──miss──▶ analyseUnitsParallel on a study holding only the missed groups ──▶ stored
 *         ──merge, in the serial path's order──▶ UnitResult[]
 *
 * Files left out of a study (Study.omitted: their digests stand in for their rows) are keyed by
 * their digests' rows per unit; a group they hold that is not cached by its files sends
 * back `needRows` instead of units, and the caller loads those files and asks again. Keeping
 * independent units one by one matters there: a batch's units are often spread over many files,
 * and a changed unit would otherwise have every file of its batch parsed again.
 *
 * Why per batch: units are independent given their batch (src/analysis/parallel.ts; NADH rates
 * subtract the actin-only wells of their own batch), and the modules read nothing else of the
 * study than its settings, its files' settings and its rows. Motility, force and turnover units
 * read only their own rows (independentUnits); a test checks each such module's units against
 * those it gives for each unit's rows alone. The code fingerprint
 * (src/fingerprint.ts) hashes every source file under src/ and package-lock.json, so a changed
 * analysis can never be served from an older cache.
 * The result equals analyseUnitsParallel(study) (tested). Files read are marked as used, and those
 * unused for 30 days are pruned (src/build/cache-prune.ts).
 */
import { createHash } from 'node:crypto';
import { closeSync, fstatSync, mkdirSync, openSync, readFileSync, readSync, renameSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { deserialize, serialize } from 'node:v8';
import { type ParallelOptions, activeModules, analyseUnitsParallel, serialOrder } from '../analysis/parallel.js';
import { groupBy } from '../assays/assay-common.js';
import { ASSAYS } from '../assays/registry.js';
import type { AssayModule } from '../assays/types.js';
import { DEFAULT_CHART_CACHE } from '../charts/cache.js';
import type { UnitResult } from '../results/types.js';
import { type TextSource, lazyJsonObject, rawJsonOf } from '../results/raw-json.js';
import { rememberUnitDigest, unitDigest } from '../results/unit-digest.js';
import type { FileDigest, InputKind, RowBase, Study } from '../study/types.js';
import { markUsed } from './cache-prune.js';
import { codeFingerprint } from '../fingerprint.js';
import type { LoadReuse, ParsedDigest } from '../study/load.js';
import type { KnownFiles } from '../study/read-folder.js';

/** Default folder: beside the chart cache, in the user's cache directory. */
export const DEFAULT_ANALYSIS_CACHE = join(DEFAULT_CHART_CACHE, '..', 'analysis');

/** Version of the entry format; bump when what is stored changes. */
const ENTRY_VERSION = 7;

export interface CachedAnalysisOptions extends ParallelOptions {
  /** Cache folder, or false for none (then this is analyseUnitsParallel). */
  cacheDir?: string | false;
  /** Rows to analyse below which no worker threads are started (starting them costs more than they save). Default 0. */
  minRowsForWorkers?: number;
}

export interface CachedAnalysis {
  units: UnitResult[];
  /**
   * Files left out of the study (Study.omitted) whose rows are needed after all, because a batch
   * they hold is not in the cache: load them and call again. Nothing was analysed then.
   */
  needRows?: string[];
  /** Cache entries (see groupOf: one module's units of one batch, or one unit) analysed now and taken from the cache. */
  batches: { analysed: number; cached: number };
}

/**
 * What one cache entry holds of a module's units, as a key of (variant, unit, batch): one unit of
 * a module whose units are independent (AssayModule.independentUnits), else a whole batch.
 */
function groupOf(m: AssayModule): (variant: string, unit: string, batch: string) => string {
  return m.independentUnits ? (variant, unit, batch) => JSON.stringify([batch, variant, unit]) : (_variant, _unit, batch) => batch;
}

/** groupOf for rows, remembering the last row's group (files are written unit by unit, so most rows repeat it). */
function rowGroupOf(m: AssayModule): (r: RowBase) => string {
  const group = groupOf(m);
  let last: RowBase | undefined;
  let lastGroup = '';
  return (r) => {
    if (!last || r.variant !== last.variant || r.unit !== last.unit || r.batch !== last.batch) lastGroup = group(r.variant, r.unit, r.batch);
    last = r;
    return lastGroup;
  };
}

/**
 * Units of every active module, from the cache where a batch's inputs are unchanged.
 * Same result, in the same order, as analyseUnitsParallel(study, modules), for a study as
 * loadStudy gives it: the file key trusts that rows with an unchanged file SHA-256 are unchanged.
 */
export async function analyseUnitsCached(study: Study, modules: readonly AssayModule[] = ASSAYS, options: CachedAnalysisOptions = {}): Promise<CachedAnalysis> {
  const active = activeModules(study, modules);
  const omitted = study.omitted ?? new Map<string, FileDigest>();
  // Only registry modules are cached (their code is under src/, in the fingerprint).
  if (options.cacheDir === false || active.some((m) => !ASSAYS.includes(m))) {
    if (omitted.size > 0) return { units: [], needRows: [...omitted.keys()], batches: { analysed: 0, cached: 0 } };
    const total = Object.values(study.rows).reduce((n, list) => n + (list?.length ?? 0), 0);
    const units = await analyseUnitsParallel(study, modules, total >= (options.minRowsForWorkers ?? 0) ? options : { ...options, workers: 0 });
    return { units, batches: { analysed: new Set(units.map((u) => `${u.assay}\0${u.batch}`)).size, cached: 0 } };
  }
  const dir = resolve(options.cacheDir ?? DEFAULT_ANALYSIS_CACHE);
  const context = JSON.stringify([ENTRY_VERSION, codeFingerprint(), active.map((m) => m.id), study.settings]);
  // How the loader read each file: its SHA-256, its settings and its manifest entry as given
  // (declared units, decimal mark, missing-value codes, cross-sections…). Only the files that
  // hold a group's rows enter its keys, so adding a file to the study keeps the other entries.
  const rawEntries = new Map<string, string>();
  for (const e of ((study.manifestRaw as { files?: unknown } | undefined)?.files ?? []) as unknown[]) {
    const path = (e as { path?: unknown } | null)?.path;
    if (typeof path === 'string' && !rawEntries.has(path)) rawEntries.set(path, JSON.stringify(e));
  }
  // With each file, the variant labels the loader resolved its rows with: those the file uses
  // (InputFile.variantLabels), or all of the study's for a file read without that record.
  let allLabels: string | undefined;
  const labelsOf = (f: Study['files'][number]) => f.variantLabels ?? (allLabels ??= JSON.stringify(study.variants.map((v) => [v.id, v.label, v.gene, v.isWT])));
  const read = new Map(study.files.map((f) => [f.path, { sha256: f.sha256, how: JSON.stringify([f.kind, f.settings, rawEntries.get(f.path) ?? null]), labels: labelsOf(f) }]));

  const found: UnitResult[][] = [];
  const missed = new Map<AssayModule, Map<string, { slot: SlotWork; keys: string[] }>>(); // module → group → its slot and the keys to store its units under
  const needRows = new Set<string>();
  const slots: SlotWork[] = [];
  let entries = 0;
  for (const m of active) {
    const kinds = m.inputs;
    const rowGroup = rowGroupOf(m);
    const group = groupOf(m);
    // The module's rows of each group, by kind, and the groups of each batch.
    const byGroup = new Map<string, Partial<Record<InputKind, RowBase[]>>>();
    const groupsOf = new Map<string, Set<string>>();
    const inBatch = (batch: string, g: string) => {
      let groups = groupsOf.get(batch);
      if (!groups) groupsOf.set(batch, (groups = new Set()));
      groups.add(g);
    };
    for (const kind of kinds) {
      for (const r of (study.rows[kind] ?? []) as RowBase[]) {
        const g = rowGroup(r);
        let b = byGroup.get(g);
        if (!b) {
          byGroup.set(g, (b = {}));
          inBatch(r.batch, g);
        }
        (b[kind] ??= []).push(r);
      }
    }
    // Rows of each group per file: counted in the rows read, and taken from the digests of the
    // files left out (whose groups are in no row here).
    const filesOf = new Map<string, Map<string, number>>();
    const addRows = (g: string, path: string, n: number) => {
      let perFile = filesOf.get(g);
      if (!perFile) filesOf.set(g, (perFile = new Map()));
      perFile.set(path, (perFile.get(path) ?? 0) + n);
    };
    for (const [g, rows] of byGroup) for (const kind of kinds) for (const r of rows[kind] ?? []) addRows(g, r.at.file, 1);
    for (const [path, d] of omitted) {
      if (!kinds.includes(d.kind)) continue;
      for (const [variant, unit, batch, n] of d.unitRows) {
        const g = group(variant, unit, batch);
        inBatch(batch, g);
        addRows(g, path, n);
      }
    }
    // Hashed once per module; each key continues a copy of it.
    const moduleHash = createHash('sha256').update(context).update('\0').update(m.id);
    const filesIn = (g: string) => [...(filesOf.get(g) as Map<string, number>)].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    // File key: the files the group's rows come from (path, SHA-256 of the bytes, how they were
    // read, the variant labels they use, rows of the group in each). Unchanged files read the
    // same way give unchanged rows, so this cheap key is tried first; when a file changed, the
    // content key decides.
    const fileKey = (g: string) => {
      const files = filesIn(g).map(([path, n]) => {
        const f = read.get(path);
        return [path, f?.sha256 ?? null, f?.how ?? null, f?.labels ?? null, n];
      });
      if (files.some((f) => f[1] === null)) return undefined;
      return `f${moduleHash.copy().update('\0').update(JSON.stringify([g, files])).digest('hex')}`;
    };
    // Content key: the group's rows themselves and how their files were read (exact, but
    // serialising every row costs seconds in a large study).
    const contentKey = (g: string, rows: Partial<Record<InputKind, RowBase[]>>) => {
      const hash = moduleHash.copy().update('\0').update(JSON.stringify([g, filesIn(g).map(([path]) => [path, read.get(path)?.how ?? null])]));
      for (const kind of kinds) hash.update('\0').update(kind).update('\0').update(JSON.stringify(rows[kind] ?? []));
      return `c${hash.digest('hex')}`;
    };
    for (const [batch, groups] of groupsOf) {
      const slot = openSlot(dir, context, m.id, batch);
      slots.push(slot);
      for (const g of groups) {
        entries++;
        const byFiles = fileKey(g);
        const hit = byFiles === undefined ? undefined : slot.take(byFiles);
        if (hit) {
          found.push(hit);
          continue;
        }
        // Not cached by its files: its rows are needed, including those of files left out.
        const left = [...(filesOf.get(g) as Map<string, number>).keys()].filter((p) => omitted.has(p));
        if (left.length > 0) {
          left.forEach((p) => needRows.add(p));
          continue;
        }
        const byContent = contentKey(g, byGroup.get(g) as Partial<Record<InputKind, RowBase[]>>);
        const contentHit = slot.take(byContent, byFiles);
        if (contentHit) {
          found.push(contentHit);
          continue;
        }
        let mine = missed.get(m);
        if (!mine) missed.set(m, (mine = new Map()));
        mine.set(g, { slot, keys: byFiles ? [byContent, byFiles] : [byContent] });
      }
    }
  }
  if (needRows.size > 0) return { units: [], needRows: [...needRows], batches: { analysed: 0, cached: 0 } };

  const fresh: UnitResult[] = [];
  let analysed = 0;
  if (missed.size > 0) {
    // One run over the missed groups of every module: each kind gets the rows of the groups its
    // module missed (the registry's modules share no kind; if some did, units of groups a module
    // did not miss are dropped below).
    const wanted = new Map<InputKind, Array<{ rowGroup: (r: RowBase) => string; groups: Map<string, unknown> }>>();
    for (const [m, groups] of missed) {
      for (const kind of m.inputs) {
        let wants = wanted.get(kind);
        if (!wants) wanted.set(kind, (wants = []));
        wants.push({ rowGroup: rowGroupOf(m), groups });
      }
    }
    const rows: Partial<Record<InputKind, RowBase[]>> = {};
    for (const [kind, wants] of wanted) {
      const list = ((study.rows[kind] ?? []) as RowBase[]).filter((r) => wants.some((w) => w.groups.has(w.rowGroup(r))));
      if (list.length > 0) rows[kind] = list;
    }
    const count = Object.values(rows).reduce((n, list) => n + list.length, 0);
    const { omitted: _left, ...whole } = study;
    const units = await analyseUnitsParallel({ ...whole, rows: rows as Study['rows'] }, [...missed.keys()], count >= (options.minRowsForWorkers ?? 0) ? options : { ...options, workers: 0 });
    for (const [m, groups] of missed) {
      const group = groupOf(m);
      const perGroup = groupBy(
        units.filter((u) => u.assay === m.id && groups.has(group(u.variant, u.unit, u.batch))),
        (u) => group(u.variant, u.unit, u.batch),
      );
      for (const [g, { slot, keys }] of groups) {
        const mine = perGroup.get(g) ?? [];
        fresh.push(...mine);
        analysed++;
        // A group whose rows give no unit (e.g. only NADH actin-only wells) is stored empty.
        slot.put(keys, mine);
      }
    }
  }
  for (const slot of slots) slot.save();
  const all = [...found.flat(), ...fresh];
  const units = active.flatMap((m) => serialOrder(study, m, all.filter((u) => u.assay === m.id)));
  return { units, batches: { analysed, cached: entries - analysed } };
}

/** One cache file's work in one run: the entries found and made now, saved once at the end. */
interface SlotWork {
  /** The units stored under `key`, if any, marked as used (and to be stored under `alsoKey` too). */
  take(key: string, alsoKey?: string): UnitResult[] | undefined;
  /** Units made now, to be stored under every key given. */
  put(keys: string[], units: UnitResult[]): void;
  /** Write the file if anything in it changed (best effort). */
  save(): void;
}

/**
 * Stored form of a slot file: every entry's units with their digests (src/results/unit-digest.ts),
 * and the keys that lead to each. On disk: the byte length of the v8-serialised SlotFile (uint32,
 * little-endian), the SlotFile, then the JSON (UTF-8) of the units' lazy parts one after another (see StoredUnit).
 */
interface SlotFile {
  keys: Array<[key: string, entry: number]>;
  entries: SlotEntry[];
}

interface SlotEntry {
  units: StoredUnit[];
  digests: string[];
}

/** Parts of a unit kept as JSON text in the cache file: a rebuild reads none of them, except the plots of the charts it draws. */
const LAZY_FIELDS = ['plot', 'fit', 'metricSe'] as const;
type LazyField = (typeof LAZY_FIELDS)[number];

/**
 * A unit as stored: each field named in `lazy` holds [start, length], the place of its JSON text
 * in the file's JSON bytes; other fields hold their values. A part whose JSON would hold a null
 * is kept as a value (JSON writes NaN, ±Infinity and undefined array elements as null, so that
 * text would not give the value back), as is anything not a plain object. A rebuild reads every
 * unit of the study but draws the charts of a few variants only: a part left as bytes is parsed
 * only if read, and results.json copies its bytes (src/results/raw-json.ts).
 */
type StoredUnit = Omit<UnitResult, LazyField> & { [F in LazyField]?: UnitResult[F] | [start: number, length: number] } & { lazy?: LazyField[] };

/** Bytes of the file's header length field. */
const HEADER_LENGTH_BYTES = 4;

/** Bytes of a slot file's texts read at once by a peek (see SlotTexts.peek). */
const TEXT_WINDOW_BYTES = 1 << 18;
/**
 * Windows of texts kept, of the files read most recently. results.json asks for units in results
 * order, which may go back and forth between a few files (a variant's units in several batches):
 * with one window, each switch read a window again.
 */
const TEXT_WINDOWS = 8;
/** Reads of slot texts by peeks in this thread, and their bytes (for tests and profiling). */
export const slotTextReads = { reads: 0, bytes: 0 };

/** One buffer, reused, for slot headers. */
let headerScratch = Buffer.allocUnsafe(1 << 16);
function headerBuffer(bytes: number): Buffer {
  if (headerScratch.length < bytes) headerScratch = Buffer.allocUnsafe(Math.max(bytes, headerScratch.length * 2));
  return headerScratch;
}

/** Bytes start..end of the texts of `of`, at the start of `bytes`. */
interface TextWindow {
  of: SlotTexts | undefined;
  start: number;
  end: number;
  bytes: Buffer;
}
/** Windows, least recently used first (peeks are used before the next: TextSource). */
const textWindows: TextWindow[] = [];

function readFully(fd: number, into: Buffer, length: number, position: number): void {
  for (let at = 0; at < length; ) {
    const n = readSync(fd, into, at, length - at, position + at);
    if (n === 0) throw new Error('short read');
    at += n;
  }
}

/**
 * Slot files kept open at most (see SlotTexts); the texts of more are read into memory. Well
 * under the usual limit of open files (often 1,024), which the rest of the build shares.
 */
const OPEN_SLOT_FILES_MAX = 256;
let openSlotFiles = 0;

/** Closes the file of a SlotTexts nobody holds any more. */
const closeWhenDropped = new FinalizationRegistry<number>((fd) => {
  openSlotFiles--;
  try {
    closeSync(fd);
  } catch {
    // already closed
  }
});

/**
 * The JSON texts of a slot file's lazy parts, left in the file and read when wanted: a rebuild
 * reads every unit of the study but parses the parts of a few, and results.json copies the rest
 * through one reused buffer. Holding them in memory instead meant 52 of the 65 MB of a
 * 1,000-variant rebuild's cache reads landing in new memory (a page fault per 4 KB: about 15 µs
 * each on the development machine), and collecting them.
 *
 * The file stays open for as long as its units may be read (it is closed when this object is
 * collected), so the bytes read are those of the file the header came from even if the file is
 * replaced meanwhile: by this build (which reads the texts into memory first, `load`), by another
 * build using the same cache folder, or by pruning. Beyond OPEN_SLOT_FILES_MAX open files, texts
 * are read into memory at once instead.
 */
class SlotTexts implements TextSource {
  private memory: Buffer | undefined;
  private fd: number | undefined;

  /** Texts at `base`..`base + length` of the open file `fd`, which this object now owns. */
  constructor(fd: number, private readonly base: number, readonly length: number) {
    this.fd = fd;
    openSlotFiles++;
    closeWhenDropped.register(this, fd, this);
  }

  peek(start: number, end: number): Uint8Array {
    if (this.memory) return this.memory.subarray(start, end);
    // Units are asked for mostly in the order of their files, so the texts that follow are read
    // with this one: one read per TEXT_WINDOW_BYTES of a file instead of one per part.
    let at = textWindows.length - 1;
    while (at >= 0 && !(textWindows[at].of === this && start >= textWindows[at].start && end <= textWindows[at].end)) at--;
    let w: TextWindow;
    if (at >= 0) w = textWindows.splice(at, 1)[0];
    else {
      w = textWindows.length < TEXT_WINDOWS ? { of: undefined, start: 0, end: 0, bytes: Buffer.allocUnsafe(TEXT_WINDOW_BYTES) } : (textWindows.shift() as TextWindow);
      const to = Math.min(this.length, Math.max(end, start + TEXT_WINDOW_BYTES));
      if (w.bytes.length < to - start) w.bytes = Buffer.allocUnsafe(to - start);
      w.of = undefined;
      readFully(this.fd as number, w.bytes, to - start, this.base + start);
      slotTextReads.reads++;
      slotTextReads.bytes += to - start;
      w.of = this;
      w.start = start;
      w.end = to;
    }
    textWindows.push(w);
    return w.bytes.subarray(start - w.start, end - w.start);
  }

  /** Every text, in memory from now on; the file is closed. */
  load(): Buffer {
    if (!this.memory) {
      const all = Buffer.allocUnsafe(this.length);
      readFully(this.fd as number, all, this.length, this.base);
      this.memory = all;
      closeWhenDropped.unregister(this);
      closeSync(this.fd as number);
      openSlotFiles--;
      this.fd = undefined;
    }
    return this.memory;
  }
}

/** A slot file's header and texts, or undefined when it is not one (missing, unreadable, of an older layout, or with JSON text out of range). */
function readSlot(path: string): { file: SlotFile; texts: SlotTexts } | undefined {
  let fd: number | undefined;
  try {
    fd = openSync(path, 'r');
    const size = fstatSync(fd).size;
    if (size < HEADER_LENGTH_BYTES) return undefined;
    readFully(fd, headerBuffer(HEADER_LENGTH_BYTES), HEADER_LENGTH_BYTES, 0);
    const n = headerScratch.readUInt32LE(0);
    const end = HEADER_LENGTH_BYTES + n;
    if (end > size) return undefined;
    const header = headerBuffer(n);
    readFully(fd, header, n, HEADER_LENGTH_BYTES);
    const file = deserialize(header.subarray(0, n)) as SlotFile;
    if (!Array.isArray(file?.keys) || !Array.isArray(file?.entries)) return undefined;
    const textBytes = size - end;
    for (const e of file.entries) {
      for (const u of Array.isArray(e?.units) ? e.units : []) {
        if (u?.lazy === undefined) continue;
        if (!Array.isArray(u.lazy) || !u.lazy.every((f) => (LAZY_FIELDS as readonly string[]).includes(f))) return undefined;
        for (const field of u.lazy) {
          const at = u[field];
          const [start, length] = Array.isArray(at) ? at : [NaN, NaN];
          if (!Number.isInteger(start) || !Number.isInteger(length) || start < 0 || length < 0 || start + length > textBytes) return undefined;
        }
      }
    }
    const texts = new SlotTexts(fd, end, textBytes);
    fd = undefined;
    if (openSlotFiles > OPEN_SLOT_FILES_MAX) texts.load();
    return { file, texts };
  } catch {
    return undefined;
  } finally {
    if (fd !== undefined) closeSync(fd);
  }
}

/** JSON bytes of a unit's part, or undefined when it must stay a value (see StoredUnit). */
function lazyBytes(value: unknown): Uint8Array | undefined {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) return undefined;
  const kept = rawJsonOf(value);
  if (kept) return kept;
  const proto = Object.getPrototypeOf(value) as unknown;
  if (proto !== Object.prototype && proto !== null) return undefined;
  const text = JSON.stringify(value);
  return text.includes('null') ? undefined : Buffer.from(text, 'utf8');
}

/** Write a slot file: units made now (UnitResult) get the JSON of their lazy parts written, stored ones have theirs copied from `oldTexts`. */
function writeSlot(path: string, entries: Array<{ keys: Iterable<string>; units: Array<StoredUnit | UnitResult>; digests: string[]; stored: boolean }>, oldTexts: Buffer | undefined): void {
  const out: SlotFile = { keys: [], entries: [] };
  const chunks: Uint8Array[] = [];
  let offset = 0;
  const place = (bytes: Uint8Array): [number, number] => {
    chunks.push(bytes);
    offset += bytes.byteLength;
    return [offset - bytes.byteLength, bytes.byteLength];
  };
  const storedForm = (u: StoredUnit | UnitResult, stored: boolean): StoredUnit => {
    if (stored) {
      const s = u as StoredUnit;
      if (!s.lazy || !oldTexts) return s;
      const copy: StoredUnit = { ...s };
      for (const field of s.lazy) {
        const [start, length] = s[field] as [number, number];
        copy[field] = place(oldTexts.subarray(start, start + length));
      }
      return copy;
    }
    // Each part's value is replaced where it stands, so the unit's keys keep their order. Parts
    // are stored in that order too, the order results.json reads them in: a window read for the
    // first then holds the others (SlotTexts.peek).
    const copy: StoredUnit = { ...(u as UnitResult) };
    const lazy: LazyField[] = [];
    for (const field of Object.keys(u).filter((k): k is LazyField => (LAZY_FIELDS as readonly string[]).includes(k))) {
      const bytes = lazyBytes((u as UnitResult)[field]);
      if (!bytes) continue;
      copy[field] = place(bytes);
      lazy.push(field);
    }
    if (lazy.length > 0) copy.lazy = lazy;
    return copy;
  };
  for (const e of entries) {
    for (const k of e.keys) out.keys.push([k, out.entries.length]);
    out.entries.push({ units: e.units.map((u) => storedForm(u, e.stored)), digests: e.digests });
  }
  const header = serialize(out);
  const length = Buffer.alloc(HEADER_LENGTH_BYTES);
  length.writeUInt32LE(header.length, 0);
  storeText(path, Buffer.concat([length, header, ...chunks]));
}

/** A stored unit as a UnitResult: its parts kept as JSON are read from `texts` when first read. */
function unitFromStored(s: StoredUnit, texts: SlotTexts): UnitResult {
  if (!s.lazy) return s as UnitResult;
  const { lazy, ...rest } = s;
  const u = rest as Record<string, unknown>;
  for (const field of lazy) {
    const [start, length] = s[field] as [number, number];
    u[field] = lazyJsonObject(texts, start, start + length);
  }
  return u as unknown as UnitResult;
}

/**
 * The cache file of one module and batch: every entry (a batch's units, or one unit's) of that
 * batch, each under its file key and its content key. One file per batch keeps a rebuild to one
 * read per batch however many units it holds. What is kept: the entries used or made in this
 * run, and of the others (another version of the study using the same batch names) at most as
 * many again, so a file cannot grow without end.
 */
function openSlot(dir: string, context: string, moduleId: string, batch: string): SlotWork {
  const name = createHash('sha256').update(context).update('\0').update(moduleId).update('\0').update(batch).digest('hex');
  const path = join(dir, name.slice(0, 2), `s${name}.bin`);
  const slot = readSlot(path);
  if (slot) markUsed(path);
  const stored = slot?.file;
  const index = new Map(stored?.keys ?? []);
  const used = new Map<number, Set<string>>(); // stored entry → keys it is kept under
  const made: Array<{ keys: string[]; units: UnitResult[]; digests: string[] }> = [];
  const read = new Map<number, UnitResult[]>(); // stored entry → its units as taken
  let changed = false;
  return {
    take(key, alsoKey) {
      const at = index.get(key);
      const entry = at === undefined ? undefined : stored?.entries[at];
      if (at === undefined || !slot || !Array.isArray(entry?.units) || !Array.isArray(entry?.digests) || entry.digests.length !== entry.units.length) return undefined;
      let keys = used.get(at);
      if (!keys) used.set(at, (keys = new Set()));
      keys.add(key);
      if (alsoKey !== undefined && !index.has(alsoKey)) {
        keys.add(alsoKey);
        changed = true;
      }
      let units = read.get(at);
      if (!units) {
        // Each unit comes back with the JSON it was stored with, so the digest stored beside it is its digest.
        units = entry.units.map((u) => unitFromStored(u, slot.texts));
        units.forEach((u, i) => rememberUnitDigest(u, entry.digests[i]));
        read.set(at, units);
      }
      return units;
    },
    put(keys, units) {
      made.push({ keys, units, digests: units.map(unitDigest) });
      changed = true;
    },
    save() {
      if (!changed) return;
      const out: Parameters<typeof writeSlot>[1] = [];
      const byEntry = new Map<number, string[]>();
      for (const [k, at] of index) {
        const keys = byEntry.get(at);
        if (keys) keys.push(k);
        else byEntry.set(at, [k]);
      }
      const storedEntry = (at: number, keys: Iterable<string>) => {
        const e = stored?.entries[at] as SlotEntry;
        out.push({ keys, units: e.units, digests: e.digests, stored: true });
      };
      // Entries used now keep the keys they had and gain any new one.
      for (const [at, keys] of used) storedEntry(at, new Set([...(byEntry.get(at) ?? []), ...keys]));
      for (const e of made) out.push({ keys: e.keys, units: e.units, digests: e.digests, stored: false });
      // Entries of other runs, up to as many as this run uses.
      const room = used.size + made.length;
      let kept = 0;
      for (const [at, keys] of byEntry) {
        if (kept >= room) break;
        if (used.has(at) || keys.some((k) => made.some((e) => e.keys.includes(k)))) continue;
        storedEntry(at, keys);
        kept++;
      }
      let oldTexts: Buffer | undefined;
      try {
        oldTexts = slot?.texts.load();
      } catch {
        return; // the old file cannot be read: keep it as it is rather than write one without its texts
      }
      writeSlot(path, out, oldTexts);
    },
  };
}

/** Most file identities kept in the known-files record (those of other studies are dropped first). */
const KNOWN_FILES_MAX = 4096;

/**
 * Digests of input files (src/study/load.ts) kept in the analysis cache folder, so that a
 * rebuild need not parse the files whose batches are all cached: `reuse` for loadStudy, and
 * `save` for the digests of the files it parsed. Keys include the code fingerprint.
 * `known` records the SHA-256 of files by their identity (src/study/read-folder.ts), so that a
 * rebuild need not read the files it will not parse; `saveKnown` writes what it learnt.
 */
export function digestStore(cacheDir?: string): { reuse: LoadReuse; save(parsed: readonly ParsedDigest[]): void; known: KnownFiles; saveKnown(): void } {
  const dir = resolve(cacheDir ?? DEFAULT_ANALYSIS_CACHE);
  const file = (key: string) => join(dir, key.slice(0, 2), `d${key}.bin`);
  const knownPath = join(dir, 'known-files.json');
  let before = new Map<string, string>();
  try {
    const list = JSON.parse(readFileSync(knownPath, 'utf8')) as unknown;
    if (Array.isArray(list)) before = new Map(list.filter((e): e is [string, string] => Array.isArray(e) && typeof e[0] === 'string' && typeof e[1] === 'string'));
  } catch {
    // none yet, or unreadable: every file is read
  }
  const now = new Map<string, string>();
  let learnt = false;
  return {
    reuse: {
      context: JSON.stringify([ENTRY_VERSION, codeFingerprint()]),
      get(key) {
        try {
          const digest = deserialize(readFileSync(file(key))) as FileDigest;
          markUsed(file(key));
          return digest;
        } catch {
          return undefined;
        }
      },
    },
    save(parsed) {
      for (const p of parsed) store(file(p.key), p.digest);
    },
    known: {
      sha256(identity) {
        const sha = before.get(identity);
        if (sha !== undefined) now.set(identity, sha);
        return sha;
      },
      record(identity, sha) {
        now.set(identity, sha);
        learnt = true;
      },
    },
    saveKnown() {
      if (!learnt) return;
      // This build's files first, then those of earlier builds up to the limit.
      const out = new Map(now);
      for (const [k, v] of before) {
        if (out.size >= KNOWN_FILES_MAX) break;
        if (!out.has(k)) out.set(k, v);
      }
      storeText(knownPath, JSON.stringify([...out]));
    },
  };
}

/** Write an entry under a temporary name and rename it (best effort: a cache that cannot be written only costs time). */
function store(path: string, value: FileDigest): void {
  storeText(path, serialize(value));
}

function storeText(path: string, data: string | Uint8Array): void {
  try {
    mkdirSync(join(path, '..'), { recursive: true });
    const tmp = `${path}.${process.pid}.tmp`;
    writeFileSync(tmp, data);
    renameSync(tmp, path);
  } catch {
    // read-only or full disk: carry on without caching
  }
}
