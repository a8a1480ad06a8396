/**
 * A small worker_threads pool, and the chart renderer built on it.
 *
 *   createChartRenderer({ workers, cacheDir })
 *     render(spec, options) ──cache hit?──▶ SVG from <cacheDir>
 *                           ──miss──▶ queue ──▶ render-worker.ts (renderSvg) ──▶ cache ──▶ SVG
 *
 * Workers run the TypeScript sources through tsx (worker-boot.mjs calls tsx's register(), as
 * src/cli/myofolio.js does), so they work from any working directory, under
 * `node src/cli/myofolio.js`, `node --import tsx` and vitest.
 * The SVG of a chart does not depend on which worker drew it: renderSvg renumbers every id
 * from the chart key, so pooled, cached and in-thread output are byte-identical.
 */
import { availableParallelism } from 'node:os';
import { type ResourceLimits, Worker } from 'node:worker_threads';
import type { ChartSpec } from '../assays/types.js';
import { ChartCache, DEFAULT_CHART_CACHE, blockEntryKey, cacheEntryKey } from './cache.js';
import { chartKey, renderSvg, type RenderOptions } from './render.js';

/** Default pool size: the cores this process may use, at least 1. */
export function defaultWorkers(): number {
  return Math.max(1, availableParallelism());
}

/**
 * Node options of this process for a worker, without those that register tsx (`--import tsx`, as
 * `npm run bench` and other scripts run): worker-boot.mjs registers it itself, after its preloads.
 * @example workerExecArgv(['--import', 'tsx', '--max-old-space-size=900']) // → ['--max-old-space-size=900']
 */
export function workerExecArgv(execArgv: readonly string[]): string[] {
  const out: string[] = [];
  for (let i = 0; i < execArgv.length; i++) {
    if (execArgv[i] === '--import' && execArgv[i + 1] === 'tsx') i++;
    else if (execArgv[i] !== '--import=tsx') out.push(execArgv[i]);
  }
  return out;
}

/**
 * Start a worker thread on a TypeScript (or JavaScript) module: worker-boot.mjs imports the
 * packages named in `preload` (by Node's own loader, which is much faster for large packages),
 * registers tsx in the worker and imports `script`. Works from any working directory.
 */
export function startWorker(script: URL, resourceLimits?: ResourceLimits, preload: readonly string[] = []): Worker {
  const boot = new URL('./worker-boot.mjs', import.meta.url);
  const options = { workerData: { script: script.href, preload: [...preload] }, ...(resourceLimits ? { resourceLimits } : {}) };
  const execArgv = workerExecArgv(process.execArgv);
  // Nothing to leave out: the worker inherits this process's options, as by default.
  if (execArgv.length === process.execArgv.length) return new Worker(boot, options);
  try {
    return new Worker(boot, { ...options, execArgv });
  } catch (err) {
    // Options given explicitly are checked, inherited ones are not: with one a worker may not be
    // given (a V8 flag such as --max-old-space-size, which applies to the whole process anyway),
    // the worker inherits them all, tsx included (it then loads its preloads through tsx, slower).
    if ((err as { code?: string }).code !== 'ERR_WORKER_INVALID_EXEC_ARGV') throw err;
    return new Worker(boot, options);
  }
}

/** Packages a chart worker loads before its TypeScript (see worker-boot.mjs): those of render.ts. */
export const CHART_WORKER_PRELOAD = ['vega', 'vega-lite'] as const;

/**
 * Old-generation limit of a chart worker. A worker keeps little between charts (compiled shapes
 * and expression code), but V8 sizes a worker's heap like a process's and collects late, so
 * each drawing worker grew to several hundred MB of garbage. The 10,000-variant benchmark,
 * whose largest chart holds 10,000 variants, draws within 512 MB; a worker that exceeds it
 * fails its chart with an error (the build stops) rather than taking the machine's memory.
 */
export const CHART_WORKER_OLD_GENERATION_MB = 512;

/**
 * Jobs waiting before a pool starts another worker. A chart worker takes about a second of CPU to
 * load vega and vega-lite, some 40 charts' worth; with fewer waiting, the workers running draw
 * them sooner than a new one would start. On the 2-core development machine, a 1,000-variant
 * rebuild that draws 8 charts took 5.7-6.9 s with one worker against 6.2-7.6 s with two (the
 * second one's start competed with the analysis for the cores).
 */
