/**
 * Static report site from StudyResults.
 *
 *   StudyResults ──view builders (slugs, relative paths, numbers as text)──▶ site data
 *                ──chart specs ──renderSvg──▶ SVG strings inside the site data
 *   site data ──Eleventy (templates/, .eleventy.js, Nunjucks autoescape)──▶ HTML in outDir
 *   templates/assets ──copy──▶ outDir/assets
 *
 * Writes into the given (empty) folder; the caller swaps folders and writes downloads/.
 */
import { cp } from 'node:fs/promises';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import Eleventy from '@11ty/eleventy';
import type { ChartsFor } from '../charts/assay-charts.js';
import { DEFAULT_CHART_CACHE } from '../charts/cache.js';
import { type ChartRenderer, createChartRenderer, defaultWorkers } from '../charts/pool.js';
import type { StudyResults } from '../results/types.js';
import { PATHS, uniqueSlugs } from './paths.js';
import { FUNCTION_CALL_STYLE } from '../charts/palette.js';
import type { FunctionCall } from '../results/types.js';
import { type RenderFn, STANDARD_CAVEATS, functionCall } from './view-common.js';
import { assayPages, compareCharts, methodsData, provenanceData, residueCharts } from './view-study.js';
import { indexRows, variantPages } from './view-variant.js';

export interface BuildSiteOptions {
  /** Per-variant assay charts (data and fits beside WT); see chartsFromModules(). */
  chartsFor?: ChartsFor;
  /** Seconds since the epoch (SOURCE_DATE_EPOCH); shown as the build time instead of provenance.builtAt. */
  sourceDateEpoch?: number;
  /**
   * Chart render worker threads: a number (0 = render in this thread), or 'auto' for
   * os.availableParallelism() (at least 1). Default 'auto'.
   */
  workers?: number | 'auto';
  /**
   * Content-addressed SVG cache folder, or false for none. Default DEFAULT_CHART_CACHE:
   * '.cache/myofolio/charts' under the current working directory. Never pass a folder inside
   * the study folder or the output folder.
   */
  chartCache?: string | false;
  /** A renderer made by the caller (createChartRenderer); overrides workers/chartCache and is not closed here. */
  renderer?: ChartRenderer;
  /** Progress: ('charts', variant pages done, total) while rendering, then ('pages', 0, 1) and ('pages', 1, 1) around Eleventy. */
  onProgress?: (phase: string, done: number, total: number) => void;
}

const templatesDir = fileURLToPath(new URL('../../templates/', import.meta.url));
const configPath = fileURLToPath(new URL('../../.eleventy.js', import.meta.url));

/** Everything the templates read, computed from the results alone. */
export async function siteData(results: StudyResults, options: BuildSiteOptions = {}) {
  const slugs = uniqueSlugs(results.variants.map((v) => v.id));
  const builtAt =
    options.sourceDateEpoch !== undefined && Number.isFinite(options.sourceDateEpoch)
      ? new Date(options.sourceDateEpoch * 1000).toISOString().replace('.000Z', 'Z')
      : results.provenance.builtAt;
  const rows = indexRows(results, slugs);
  const workers = options.workers === undefined || options.workers === 'auto' ? defaultWorkers() : options.workers;
  const cacheDir = options.chartCache ?? DEFAULT_CHART_CACHE;
  const ownRenderer = options.renderer || (workers === 0 && cacheDir === false) ? undefined : createChartRenderer({ workers, cacheDir });
  const renderer = options.renderer ?? ownRenderer;
  const render: RenderFn | undefined = renderer ? (spec, o) => renderer.render(spec, o) : undefined;
  try {
  const progress = options.onProgress;
  const total = results.variants.length;
  progress?.('charts', 0, total);
  const assays = await assayPages(results, render);
  const nav = [
    { key: 'index', label: 'Variants', href: PATHS.index },
    ...assays.map((a) => ({ key: `assay-${a.id}`, label: a.label, href: a.path })),
    { key: 'residues', label: 'Residue map', href: PATHS.residues },
    { key: 'compare', label: 'Assays compared', href: PATHS.compare },
    { key: 'methods', label: 'Methods', href: PATHS.methods },
    { key: 'provenance', label: 'Provenance', href: PATHS.provenance },
    { key: 'downloads', label: 'Downloads', href: PATHS.downloads },
  ];
  const uniq = (xs: string[]) => [...new Set(xs)].sort();
  return {
    study: results.study,
    tool: results.tool,
    builtAt,
    standardCaveats: STANDARD_CAVEATS,
    legend: (Object.keys(FUNCTION_CALL_STYLE) as FunctionCall[]).map(functionCall),
    nav,
    paths: PATHS,
    assayList: results.assays.map((a) => ({ id: a.id, label: a.label })),
    index: {
      rows,
      genes: uniq(rows.map((r) => r.gene)),
      calls: uniq(rows.map((r) => r.overall.call)),
      flags: uniq(rows.flatMap((r) => r.flags)),
      search: Object.fromEntries(rows.map((r) => [r.id, r.search])),
    },
    variants: await variantPages(results, slugs, options.chartsFor, { render, onVariant: progress ? (d) => progress('charts', d, total) : undefined }),
    assays,
    residues: await residueCharts(results, render),
    compare: await compareCharts(results, render),
    methods: methodsData(results),
    provenance: provenanceData(results),
  };
  } finally {
    await ownRenderer?.close();
  }
}

/** Build the site into outDir (which should be empty). Returns the number of HTML pages written. */
export async function buildSite(results: StudyResults, outDir: string, options: BuildSiteOptions = {}): Promise<{ pages: number }> {
  const site = await siteData(results, options);
  options.onProgress?.('pages', 0, 1);
  const elev = new Eleventy(templatesDir, outDir, {
    configPath,
    quietMode: true,
    config(cfg) {
      cfg.addGlobalData('site', site);
    },
  });
  elev.disableLogger();
  // write() resolves to [passthroughCopies, templates] for the file system.
  const written = (await elev.write()) as unknown[];
  await cp(join(templatesDir, 'assets'), join(outDir, 'assets'), { recursive: true });
  options.onProgress?.('pages', 1, 1);
  const templates = (Array.isArray(written[1]) ? written[1] : []) as Array<{ outputPath?: unknown }>;
  return { pages: templates.filter((r) => typeof r.outputPath === 'string' && r.outputPath.endsWith('.html')).length };
}
