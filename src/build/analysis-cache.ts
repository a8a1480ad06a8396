/**
 * Per-batch cache of unit analyses, so that a rebuild after one batch changed re-fits only that
 * batch's units.
 *
 *   Study ──rows split by batch──▶ per batch: context = (code fingerprint, module ids, study
 *         settings, input files' kinds/paths/settings), then two keys (SHA-256):
 *           file key    — context, the variant labels, the manifest's file entries, and the path,
 *                         SHA-256 and row count of each file holding the batch's rows (cheap:
 *                         unchanged files read the same way give unchanged rows)
 *           content key — context and the batch's rows in order (exact; tried when the file key misses)
 *         ──hit──▶ UnitResult[] from <dir>/<ab>/<key>.bin (v8 serialisation: exact numbers, NaN kept)
 *         ──miss──▶ analyseUnitsParallel on a study holding only the missed batches ──▶ stored
 *         ──merge, in the serial path's order──▶ UnitResult[]
 *
 * Why per batch: units are independent given their batch (src/analysis/parallel.ts; NADH rates
 * subtract the actin-only wells of their own batch), and the modules read nothing else of the
 * study than its settings, its files' settings and its rows. The code fingerprint
 * (src/fingerprint.ts) hashes every source file under src/ and package-lock.json, so a changed
 * analysis can never be served from an older cache.
 * The result equals analyseUnitsParallel(study) (tested); entries are never pruned.
 */
import { createHash } from 'node:crypto';
import { mkdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { deserialize, serialize } from 'node:v8';
import { type ParallelOptions, activeModules, analyseUnitsParallel, serialOrder } from '../analysis/parallel.js';
import { groupBy } from '../assays/assay-common.js';
import { ASSAYS } from '../assays/registry.js';
import type { AssayModule } from '../assays/types.js';
import { DEFAULT_CHART_CACHE } from '../charts/cache.js';
import type { UnitResult } from '../results/types.js';
import type { InputKind, RowBase, Study } from '../study/types.js';
import { codeFingerprint } from '../fingerprint.js';

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
  /** Batches analysed now and batches taken from the cache. */
  batches: { analysed: number; cached: number };
}

/**
 * Units of every active module, from the cache where a batch's inputs are unchanged.
 * Same result, in the same order, as analyseUnitsParallel(study, modules), for a study as
 * loadStudy gives it: the file key trusts that rows with an unchanged file SHA-256 are unchanged.
 */
