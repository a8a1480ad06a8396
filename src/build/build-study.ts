/**
 * buildStudy: the I/O shell around the pure pipeline.
 *
 *   study folder ──readStudyFolder──▶ files (bytes, SHA-256)      src/study/read-folder.ts
 *                ──loadStudy───────▶ Study | issues               src/study/load.ts (pure)
 *                ──analyseStudy────▶ StudyResults                 src/analysis/analyse-study.ts (pure)
 *                ──buildSite───────▶ pages + SVG charts            src/site/build-site.ts
 *                ──downloads───────▶ results.json, results.csv
 *                ──swapIn──────────▶ output folder (atomic rename; the last good output survives a failure)
 *
 * Returns issues as data; the CLI decides what to print and the exit code.
 */
import { rmSync, mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { analyseStudy } from '../analysis/analyse-study.js';
import { analyseUnitsParallel } from '../analysis/parallel.js';
import { ASSAYS } from '../assays/registry.js';
import { chartsFromModules } from '../charts/assay-charts.js';
import { planOutput, makeStaging, swapIn } from '../cli/output.js';
import { resultsCsv } from '../results/csv.js';
import type { StudyResults } from '../results/types.js';
import { buildSite } from '../site/build-site.js';
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
}

/** Studies with more data rows than this are analysed in worker threads (below it, starting workers costs more than it saves). */
export const PARALLEL_ANALYSIS_MIN_ROWS = 100_000;

export interface BuildOutcome {
  ok: boolean;
  issues: Issue[];
  out?: string;
  pages?: number;
  results?: StudyResults;
  movedAside?: string;
}

export async function buildStudy(studyDir: string, outDir: string, options: BuildOptions = {}): Promise<BuildOutcome> {
  const phase = options.onPhase ?? (() => {});
  phase('read');
  const plan = planOutput(studyDir, outDir, options.force ?? false);
  const folder = readStudyFolder(studyDir);
  phase('check');
  const loaded = loadStudy(folder);
  const issues = loaded.issues;
  if (!loaded.study || issues.some((i) => i.severity === 'error')) return { ok: false, issues };
  phase('analyse');
  const epoch = options.sourceDateEpoch;
  const builtAt = new Date(epoch !== undefined ? epoch * 1000 : Date.now()).toISOString();
  const totalRows = Object.values(loaded.study.rows).reduce((n, rows) => n + (rows?.length ?? 0), 0);
  const units =
    totalRows >= PARALLEL_ANALYSIS_MIN_ROWS
      ? await analyseUnitsParallel(loaded.study, ASSAYS, { workers: 'auto', onProgress: (d, t) => options.onProgress?.('analyse', d, t) })
      : undefined;
  const results = analyseStudy(loaded.study, { toolVersion: TOOL_VERSION, builtAt, units });
  results.issues = issues;
  const tag = String(process.pid);
  const staging = makeStaging(plan.out, tag);
  try {
    phase('pages');
    const site = await buildSite(results, staging, {
      chartsFor: chartsFromModules(results, ASSAYS),
      sourceDateEpoch: epoch,
      ...(options.chartCache !== undefined ? { chartCache: options.chartCache } : {}),
      ...(options.onProgress ? { onProgress: options.onProgress } : {}),
    });
    phase('write');
    const downloads = path.join(staging, 'downloads');
    mkdirSync(downloads, { recursive: true });
    writeFileSync(path.join(downloads, 'results.json'), JSON.stringify(results) + '\n');
    writeFileSync(path.join(downloads, 'results.csv'), resultsCsv(results));
    const movedAside = swapIn(staging, plan.out, plan.replaceForeign, tag);
    return { ok: true, issues, out: plan.out, pages: site.pages, results, movedAside };
  } catch (err) {
    rmSync(staging, { recursive: true, force: true });
    throw err;
  }
}
