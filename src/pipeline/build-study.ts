/**
 * buildStudy: the I/O shell around the pure pipeline, in one thread.
 *
 *   study folder ──readStudyFolder──▶ files (bytes, SHA-256)            src/study/read-folder.ts
 *                ──loadStudy───────▶ Study | issues                     src/study/load.ts (pure)
 *                ──analyseUnits────▶ UnitResult[] (per assay × batch, through the store)
 *                ──analyseStudy────▶ StudyResults                       src/analysis/analyse-study.ts (pure)
 *                ──downloads───────▶ results.json, results.csv
 *                ──buildSite───────▶ pages, single-file reports (quoting results.json's SHA-256), SVG charts (through the store) src/site/build-site.ts
 *                ──swapIn──────────▶ output folder (atomic rename; the last good output survives a failure)
 *
 * The store (src/pipeline/store.ts) keeps a module's units of a batch, each chart's SVG and each
 * variant's assay charts by the units they draw; a rebuild reads and checks every file, fits only
 * the batches whose files changed and draws only the charts whose specs changed. Returns issues
 * as data; the CLI decides what to print and the exit code.
 */
import { existsSync, rmSync, mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { analyseStudy } from '../analysis/analyse-study.js';
import { ASSAYS } from '../assays/registry.js';
import { chartsFromModules } from '../charts/assay-charts.js';
import { renderSvg } from '../charts/render.js';
import { resultsCsv } from '../results/csv.js';
import { writeJsonStreamed } from '../results/json.js';
import type { StudyResults, UnitResult } from '../results/types.js';
import { PAGES_PER_RUN, buildSite } from '../site/build-site.js';
import type { SiteArchive } from '../site/archive-links.js';
import { loadStudy } from '../study/load.js';
import { readStudyFolder } from '../study/read-folder.js';
import type { Issue } from '../study/types.js';
import { TOOL_VERSION } from '../version.js';
import { analyseUnits } from './analyse-units.js';
import { collectGarbage } from './collect-garbage.js';
import { installedFingerprint } from './fingerprint.js';
import { describeFault, openFileLimit } from './faults.js';
import { OutputError, type RemovePrevious, honourUmask, planOutput, makeStaging, swapIn } from './output.js';
import { Store, defaultStoreDir, storeDirFor, storeFolderProblem } from './store.js';
import { type ChartCounts, countedDraw, storedBlock, storedRender } from './stored-render.js';

export interface BuildOptions {
  force?: boolean;
  /** Seconds since the epoch for the build time stamp (SOURCE_DATE_EPOCH); default now. */
  sourceDateEpoch?: number;
  /** Progress callback (phase name); the CLI prints it. */
  onPhase?: (phase: string) => void;
  /** Finer progress within a phase: (phase, done, total). */
  onProgress?: (phase: string, done: number, total: number) => void;
  /**
   * Store folder, or false for none. Default: $XDG_CACHE_HOME/myofolio, else ~/.cache/myofolio
   * (src/pipeline/store.ts). A folder inside the study folder is refused: the default is used.
   */
  store?: string | false;
  /**
   * Which kinds of store entry are used (default all): 'units' (a module's units of a batch),
   * 'svg' (a chart by its spec), 'block' (a variant's assay chart by its units). For the benchmark,
   * which measures what each earns.
   */
  storeKinds?: ReadonlyArray<StoreKind>;
  /** Fingerprint of what computes the stored entries (default: this installation's, src/pipeline/fingerprint.ts). */
  fingerprint?: string;
  /** How the previous output is removed after the swap (see src/pipeline/output.ts); default 'now'. The CLI removes it in the background. */
  removePrevious?: RemovePrevious;
  /** When the study is built inside an archive: its links and change lines, made from the study's results (src/pipeline/build-archive.ts). */
  archive?: (results: StudyResults) => SiteArchive;
  /** The working folder, which the output may neither be nor contain; default process.cwd(). */
  cwd?: string;
  /**
   * Write the site as a plain new folder at the output path, without the link and versions
   * (src/pipeline/output.ts): for a caller that builds it inside its own version and swaps that (the archive).
   */
  plainFolder?: boolean;
}

export type StoreKind = 'units' | 'svg' | 'block';

export interface BuildOutcome {
  ok: boolean;
  issues: Issue[];
  out?: string;
  pages?: number;
  /** Charts drawn and charts served from the store. */
  charts?: ChartCounts;
  results?: StudyResults;
  movedAside?: string;
  /** One-line notes for the user (a refused cache folder, damaged store entries discarded). */
  notes: string[];
}

/** The store a build uses (never in the study or output folder), and the note about its folder if it had to be changed. */
export function openStore(studyDir: string, options: Pick<BuildOptions, 'store' | 'fingerprint'>, outDir?: string): { store?: Store; note?: string } {
  if (options.store === false) return {};
  const { dir, note } = storeDirFor(studyDir, options.store, outDir);
  const problem = dir !== false ? storeFolderProblem(dir) : undefined;
  if (dir === false || problem) return { note: problem ?? note };
  return { store: new Store(dir, options.fingerprint ?? installedFingerprint()), ...(note ? { note } : {}) };
}

/** Read, check and analyse; with a store, the units of each assay × batch whose inputs are unchanged come from it. */
export function loadAndAnalyse(studyDir: string, options: Pick<BuildOptions, 'sourceDateEpoch' | 'onPhase'>, store?: Store): { issues: Issue[]; results?: StudyResults; unitDigests?: Map<UnitResult, string> } {
  const phase = options.onPhase ?? (() => {});
  let folder: ReturnType<typeof readStudyFolder> | undefined = readStudyFolder(studyDir);
  phase('check');
  const loaded = loadStudy(folder);
  folder = undefined; // the files' bytes can go now: the rows hold what the analysis needs
  const issues = loaded.issues;
  if (!loaded.study || issues.some((i) => i.severity === 'error')) return { issues };
  phase('analyse');
  // A large study's parsing garbage goes before the fits add theirs (src/pipeline/collect-garbage.ts).
  if (loaded.study.variants.length > PAGES_PER_RUN) collectGarbage();
  const epoch = options.sourceDateEpoch;
  const builtAt = new Date(epoch !== undefined ? epoch * 1000 : Date.now()).toISOString();
  const got = analyseUnits(loaded.study, ASSAYS, store);
  const results = analyseStudy(loaded.study, { toolVersion: TOOL_VERSION, builtAt, units: got.units, issues });
  // analyseStudy copies the units in their order (marking exclusions): each copy takes its original's digest.
  const digests = got.digests;
  const unitDigests = digests ? new Map(results.units.map((u, i) => [u, digests[i] as string])) : undefined;
  return { issues: results.issues, results, ...(unitDigests ? { unitDigests } : {}) };
}

/**
 * Check, analyse and write the site. A fault of the machine (a full disk, too few file
 * descriptors, a folder that may not be written) is thrown as an OutputError with a plain message
 * and fix; the previous output is then unchanged (src/pipeline/output.ts).
 */
export async function buildStudy(studyDir: string, outDir: string, options: BuildOptions = {}): Promise<BuildOutcome> {
  const fileLimit = openFileLimit(); // read now: once the files run out, it cannot be read
  try {
    return await buildOrThrow(studyDir, outDir, options);
  } catch (err) {
    const fault = err instanceof OutputError ? undefined : describeFault(err, { where: `the output folder ${outDir}`, ...(fileLimit !== undefined ? { fileLimit } : {}) });
    if (!fault) throw err;
    throw new OutputError(`${fault.message} Nothing was built; the previous output, if any, is unchanged.`, fault.fix);
  }
}

async function buildOrThrow(studyDir: string, outDir: string, options: BuildOptions): Promise<BuildOutcome> {
  const phase = options.onPhase ?? (() => {});
  phase('read');
  const { store, note } = openStore(studyDir, options, outDir);
  // The cache folder used, and the one asked for if it exists (a build that falls back from it must not move it aside).
  const asked = options.store === false ? undefined : options.store ?? defaultStoreDir();
  const caches = [store?.dir, asked !== undefined && existsSync(asked) ? asked : undefined].filter((d): d is string => d !== undefined);
  const plan = planOutput(studyDir, outDir, options.force ?? false, { ...(options.cwd ? { cwd: options.cwd } : {}), protect: caches.map((dir) => ({ dir, name: "myofolio's cache folder" })), ...(options.plainFolder ? { plain: true } : {}) });
  const notes = note ? [note] : [];
  const withStoreNote = () => {
    const damaged = store?.counts.discarded.length ?? 0;
    if (damaged > 0) notes.push(`${damaged} damaged cache ${damaged === 1 ? 'entry was' : 'entries were'} discarded and computed again (cache folder ${store?.dir}).`);
    return notes;
  };
  const kinds = new Set<StoreKind>(options.storeKinds ?? ['units', 'svg', 'block']);
  const { issues, results, unitDigests } = loadAndAnalyse(studyDir, options, kinds.has('units') ? store : undefined);
  if (!results) return { ok: false, issues, notes: withStoreNote() };
  const large = results.variants.length > PAGES_PER_RUN;
  const staging = makeStaging(plan);
  const charts: ChartCounts = { rendered: 0, stored: 0 };
  let pages: number;
  let movedAside: string | undefined;
  try {
    // The downloads first: the single-file reports quote the SHA-256 of the results.json written here.
    phase('write');
    const downloads = path.join(staging, 'downloads');
    mkdirSync(downloads, { recursive: true });
    // Streamed: the same bytes as JSON.stringify(results) + '\n', without one string of the whole file.
    const resultsSha256 = writeJsonStreamed(path.join(downloads, 'results.json'), results as unknown as Record<string, unknown>);
    writeFileSync(path.join(downloads, 'results.csv'), resultsCsv(results));
    phase('pages');
    // A large build collects its dead rows before the pages and after each run of them (src/pipeline/collect-garbage.ts).
    if (large) collectGarbage();
    const site = await buildSite(results, staging, {
      chartsFor: chartsFromModules(results, ASSAYS),
      sourceDateEpoch: options.sourceDateEpoch,
      resultsSha256,
      ...(store && kinds.has('svg') ? { render: storedRender(store, charts) } : {}),
      ...(store && kinds.has('block') ? { block: storedBlock(store, charts, unitDigests), blockRender: countedDraw(renderSvg, charts) } : {}),
      ...(large ? { afterRun: collectGarbage } : {}),
      ...(options.onProgress ? { onProgress: options.onProgress } : {}),
      ...(options.archive ? { archive: options.archive(results) } : {}),
    });
    pages = site.pages;
    honourUmask(staging);
    movedAside = swapIn(plan, staging, options.removePrevious);
  } catch (err) {
    rmSync(staging, { recursive: true, force: true });
    throw err;
  }
  // The new site is in place: nothing below may remove it.
  store?.prune();
  return { ok: true, issues, out: plan.out, pages, charts, results, notes: withStoreNote(), ...(movedAside ? { movedAside } : {}) };
}