export const POOL_SPAWN_BACKLOG = 16;

interface Job<I, O> {
  input: I;
  resolve: (o: O) => void;
  reject: (e: Error) => void;
}

/** Message protocol of pool workers: in {id, input}; out {id, output} or {id, error}. */
export interface WorkerReply<O> {
  id: number;
  output?: O;
  error?: string;
}

/**
 * Fixed-size pool of workers running `script`; one job in flight per worker, FIFO queues: jobs
 * run with `later` wait until no other job is queued.
 * Workers start on first use and are unref'd while idle, so a pool never holds the process open.
 */
export class WorkerPool<I, O> {
  private idle: Worker[] = [];
  private all: Worker[] = [];
  private queue: Job<I, O>[] = [];
  private laterQueue: Job<I, O>[] = [];
  private running = new Map<Worker, { id: number; job: Job<I, O> }>();
  private nextId = 1;
  private closed = false;

  constructor(
    private readonly script: URL,
    readonly size: number = defaultWorkers(),
    private readonly resourceLimits?: ResourceLimits,
    private readonly preload: readonly string[] = [],
  ) {}

  run(input: I, later = false): Promise<O> {
    if (this.closed) return Promise.reject(new Error('worker pool is closed'));
    return new Promise<O>((resolve, reject) => {
      (later ? this.laterQueue : this.queue).push({ input, resolve, reject });
      this.pump();
    });
  }

  /** Workers started and not failed. */
  get started(): number {
    return this.all.length;
  }

  /** Start `count` workers now (each loads its script) rather than on first use; they wait unref'd. */
  start(count: number = this.size): void {
    if (this.closed) return;
    while (this.all.length < Math.min(count, this.size)) this.idle.push(this.spawn());
    for (const w of this.idle) w.unref();
  }

  private spawn(): Worker {
    const w = startWorker(this.script, this.resourceLimits, this.preload);
    w.on('message', (msg: WorkerReply<O>) => {
      const cur = this.running.get(w);
      if (!cur || cur.id !== msg.id) return;
      this.running.delete(w);
      if (msg.error !== undefined) cur.job.reject(new Error(msg.error));
      else cur.job.resolve(msg.output as O);
      this.idle.push(w);
      this.pump();
    });
    w.on('error', (err) => this.fail(w, err));
    w.on('exit', (code) => {
      if (!this.closed) this.fail(w, new Error(`render worker exited with code ${code}`));
    });
    this.all.push(w);
    return w;
  }

  private fail(w: Worker, err: Error): void {
    const cur = this.running.get(w);
    this.running.delete(w);
    this.all = this.all.filter((x) => x !== w);
    this.idle = this.idle.filter((x) => x !== w);
    cur?.job.reject(err);
    this.pump();
  }

  private pump(): void {
    while (this.queue.length > 0 || this.laterQueue.length > 0) {
      let w = this.idle.pop();
      // A worker more only when the jobs waiting would keep it busy longer than it takes to start
      // (loading its script): a rebuild that draws a few charts leaves the other cores to the build.
      if (!w && this.all.length < this.size && (this.all.length === 0 || this.queue.length + this.laterQueue.length >= POOL_SPAWN_BACKLOG)) w = this.spawn();
      if (!w) break;
      const job = (this.queue.length > 0 ? this.queue.shift() : this.laterQueue.shift()) as Job<I, O>;
      const id = this.nextId++;
      this.running.set(w, { id, job });
      w.ref();
      w.postMessage({ id, input: job.input });
    }
    for (const w of this.idle) w.unref();
  }

  async close(): Promise<void> {
    this.closed = true;
    for (const j of [...this.queue.splice(0), ...this.laterQueue.splice(0)]) j.reject(new Error('worker pool closed'));
    await Promise.all(this.all.map((w) => w.terminate()));
    this.all = [];
    this.idle = [];
  }
}

export interface ChartRendererOptions {
  /** Worker threads; 0 renders in this thread. Default: defaultWorkers(). */
  workers?: number;
  /** Cache folder, or false for no cache. Default: DEFAULT_CHART_CACHE under the working directory. */
  cacheDir?: string | false;
}

/** What a page shows of one chart besides its title: the SVG, its description and its numbers table. */
export interface CachedBlock {
  svg: string;
  description: string;
  table: { columns: string[]; rows: string[][]; note?: string };
}

