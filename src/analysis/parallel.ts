/**
 * Per-unit analysis in worker threads and in this thread.
 *
 *   Study ──split rows by batch (WT, variants and NADH actin-only wells of a batch stay together)──▶ chunks
 *         ──tasks: one module × one chunk──▶ this thread: the first task of each module (timed),
 *           then the tasks with the least time per row; workers: those with the most
 *         ──merge, order as the serial path (first appearance of (variant, unit, batch) in the
 *           module's inputs, in module.inputs order)──▶ UnitResult[]
 *
 * Units are independent given their batch (ATPase from NADH traces subtracts the actin-only
 * background of the same batch, so a batch is never split). The result equals
 * `modules.flatMap((m) => m.analyse(study))` for the modules that have rows (tested), whoever
 * analysed which task.
 * Rows travel to workers in columns (analyse-worker-rows.ts): a structured clone of row objects
 * copies every string of every row and took longer to decode in the worker than the analysis
 * itself (47 s for the 3 million rows of a 1,000-variant benchmark study, and a copy of each
 * string per row in worker memory). This file does no I/O besides starting workers.
 */
import { hasRows, unitsInOrder } from '../assays/assay-common.js';
import { ASSAYS } from '../assays/registry.js';
import type { AssayModule } from '../assays/types.js';
import { type WorkerReply, defaultWorkers, startWorker } from '../charts/pool.js';
import type { UnitResult } from '../results/types.js';
import type { InputKind, RowBase, Study } from '../study/types.js';
import { encodeRows, type RowColumns } from './analyse-worker-rows.js';

export interface ParallelOptions {
  /**
   * Worker threads besides this one (which analyses too); 0 analyses in this thread only;
   * 'auto' (default) = os.availableParallelism() − 1, at least 1.
   */
  workers?: number | 'auto';
  /** Chunks of batches per thread, this one included (default 4): smaller chunks balance uneven batches. */
  chunksPerWorker?: number;
  /** Called as tasks (one module, one chunk) finish: (done, total). */
  onProgress?: (done: number, total: number) => void;
}

/** Modules that have rows in the study, in registry order: the same filter analyseStudy applies. */
export function activeModules(study: Pick<Study, 'rows' | 'omitted'>, modules: readonly AssayModule[] = ASSAYS): AssayModule[] {
  return modules.filter((a) => a.inputs.some((k) => hasRows(study, k)));
}

/** Message to the analysis worker: a study without rows, the chunk's rows in columns, and module ids. */
export interface AnalyseJob {
  study: Omit<Study, 'rows'>;
  rows: Record<string, RowColumns>;
  moduleIds: string[];
}

/** Split batches into `n` groups of similar row counts (greedy, largest first; deterministic). */
function batchGroups(study: Study, n: number): string[][] {
  const size = new Map<string, number>();
  for (const rows of Object.values(study.rows)) {
    // Rows come batch by batch: count runs, one map update per run.
    let batch: string | undefined;
    let run = 0;
    for (const r of rows as RowBase[]) {
      if (r.batch === batch) {
        run++;
        continue;
      }
      if (batch !== undefined) size.set(batch, (size.get(batch) ?? 0) + run);
      batch = r.batch;
      run = 1;
    }
    if (batch !== undefined) size.set(batch, (size.get(batch) ?? 0) + run);
  }
  const batches = [...size.keys()].sort((a, b) => (size.get(b) as number) - (size.get(a) as number) || (a < b ? -1 : a > b ? 1 : 0));
  const groups = Array.from({ length: Math.max(1, Math.min(n, batches.length)) }, () => ({ rows: 0, batches: [] as string[] }));
  for (const b of batches) {
    const g = groups.reduce((m, x) => (x.rows < m.rows ? x : m));
    g.batches.push(b);
    g.rows += size.get(b) as number;
  }
  return groups.map((g) => g.batches);
}

/**
 * Order units as the serial path does: by first appearance of their (variant, unit, batch) in
 * the module's inputs (in module.inputs order); units not found there go last, in their order.
 */
