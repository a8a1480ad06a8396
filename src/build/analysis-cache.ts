/**
 * Cache of unit analyses per module and batch, so that a rebuild after one batch changed re-fits
 * only that batch's units of the assays whose files changed.
 *
 *   Study ──each module's rows split by batch──▶ per (module, batch): context = (code fingerprint,
 *         module ids, study settings, input files' kinds/paths/settings), then two keys (SHA-256):
 *           file key    — context, the variant labels, the manifest's file entries, and the path,
 *                         SHA-256 and row count of each file holding the batch's rows (cheap:
 *                         unchanged files read the same way give unchanged rows)
 *           content key — context and the batch's rows in order (exact; tried when the file key misses)
 *         ──hit──▶ UnitResult[] from <dir>/<ab>/<key>.bin (v8 serialisation: exact numbers, NaN kept)
 *         ──miss──▶ analyseUnitsParallel on a study holding only the missed batches ──▶ stored
 *         ──merge, in the serial path's order──▶ UnitResult[]
 *
 * Files left out of a study (Study.omitted: their digests stand in for their rows) are keyed by
 * their digests' rows per batch; a batch they hold that is not cached by its files sends back
 * `needRows` instead of units, and the caller loads those files and asks again.
 *
 * Why per batch: units are independent given their batch (src/analysis/parallel.ts; NADH rates
 * subtract the actin-only wells of their own batch), and the modules read nothing else of the
 * study than its settings, its files' settings and its rows. The code fingerprint
 * (src/fingerprint.ts) hashes every source file under src/ and package-lock.json, so a changed
 * analysis can never be served from an older cache.
 * The result equals analyseUnitsParallel(study) (tested); entries are never pruned.
 */
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { deserialize, serialize } from 'node:v8';
import { type ParallelOptions, activeModules, analyseUnitsParallel, serialOrder } from '../analysis/parallel.js';
import { groupBy } from '../assays/assay-common.js';
import { ASSAYS } from '../assays/registry.js';
import type { AssayModule } from '../assays/types.js';
import { DEFAULT_CHART_CACHE } from '../charts/cache.js';
import type { UnitResult } from '../results/types.js';
import type { FileDigest, InputKind, RowBase, Study } from '../study/types.js';
import { codeFingerprint } from '../fingerprint.js';
import type { LoadReuse, ParsedDigest } from '../study/load.js';

/** Default folder: beside the chart cache, in the user's cache directory. */
export const DEFAULT_ANALYSIS_CACHE = join(DEFAULT_CHART_CACHE, '..', 'analysis');