export interface ChartRenderer {
  /** The SVG of a chart. With `later`, it is drawn when no other chart waits (charts nothing is blocked on). */
  render(spec: ChartSpec, options?: RenderOptions, later?: boolean): Promise<string>;
  /**
   * A chart block from the cache by its key parts (see blockEntryKey), or made by `make` and
   * stored. Without a cache, `make` every time. `make` draws with the function it is given: this
   * renderer without its SVG cache, as the block stores the SVG already (hashing every spec for
   * an SVG entry that only a block miss with an unchanged spec could use cost seconds per
   * thousand variants on a cold build).
   */
  block(keyParts: readonly string[], make: (draw: DrawFn) => Promise<CachedBlock>): Promise<CachedBlock>;
  /**
   * Whole pages kept in the cache by a key of everything they are made from (see
   * src/site/build-site.ts and ChartCache.fetchPage/keepPage). Absent without a cache.
   */
  pages?: Pick<ChartCache, 'fetchPage' | 'keepPage'>;
  /**
   * Start `count` worker threads now (default: all), so that they have loaded vega and vega-lite
   * (about a second) by the time the first chart is asked for. Without this they start on first
   * use; more start as charts wait (POOL_SPAWN_BACKLOG).
   */
  start(count?: number): void;
  /** Charts rendered and charts served from the cache. (process.cpuUsage() already counts worker threads.) */
  stats(): { rendered: number; cached: number };
  close(): Promise<void>;
}

/** Draws one chart: the SVG for a spec and its render options. */
export type DrawFn = (spec: ChartSpec, options: RenderOptions) => Promise<string>;

interface RenderJob {
  spec: ChartSpec;
  options: RenderOptions;
}

/** A renderer with an optional worker pool and an optional content-addressed cache. */
export function createChartRenderer(options: ChartRendererOptions = {}): ChartRenderer {
  const workers = options.workers ?? defaultWorkers();
  const cache = options.cacheDir === false ? undefined : new ChartCache(options.cacheDir ?? DEFAULT_CHART_CACHE);
  const pool = workers > 0 ? new WorkerPool<RenderJob, string>(new URL('./render-worker.ts', import.meta.url), workers, { maxOldGenerationSizeMb: CHART_WORKER_OLD_GENERATION_MB }, CHART_WORKER_PRELOAD) : undefined;
  const pending = new Map<string, Promise<string>>();
  let rendered = 0;
  let cached = 0;
  const draw = (spec: ChartSpec, opts: RenderOptions, later = false) => (pool ? pool.run({ spec, options: opts }, later) : renderSvg(spec, opts));
  return {
    async render(spec, opts = {}, later = false) {
      // The id prefix comes from opts.key, or else from the content key: fix it here once.
      const full: RenderOptions = { ...opts, key: opts.key ?? chartKey(spec) };
      if (!cache) {
        rendered++;
        return draw(spec, full, later);
      }
      const entry = cacheEntryKey(spec, full);
      const inFlight = pending.get(entry);
      if (inFlight) return inFlight;
      const hit = cache.get(entry);
      if (hit !== undefined) {
        cached++;
        return hit;
      }
      const p = draw(spec, full, later).then((svg) => {
        cache.set(entry, svg);
        rendered++;
        return svg;
      });
      pending.set(entry, p);
      try {
        return await p;
      } finally {
        pending.delete(entry);
      }
    },
    async block(keyParts, make) {
      // Drawn without the SVG cache, counted as drawn.
      const drawCounted: DrawFn = (spec, opts) => {
        rendered++;
        return draw(spec, { ...opts, key: opts.key ?? chartKey(spec) });
      };
      if (!cache) return make(drawCounted);
      const entry = blockEntryKey(keyParts);
      const hit = cache.get(entry, 'json');
      if (hit !== undefined) {
        try {
          const block = JSON.parse(hit) as CachedBlock;
          cached++;
          return block;
        } catch {
          // unreadable entry: make it again
        }
      }
      const block = await make(drawCounted);
      cache.set(entry, JSON.stringify(block), 'json');
      return block;
    },
    ...(cache ? { pages: { fetchPage: cache.fetchPage.bind(cache), keepPage: cache.keepPage.bind(cache) } } : {}),
    start: (count?: number) => pool?.start(count),
    stats: () => ({ rendered, cached }),
    close: async () => {
      await pool?.close();
    },
  };
}
