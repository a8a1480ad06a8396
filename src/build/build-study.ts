/**
 * buildStudy: the I/O shell around the pure pipeline.
 *
 *   study folder ──readStudyFolder──▶ files (bytes, SHA-256)      src/study/read-folder.ts
 *                ──loadStudy───────▶ Study | issues               src/study/load.ts (pure)
 *                ──units per batch─▶ UnitResult[] (cached by batch or unit) src/build/analysis-cache.ts
 *                ──analyseStudy────▶ StudyResults                 src/analysis/analyse-study.ts (pure)
 *                ──buildSite───────▶ pages + SVG charts            src/site/build-site.ts
 *                ──downloads───────▶ results.json, results.csv
 *                ──swapIn──────────▶ output folder (atomic rename; the last good output survives a failure)
 *                ──pruneCache──────▶ cache entries unused for 30 days removed (once a day) src/build/cache-prune.ts
 *
 * Returns issues as data; the CLI decides what to print and the exit code.
 */
import { rmSync, mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { analyseStudy } from '../analysis/analyse-study.js';
import { DEFAULT_ANALYSIS_CACHE, analyseUnitsCached, digestStore } from './analysis-cache.js';
import { pruneCache } from './cache-prune.js';
import { DEFAULT_CHART_CACHE } from '../charts/cache.js';
import { HEAVY_PARSE_BYTES, collectGarbage } from '../memory.js';
import { ASSAYS } from '../assays/registry.js';
import { chartsFromModules } from '../charts/assay-charts.js';
import { type RemovePrevious, planOutput, makeStaging, swapIn } from '../cli/output.js';
import { resultsCsv } from '../results/csv.js';
import { writeJsonInSlices } from '../results/json.js';
import type { StudyResults } from '../results/types.js';
import { buildSite, createSiteRenderer } from '../site/build-site.js';
import { loadStudy } from '../study/load.js';
import { readStudyFolder } from '../study/read-folder.js';
import type { Issue } from '../study/types.js';
import { TOOL_VERSION } from '../version.js';

export interface BuildOptions {
  force?: boolean;
  /** Seconds since the epoch for the build time stamp (SOURCE_DATE_EPOCH); default now. */
  sourceDateEpoch?: number;
  /** Progress callback (phase name); the CLI prints it. */
  onPhase?: (phase: string) => void;
  /** Finer progress within a phase: (phase, done, total). */
  onProgress?: (phase: string, done: number, total: number) => void;
  /** Chart SVG cache folder, or false for none (default: the user's cache folder, see src/charts/cache.ts). */
  chartCache?: string | false;
  /**
   * Analysis cache folder, or false for none (default: beside the chart cache, see
   * src/build/analysis-cache.ts): a rebuild re-fits only the batches or units whose rows changed.
   */
  analysisCache?: string | false;
  /** Worker threads for analysis and charts: 'auto' (default, one per core) or a number (0 = all in this thread). */
  workers?: number | 'auto';
  /** How the previous output is removed after the swap (see src/cli/output.ts); default 'now'. The CLI removes it in the background. */
  removePrevious?: RemovePrevious;
}

/** Rows to analyse (those not served by the analysis cache) from which worker threads are used; below it, starting workers costs more than it saves. */
export const PARALLEL_ANALYSIS_MIN_ROWS = 100_000;

export interface BuildOutcome {
  ok: boolean;
  issues: Issue[];
  out?: string;
  pages?: number;
  /** Charts drawn and charts served from the cache. */
  charts?: { rendered: number; cached: number };
  results?: StudyResults;
  movedAside?: string;
}

/**
 * Read, check and analyse. A function of its own so that the file bytes and the loaded rows
 * (most of a large study's memory) can be collected once the results exist: only the results
 * and the issues leave it.
 */
export async function loadAndAnalyse(
  studyDir: string,
  options: BuildOptions,
  hooks: { /** Called once, after the first reading and before analysis, with the bytes of CSV parsed. */ afterLoad?: (parsedBytes: number) => void } = {},
): Promise<{ issues: Issue[]; results?: StudyResults; parsedBytes: number }> {
  const phase = options.onPhase ?? (() => {});
  // With the analysis cache, files whose batches are all cached are not parsed (their digests
  // stand in for them); if a batch they hold turns out not to be cached, they are read after all.
  // Files whose SHA-256 is known by their identity are read only if they are parsed.
  const digests = options.analysisCache === false ? undefined : digestStore(options.analysisCache);
  let folder: ReturnType<typeof readStudyFolder> | undefined = readStudyFolder(studyDir, digests ? { known: digests.known } : {});
  digests?.saveKnown();
  phase('check');
  const mustRead = new Set<string>();
  let analysing = false;
  const epoch = options.sourceDateEpoch;
  const builtAt = new Date(epoch !== undefined ? epoch * 1000 : Date.now()).toISOString();
  /** Bytes of the files parsed (not left out), over all passes. */
  let parsedBytes = 0;
  for (;;) {
    const files = (folder as NonNullable<typeof folder>).files;
    const loaded = loadStudy(folder as NonNullable<typeof folder>, digests ? { reuse: { context: digests.reuse.context, get: (key, path) => (mustRead.has(path) ? undefined : digests.reuse.get(key, path)) } } : {});
    for (const f of loaded.study?.files ?? []) if (!loaded.study?.omitted?.has(f.path)) parsedBytes += files.get(f.path)?.length ?? 0;
    if (digests && loaded.digests) {
      digests.save(loaded.digests);
      // Read now, read again on a second pass (its new digest must not leave it out).
      for (const d of loaded.digests) mustRead.add(d.path);
    }
    // The file bytes are needed again only if some files were left out.
    if (!loaded.study?.omitted) folder = undefined;
    const issues = loaded.issues;
    if (!loaded.study || issues.some((i) => i.severity === 'error')) return { issues, parsedBytes };
    // Once: a second pass (files read after all) counts as analysis.
    if (!analysing) {
      hooks.afterLoad?.(parsedBytes);
      phase('analyse');
    }
    analysing = true;
    const got = await analyseUnitsCached(loaded.study, ASSAYS, {
      workers: options.workers ?? 'auto',
      minRowsForWorkers: PARALLEL_ANALYSIS_MIN_ROWS,
      ...(options.analysisCache !== undefined ? { cacheDir: options.analysisCache } : {}),
      onProgress: (d, t) => options.onProgress?.('analyse', d, t),
    });
    if (got.needRows) {
      // Only files left out are asked for, and those join mustRead: the loop ends.
      got.needRows.forEach((p) => mustRead.add(p));
      continue;
    }
    const results = analyseStudy(loaded.study, { toolVersion: TOOL_VERSION, builtAt, units: got.units });
    results.issues = issues;
    return { issues, results, parsedBytes };
  }
}

export async function buildStudy(studyDir: string, outDir: string, options: BuildOptions = {}): Promise<BuildOutcome> {
  const phase = options.onPhase ?? (() => {});
  phase('read');
  const plan = planOutput(studyDir, outDir, options.force ?? false);
  // Made here so that on a light rebuild one worker thread starts (loading the chart libraries)
  // while the study is analysed; after a heavy load they start when the first charts are asked
  // for, since a cold analysis already holds most of the build's memory.
  const renderer = createSiteRenderer(options);
  try {
    const { issues, results, parsedBytes } = await loadAndAnalyse(studyDir, options, {
      afterLoad: (bytes) => {
        // One worker: a light rebuild draws few charts, and more start if many wait.
        if (bytes < HEAVY_PARSE_BYTES) renderer?.start(1);
      },
    });
    if (!results) return { ok: false, issues };
    // The file bytes and rows are garbage now: collect them before the charts, not two minutes
    // later. After a rebuild that parsed a few files, a full collection costs more than it frees.
    if (parsedBytes >= HEAVY_PARSE_BYTES) collectGarbage();
    const epoch = options.sourceDateEpoch;
    const tag = String(process.pid);
    const staging = makeStaging(plan.out, tag);
    // results.json is written in slices while the site is made, in the time the build waits on
    // its chart workers (the results do not change from here on).
    const stopWriting = new AbortController();
    let writing: Promise<void> | undefined;
    try {
      const downloads = path.join(staging, 'downloads');
      mkdirSync(downloads, { recursive: true });
      writing = writeJsonInSlices(path.join(downloads, 'results.json'), results as unknown as Record<string, unknown>, { signal: stopWriting.signal });
      writing.catch(() => undefined);
      phase('pages');
      const site = await buildSite(results, staging, {
        chartsFor: chartsFromModules(results, ASSAYS),
        sourceDateEpoch: epoch,
        ...(renderer ? { renderer } : { workers: 0, chartCache: false }),
        ...(options.onProgress ? { onProgress: options.onProgress } : {}),
      });
      phase('write');
      // Streamed: the same bytes as JSON.stringify(results) + '\n', without one string of the whole file.
      await writing;
      writeFileSync(path.join(downloads, 'results.csv'), resultsCsv(results));
      const movedAside = swapIn(staging, plan.out, plan.replaceForeign, tag, options.removePrevious);
      // Once a day at most: cache entries no build has used for CACHE_KEEP_DAYS go.
      for (const dir of [options.chartCache ?? DEFAULT_CHART_CACHE, options.analysisCache ?? DEFAULT_ANALYSIS_CACHE]) if (dir !== false) pruneCache(path.resolve(dir));
      return { ok: true, issues, out: plan.out, pages: site.pages, charts: site.charts, results, movedAside };
    } catch (err) {
      stopWriting.abort();
      await writing?.catch(() => undefined);
      rmSync(staging, { recursive: true, force: true });
      throw err;
    }
  } finally {
    await renderer?.close();
  }
}