/** Version of the entry format; bump when what is stored changes. */
const ENTRY_VERSION = 1;

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
  /** Batch analyses (one module's units of one batch) made now and taken from the cache. */
  batches: { analysed: number; cached: number };
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
  const context = JSON.stringify([
    ENTRY_VERSION,
    codeFingerprint(),
    active.map((m) => m.id),
    study.settings,
    study.files.map((f) => [f.kind, f.path, f.settings]),
  ]);
  const sha = new Map(study.files.map((f) => [f.path, f.sha256]));
  // How the loader read the files: the variant labels it resolved and the manifest's file entries
  // (declared units, decimal mark, missing-value codes, cross-sections…), as given.
  const labels = JSON.stringify([study.variants.map((v) => [v.id, v.label]), (study.manifestRaw as { files?: unknown } | undefined)?.files ?? null]);
  const file = (key: string) => join(dir, key.slice(1, 3), `${key}.bin`);
  const read = (key: string | undefined) => {
    if (key === undefined) return undefined;
    try {
      return deserialize(readFileSync(file(key))) as UnitResult[];
    } catch {
      return undefined;
    }
  };

  const found: UnitResult[] = [];
  const missed = new Map<AssayModule, Map<string, string[]>>(); // module → batch → keys to store its units under
  const needRows = new Set<string>();
  let entries = 0;
  const miss = (m: AssayModule, batch: string, keys: string[]) => {
    let mine = missed.get(m);
    if (!mine) missed.set(m, (mine = new Map()));
    mine.set(batch, keys);
  };
  /** Entries found by their file key, to read: its key, the files left out it needs if it is gone after all, and what to do then. */
  const pending: Array<{ key: string; left: string[]; ifGone: () => void }> = [];
  for (const m of active) {
    const kinds = m.inputs;
    // The module's rows of each batch, by kind.
    const byBatch = new Map<string, Partial<Record<InputKind, RowBase[]>>>();
    for (const kind of kinds) {
      for (const r of (study.rows[kind] ?? []) as RowBase[]) {
        let b = byBatch.get(r.batch);
        if (!b) byBatch.set(r.batch, (b = {}));
        (b[kind] ??= []).push(r);
      }
    }
    // Rows of each batch per file: counted in the rows read, and taken from the digests of the
    // files left out (whose batches are in no row here).
    const filesOf = new Map<string, Map<string, number>>();
    const addRows = (batch: string, path: string, n: number) => {
      let perFile = filesOf.get(batch);
      if (!perFile) filesOf.set(batch, (perFile = new Map()));
      perFile.set(path, (perFile.get(path) ?? 0) + n);
    };
    for (const [batch, rows] of byBatch) for (const kind of kinds) for (const r of rows[kind] ?? []) addRows(batch, r.at.file, 1);
    for (const [path, d] of omitted) if (kinds.includes(d.kind)) for (const [batch, n] of d.batchRows) addRows(batch, path, n);
    // File key: the files the batch's rows come from (path, SHA-256 of the bytes, rows of the batch
    // in each) and the variant labels the loader resolved them with. Unchanged files give unchanged
    // rows, so this cheap key is tried first; when a file changed, the content key decides.
    const fileKey = (batch: string) => {
      const files = [...(filesOf.get(batch) as Map<string, number>)].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)).map(([path, n]) => [path, sha.get(path) ?? null, n]);
      if (files.some((f) => f[1] === null)) return undefined;
      return `f${createHash('sha256').update(context).update('\0').update(m.id).update('\0').update(labels).update('\0').update(JSON.stringify([batch, files])).digest('hex')}`;
    };
    // Content key: the batch's rows themselves (exact, but serialising every row costs seconds in a large study).
    const contentKey = (batch: string, rows: Partial<Record<InputKind, RowBase[]>>) => {
      const hash = createHash('sha256').update(context).update('\0').update(m.id).update('\0').update(JSON.stringify(batch));
      for (const kind of kinds) hash.update('\0').update(kind).update('\0').update(JSON.stringify(rows[kind] ?? []));
      return `c${hash.digest('hex')}`;
    };
    for (const batch of filesOf.keys()) {
      entries++;
      const byFiles = fileKey(batch);
      // Files left out that hold rows of this batch: needed if the batch is not cached.
      const left = [...(filesOf.get(batch) as Map<string, number>).keys()].filter((p) => omitted.has(p));
      const rows = byBatch.get(batch) as Partial<Record<InputKind, RowBase[]>>;
      // Only looked up here; read once it is known that no file must be loaded first.
      if (byFiles !== undefined && existsSync(file(byFiles))) {
        pending.push({ key: byFiles, left, ifGone: () => miss(m, batch, [contentKey(batch, rows), byFiles]) });
        continue;
      }
      // Not cached by its files: its rows are needed, including those of files left out.
      if (left.length > 0) {
        left.forEach((p) => needRows.add(p));
        continue;
      }
      const byContent = contentKey(batch, rows);
      const contentHit = read(byContent);
      if (contentHit) {
        found.push(...contentHit);
        if (byFiles) store(file(byFiles), contentHit);
        continue;
      }
      miss(m, batch, byFiles ? [byContent, byFiles] : [byContent]);
    }
  }
  if (needRows.size > 0) return { units: [], needRows: [...needRows], batches: { analysed: 0, cached: 0 } };
  // Entries found by their files. One that cannot be read after all (removed meanwhile) is a miss.
  for (const p of pending) {
    const hit = read(p.key);
    if (hit) found.push(...hit);
    else if (p.left.length > 0) p.left.forEach((f) => needRows.add(f));
    else p.ifGone();
  }
  if (needRows.size > 0) return { units: [], needRows: [...needRows], batches: { analysed: 0, cached: 0 } };

  const fresh: UnitResult[] = [];
  let analysed = 0;
  if (missed.size > 0) {
    // One run over the missed batches of every module: each kind gets the rows of the batches its
    // modules missed (the registry's modules share no kind; if some did, units of batches a module
    // did not miss are dropped below).
    const wanted = new Map<InputKind, Set<string>>();
    for (const [m, batches] of missed) {
      for (const kind of m.inputs) {
        let set = wanted.get(kind);
        if (!set) wanted.set(kind, (set = new Set()));
        for (const b of batches.keys()) set.add(b);
      }
    }
    const rows: Partial<Record<InputKind, RowBase[]>> = {};
    for (const [kind, batches] of wanted) {
      const list = ((study.rows[kind] ?? []) as RowBase[]).filter((r) => batches.has(r.batch));
      if (list.length > 0) rows[kind] = list;
    }
    const count = Object.values(rows).reduce((n, list) => n + list.length, 0);
    const { omitted: _left, ...whole } = study;
    const units = await analyseUnitsParallel({ ...whole, rows: rows as Study['rows'] }, [...missed.keys()], count >= (options.minRowsForWorkers ?? 0) ? options : { ...options, workers: 0 });
    for (const [m, batches] of missed) {
      const perBatch = groupBy(
        units.filter((u) => u.assay === m.id && batches.has(u.batch)),
        (u) => u.batch,
      );
      for (const [batch, keys] of batches) {
        const mine = perBatch.get(batch) ?? [];
        fresh.push(...mine);
        analysed++;
        // A batch whose rows give no unit (e.g. only NADH actin-only wells) is stored empty.
        for (const key of keys) store(file(key), mine);
      }
    }
  }
  const all = [...found, ...fresh];
  const units = active.flatMap((m) => serialOrder(study, m, all.filter((u) => u.assay === m.id)));
  return { units, batches: { analysed, cached: entries - analysed } };
}

/**
 * Digests of input files (src/study/load.ts) kept in the analysis cache folder, so that a
 * rebuild need not parse the files whose batches are all cached: `reuse` for loadStudy, and
 * `save` for the digests of the files it parsed. Keys include the code fingerprint.
 */
export function digestStore(cacheDir?: string): { reuse: LoadReuse; save(parsed: readonly ParsedDigest[]): void } {
  const dir = resolve(cacheDir ?? DEFAULT_ANALYSIS_CACHE);
  const file = (key: string) => join(dir, key.slice(0, 2), `d${key}.bin`);
  return {
    reuse: {
      context: JSON.stringify([ENTRY_VERSION, codeFingerprint()]),
      get(key) {
        try {
          return deserialize(readFileSync(file(key))) as FileDigest;
        } catch {
          return undefined;
        }
      },
    },
    save(parsed) {
      for (const p of parsed) store(file(p.key), p.digest);
    },
  };
}

/** Write an entry under a temporary name and rename it (best effort: a cache that cannot be written only costs time). */
function store(path: string, value: UnitResult[] | FileDigest): void {
  try {
    mkdirSync(join(path, '..'), { recursive: true });
    const tmp = `${path}.${process.pid}.tmp`;
    writeFileSync(tmp, serialize(value));
    renameSync(tmp, path);
  } catch {
    // read-only or full disk: carry on without caching
  }
}