export async function analyseUnitsCached(study: Study, modules: readonly AssayModule[] = ASSAYS, options: CachedAnalysisOptions = {}): Promise<CachedAnalysis> {
  const active = activeModules(study, modules);
  // Only registry modules are cached (their code is under src/, in the fingerprint).
  if (options.cacheDir === false || active.some((m) => !ASSAYS.includes(m))) {
    const total = Object.values(study.rows).reduce((n, list) => n + (list?.length ?? 0), 0);
    const units = await analyseUnitsParallel(study, modules, total >= (options.minRowsForWorkers ?? 0) ? options : { ...options, workers: 0 });
    return { units, batches: { analysed: new Set(units.map((u) => u.batch)).size, cached: 0 } };
  }
  const dir = resolve(options.cacheDir ?? DEFAULT_ANALYSIS_CACHE);
  const kinds = [...new Set(active.flatMap((m) => m.inputs))] as InputKind[];
  const byBatch = new Map<string, Partial<Record<InputKind, RowBase[]>>>();
  for (const kind of kinds) {
    for (const r of (study.rows[kind] ?? []) as RowBase[]) {
      let b = byBatch.get(r.batch);
      if (!b) byBatch.set(r.batch, (b = {}));
      (b[kind] ??= []).push(r);
    }
  }
  const context = JSON.stringify([
    ENTRY_VERSION,
    codeFingerprint(),
    active.map((m) => m.id),
    study.settings,
    study.files.map((f) => [f.kind, f.path, f.settings]),
  ]);
  // Content key: the batch's rows themselves (exact, but serialising every row costs seconds in a large study).
  const contentKey = (batch: string, rows: Partial<Record<InputKind, RowBase[]>>) => {
    const hash = createHash('sha256').update(context).update('\0').update(JSON.stringify(batch));
    for (const kind of kinds) hash.update('\0').update(kind).update('\0').update(JSON.stringify(rows[kind] ?? []));
    return `c${hash.digest('hex')}`;
  };
  // File key: the files the batch's rows come from (path, SHA-256 of the bytes, rows of the batch in each)
  // and the variant labels the loader resolved them with. Unchanged files give unchanged rows, so this
  // cheap key is tried first; when a file changed, the content key decides per batch.
  const sha = new Map(study.files.map((f) => [f.path, f.sha256]));
  // How the loader read the files: the variant labels it resolved and the manifest's file entries
  // (declared units, decimal mark, missing-value codes, cross-sections…), as given.
  const labels = JSON.stringify([study.variants.map((v) => [v.id, v.label]), (study.manifestRaw as { files?: unknown } | undefined)?.files ?? null]);
  const fileKey = (batch: string, rows: Partial<Record<InputKind, RowBase[]>>) => {
    const perFile = new Map<string, number>();
    for (const kind of kinds) for (const r of rows[kind] ?? []) perFile.set(r.at.file, (perFile.get(r.at.file) ?? 0) + 1);
    const files = [...perFile].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)).map(([path, n]) => [path, sha.get(path) ?? null, n]);
    if (files.some((f) => f[1] === null)) return undefined;
    return `f${createHash('sha256').update(context).update('\0').update(labels).update('\0').update(JSON.stringify([batch, files])).digest('hex')}`;
  };
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
  const missed = new Map<string, string[]>(); // batch → keys to store its units under
  for (const [batch, rows] of byBatch) {
    const byFiles = fileKey(batch, rows);
    const hit = read(byFiles);
    if (hit) {
      found.push(...hit);
      continue;
    }
    const byContent = contentKey(batch, rows);
    const contentHit = read(byContent);
    if (contentHit) {
      found.push(...contentHit);
      if (byFiles) store(file(byFiles), contentHit);
      continue;
    }
    missed.set(batch, byFiles ? [byContent, byFiles] : [byContent]);
  }
  let fresh: UnitResult[] = [];
  if (missed.size > 0) {
    const rows: Partial<Record<InputKind, RowBase[]>> = {};
    for (const kind of kinds) {
      const list = ((study.rows[kind] ?? []) as RowBase[]).filter((r) => missed.has(r.batch));
      if (list.length > 0) rows[kind] = list;
    }
    const count = Object.values(rows).reduce((n, list) => n + list.length, 0);
    fresh = await analyseUnitsParallel({ ...study, rows: rows as Study['rows'] }, active, count >= (options.minRowsForWorkers ?? 0) ? options : { ...options, workers: 0 });
    const perBatch = groupBy(fresh, (u) => u.batch);
    for (const [batch, keys] of missed) {
      // A batch whose rows give no unit (e.g. only NADH actin-only wells) is stored empty.
      for (const key of keys) store(file(key), perBatch.get(batch) ?? []);
    }
  }
  const all = [...found, ...fresh];
  const units = active.flatMap((m) => serialOrder(study, m, all.filter((u) => u.assay === m.id)));
  return { units, batches: { analysed: missed.size, cached: byBatch.size - missed.size } };
}

/** Write an entry under a temporary name and rename it (best effort: a cache that cannot be written only costs time). */
function store(path: string, units: UnitResult[]): void {
  try {
    mkdirSync(join(path, '..'), { recursive: true });
    const tmp = `${path}.${process.pid}.tmp`;
    writeFileSync(tmp, serialize(units));
    renameSync(tmp, path);
  } catch {
    // read-only or full disk: carry on without caching
  }
}