export function serialOrder(study: Study, m: AssayModule, units: UnitResult[]): UnitResult[] {
  // Nested maps variant → unit → batch → rank.
  const rank = new Map<string, Map<string, Map<string, number>>>();
  let count = 0;
  const rankOf = (r: { variant: string; unit: string; batch: string }) => rank.get(r.variant)?.get(r.unit)?.get(r.batch);
  const see = (units: ReadonlyArray<readonly [string, string, string]>) => {
    for (const [variant, unit, batch] of units) {
      let byUnit = rank.get(variant);
      if (!byUnit) rank.set(variant, (byUnit = new Map()));
      let byBatch = byUnit.get(unit);
      if (!byBatch) byUnit.set(unit, (byBatch = new Map()));
      if (!byBatch.has(batch)) byBatch.set(batch, count++);
    }
  };
  for (const kind of m.inputs) {
    const rows = (study.rows[kind] ?? []) as RowBase[];
    if (!study.omitted?.size) {
      see(unitsInOrder(rows));
      continue;
    }
    // Files in manifest order: an omitted file's units from its digest, a read file's from its
    // rows (one contiguous run of the kind's rows, in the same order).
    let i = 0;
    for (const f of study.files) {
      if (f.kind !== kind) continue;
      const digest = study.omitted.get(f.path);
      if (digest) {
        see(digest.unitOrder);
        continue;
      }
      let j = i;
      while (j < rows.length && rows[j].at.file === f.path) j++;
      see(unitsInOrder(rows, i, j));
      i = j;
    }
  }
  return units
    .map((u, i) => ({ u, i, r: rankOf(u) ?? count + i }))
    .sort((a, b) => a.r - b.r || a.i - b.i)
    .map((x) => x.u);
}

/** One module's rows of one chunk of batches. */
interface Task {
  module: AssayModule;
  chunk: number;
  rows: Record<string, RowBase[]>;
  count: number;
}

/**
 * Jobs a worker holds at once. This thread reads workers' replies only between its own tasks,
 * so a worker with one job would wait idle for that long after each; with two it starts the
 * next at once.
 */
const JOBS_PER_WORKER = 2;

type Output = Record<string, UnitResult[]>;

/** An analysis worker (analyse-worker.ts) taking several jobs at a time; it answers them in order. */
class AnalysisWorker {
  private readonly worker = startWorker(new URL('./analyse-worker.ts', import.meta.url));
  private readonly pending = new Map<number, { resolve: (o: Output) => void; reject: (e: Error) => void }>();
  private nextId = 1;
  private closed = false;

  constructor() {
    this.worker.on('message', (msg: WorkerReply<Output>) => {
      const job = this.pending.get(msg.id);
      if (!job) return;
      this.pending.delete(msg.id);
      if (msg.error !== undefined) job.reject(new Error(msg.error));
      else job.resolve(msg.output ?? {});
    });
    this.worker.on('error', (err) => this.failAll(err));
    this.worker.on('exit', (code) => this.failAll(new Error(`analysis worker exited with code ${code}`)));
  }

  get jobs(): number {
    return this.pending.size;
  }

  run(input: AnalyseJob): Promise<Output> {
    if (this.closed) return Promise.reject(new Error('analysis worker is closed'));
    const id = this.nextId++;
    return new Promise<Output>((resolve, reject) => {
      this.pending.set(id, { resolve, reject });
      this.worker.postMessage({ id, input });
    });
  }

  private failAll(err: Error): void {
    if (this.closed) return;
    this.closed = true;
    for (const job of this.pending.values()) job.reject(err);
    this.pending.clear();
  }

  async close(): Promise<void> {
    this.closed = true;
    await this.worker.terminate();
  }
}

/**
 * Analyse every unit of every active module, in parallel. Same result, in the same order, as
 * `activeModules(study, modules).flatMap((m) => m.analyse(study))`.
 *
 * Work is split into tasks (one module, one chunk of batches). Shipping rows to a worker costs
 * roughly 0.5–1 µs per row (encode here, decode there), about what some modules spend
 * analysing them (motility: ~1–2 µs per row) and little beside others (turnover: ~5 µs, force:
 * ~50 µs per row). So this thread analyses the first task of each module itself and measures
 * its time per row; workers take the other tasks from the most time per row down, this thread
 * from the least up, each taking the next task when free (workers are fed between this
 * thread's tasks and hold JOBS_PER_WORKER jobs). Measured times only decide who analyses
 * what, never the result. Modules not in the registry (tests, plug-ins) run in this thread.
 */
