/**
 * Per-unit analysis in worker threads.
 *
 *   Study ──split rows by batch (WT, variants and NADH actin-only wells of a batch stay together)──▶ chunks
 *         ──worker: module.analyse(chunk study) for every module──▶ UnitResult[] per chunk
 *         ──merge, order as the serial path (first appearance of (variant, unit, batch) in the
 *           module's inputs, in module.inputs order)──▶ UnitResult[]
 *
 * Units are independent given their batch (ATPase from NADH traces subtracts the actin-only
 * background of the same batch, so a batch is never split). The result equals
 * `modules.flatMap((m) => m.analyse(study))` for the modules that have rows (tested).
 * Rows travel to workers in columns (analyse-worker-rows.ts): a structured clone of row objects
 * copies every string of every row and took longer to decode in the worker than the analysis
 * itself (47 s for the 3 million rows of a 1,000-variant benchmark study, and a copy of each
 * string per row in worker memory). This file does no I/O besides starting workers.
 */
import { ASSAYS } from '../assays/registry.js';
import type { AssayModule } from '../assays/types.js';
import { WorkerPool, defaultWorkers } from '../charts/pool.js';
import type { UnitResult } from '../results/types.js';
import type { InputKind, RowBase, Study } from '../study/types.js';
import { encodeRows, type RowColumns } from './analyse-worker-rows.js';

export interface ParallelOptions {
  /** Worker threads; 0 analyses in this thread; 'auto' (default) = os.availableParallelism(). */
  workers?: number | 'auto';
  /** Chunks per worker (default 4): smaller chunks balance uneven batches. */
  chunksPerWorker?: number;
  /** Called as chunks finish: (done, total). */
  onProgress?: (done: number, total: number) => void;
}

/** Modules that have rows in the study, in registry order: the same filter analyseStudy applies. */
export function activeModules(study: Pick<Study, 'rows'>, modules: readonly AssayModule[] = ASSAYS): AssayModule[] {
  return modules.filter((a) => a.inputs.some((k) => (study.rows[k]?.length ?? 0) > 0));
}

/** Message to the analysis worker: a study without rows, the chunk's rows in columns, and module ids. */
export interface AnalyseJob {
  study: Omit<Study, 'rows'>;
  rows: Record<string, RowColumns>;
  moduleIds: string[];
}

const unitKey = (r: { variant: string; unit: string; batch: string }) => `${r.variant}\u0000${r.unit}\u0000${r.batch}`;

/** Split batches into `n` groups of similar row counts (greedy, largest first; deterministic). */
function batchGroups(study: Study, n: number): string[][] {
  const size = new Map<string, number>();
  for (const rows of Object.values(study.rows)) for (const r of rows as RowBase[]) size.set(r.batch, (size.get(r.batch) ?? 0) + 1);
  const batches = [...size.keys()].sort((a, b) => (size.get(b) as number) - (size.get(a) as number) || (a < b ? -1 : a > b ? 1 : 0));
  const groups = Array.from({ length: Math.max(1, Math.min(n, batches.length)) }, () => ({ rows: 0, batches: [] as string[] }));
  for (const b of batches) {
    const g = groups.reduce((m, x) => (x.rows < m.rows ? x : m));
    g.batches.push(b);
    g.rows += size.get(b) as number;
  }
  return groups.map((g) => g.batches);
}

/** Order units as the serial path does: by first appearance of their key in the module's inputs. */
export function serialOrder(study: Study, m: AssayModule, units: UnitResult[]): UnitResult[] {
  const rank = new Map<string, number>();
  for (const kind of m.inputs) {
    for (const r of (study.rows[kind] ?? []) as RowBase[]) {
      if (r.variant === '' && r.unit === '') continue; // NADH actin-only wells belong to no unit
      const k = unitKey(r);
      if (!rank.has(k)) rank.set(k, rank.size);
    }
  }
  return units
    .map((u, i) => ({ u, i, r: rank.get(unitKey(u)) ?? rank.size + i }))
    .sort((a, b) => a.r - b.r || a.i - b.i)
    .map((x) => x.u);
}

/**
 * Analyse every unit of every active module, in parallel. Same result, in the same order, as
 * `activeModules(study, modules).flatMap((m) => m.analyse(study))`.
 * Modules not in the registry (tests, plug-ins) run in this thread.
 */
export async function analyseUnitsParallel(study: Study, modules: readonly AssayModule[] = ASSAYS, options: ParallelOptions = {}): Promise<UnitResult[]> {
  const active = activeModules(study, modules);
  const workers = options.workers === undefined || options.workers === 'auto' ? defaultWorkers() : options.workers;
  const pooled = active.filter((m) => ASSAYS.includes(m));
  if (workers <= 0 || pooled.length === 0) return active.flatMap((m) => m.analyse(study));

  const groups = batchGroups(study, workers * (options.chunksPerWorker ?? 4));
  const groupOf = new Map<string, number>();
  groups.forEach((bs, i) => bs.forEach((b) => groupOf.set(b, i)));
  const kinds = [...new Set(pooled.flatMap((m) => m.inputs))] as InputKind[];
  const chunkRows = groups.map(() => ({}) as Study['rows']);
  for (const kind of kinds) {
    for (const r of (study.rows[kind] ?? []) as RowBase[]) {
      const target = chunkRows[groupOf.get(r.batch) as number] as Record<string, RowBase[]>;
      (target[kind] ??= []).push(r);
    }
  }
  const { rows: _rows, ...meta } = study;
  const pool = new WorkerPool<AnalyseJob, Record<string, UnitResult[]>>(new URL('./analyse-worker.ts', import.meta.url), Math.min(workers, groups.length));
  let done = 0;
  try {
    const parts = await Promise.all(
      chunkRows.map((rows) =>
        pool.run({ study: meta, rows: Object.fromEntries(Object.entries(rows).map(([k, r]) => [k, encodeRows(r as RowBase[])])), moduleIds: pooled.map((m) => m.id) }).then((r) => {
          options.onProgress?.(++done, chunkRows.length);
          return r;
        }),
      ),
    );
    return active.flatMap((m) => (pooled.includes(m) ? serialOrder(study, m, parts.flatMap((p) => p[m.id] ?? [])) : m.analyse(study)));
  } finally {
    await pool.close();
  }
}