export async function analyseUnitsParallel(study: Study, modules: readonly AssayModule[] = ASSAYS, options: ParallelOptions = {}): Promise<UnitResult[]> {
  const active = activeModules(study, modules);
  // 'auto': one thread per core, this one included.
  const workers = options.workers === undefined || options.workers === 'auto' ? Math.max(1, defaultWorkers() - 1) : options.workers;
  const pooled = active.filter((m) => ASSAYS.includes(m));
  if (workers <= 0 || pooled.length === 0) return active.flatMap((m) => m.analyse(study));

  const groups = batchGroups(study, (workers + 1) * (options.chunksPerWorker ?? 4));
  const groupOf = new Map<string, number>();
  groups.forEach((bs, i) => bs.forEach((b) => groupOf.set(b, i)));
  const kinds = [...new Set(pooled.flatMap((m) => m.inputs))] as InputKind[];
  const chunkRows = groups.map(() => ({}) as Record<string, RowBase[]>);
  for (const kind of kinds) {
    let batch: string | undefined;
    let target: RowBase[] = [];
    for (const r of (study.rows[kind] ?? []) as RowBase[]) {
      if (r.batch !== batch) {
        batch = r.batch;
        target = chunkRows[groupOf.get(batch) as number][kind] ??= [];
      }
      target.push(r);
    }
  }
  const tasks: Task[] = pooled.flatMap((module) =>
    chunkRows.flatMap((all, chunk) => {
      const rows = Object.fromEntries(module.inputs.filter((k) => all[k]).map((k) => [k, all[k]]));
      const count = Object.values(rows).reduce((n, list) => n + list.length, 0);
      return count > 0 ? [{ module, chunk, rows, count }] : [];
    }),
  );
  const { rows: _rows, ...meta } = study;
  const results = new Map<Task, UnitResult[]>();
  const finished = (task: Task, units: UnitResult[]) => {
    results.set(task, units);
    options.onProgress?.(results.size, tasks.length);
  };
  const pool = Array.from({ length: Math.min(workers, tasks.length - pooled.length) }, () => new AnalysisWorker());
  try {
    let failure: { error: unknown } | undefined;
    let wake: () => void = () => {};
    const perRow = new Map<AssayModule, number>();
    const queue: Task[] = []; // tasks of measured modules, most time per row first
    const feed = () => {
      for (const w of pool) {
        while (!failure && w.jobs < JOBS_PER_WORKER && queue.length > 0) {
          const task = queue.shift() as Task;
          const rows = Object.fromEntries(Object.entries(task.rows).map(([k, r]) => [k, encodeRows(r)]));
          w.run({ study: meta, rows, moduleIds: [task.module.id] })
            .then((out) => {
              finished(task, out[task.module.id] ?? []);
              feed();
            })
            .catch((error: unknown) => {
              failure ??= { error };
            })
            .finally(() => wake());
        }
      }
    };
    for (const task of tasks) {
      if (failure) break;
      if (perRow.has(task.module)) continue;
      const t0 = performance.now();
      finished(task, task.module.analyse({ ...study, rows: task.rows as Study['rows'] }));
      perRow.set(task.module, (performance.now() - t0) / task.count);
      queue.push(...tasks.filter((t) => t.module === task.module && t !== task));
      // Stable sort: equal times keep module and chunk order.
      queue.sort((a, b) => (perRow.get(b.module) as number) - (perRow.get(a.module) as number));
      feed();
      await new Promise((resolve) => setImmediate(resolve));
    }
    for (let task = queue.pop(); task && !failure; task = queue.pop()) {
      finished(task, task.module.analyse({ ...study, rows: task.rows as Study['rows'] }));
      // Let workers' replies in, so that a free worker gets its next task.
      await new Promise((resolve) => setImmediate(resolve));
    }
    while (!failure && results.size < tasks.length) await new Promise<void>((resolve) => (wake = resolve));
    if (failure) throw failure.error;
    return active.flatMap((m) =>
      pooled.includes(m) ? serialOrder(study, m, tasks.filter((t) => t.module === m).flatMap((t) => results.get(t) ?? [])) : m.analyse(study),
    );
  } finally {
    await Promise.all(pool.map((w) => w.close()));
  }
}
