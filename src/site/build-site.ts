/**
 * Static report site from StudyResults.
 *
 *   StudyResults ──view builders (slugs, relative paths, numbers as text)──▶ site data
 *                ──chart specs ──render (renderSvg, or the build's stored render)──▶ SVG strings
 *   variant pages, in runs of PAGES_PER_RUN: charts ──▶ Eleventy on templates/variant.njk and
 *                 report.njk alone ──▶ each variant's page and its single-file report in outDir
 *   study pages: site data without variants ──Eleventy (templates/, .eleventy.js)──▶ HTML in outDir
 *   templates/assets ──passthrough copy (.eleventy.js)──▶ outDir/assets
 *
 * The site data is built by src/site/site-data.ts, the same as Eleventy's own command line builds
 * it through the data cascade (templates/_data/site.js).
 * Only one batch of variant pages (their SVGs and HTML) is in memory at a time, so memory stays
 * bounded however many variants a study has. Both Eleventy runs use the same templates and
 * configuration, so a variant page is the same as from one run over everything.
 *
 * Writes into the given (empty) folder; the caller swaps folders and writes results.json and results.csv.
 */
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import Eleventy from '@11ty/eleventy';
import type { ChartsFor } from '../charts/assay-charts.js';
import { jsonSha256 } from '../results/json.js';
import type { StudyResults } from '../results/types.js';
import { chartFileWriter } from './chart-files.js';
import { type SiteArchive, withArchiveNotes } from './archive-links.js';
import { PATHS, uniqueSlugs } from './paths.js';
import { type SiteFrame, siteFrame, studyCharts, variantSiteData } from './site-data.js';
import type { BlockFn, RenderFn } from './view-common.js';
import { variantPageBuilder } from './view-variant.js';

export interface BuildSiteOptions {
  /** Per-variant assay charts (data and fits beside WT); see chartsFromModules(). */
  chartsFor?: ChartsFor;
  /** Seconds since the epoch (SOURCE_DATE_EPOCH); shown as the build time instead of provenance.builtAt. */
  sourceDateEpoch?: number;
  /** SHA-256 of the results.json written beside the site (default: computed from `results` as src/results/json.ts writes it). */
  resultsSha256?: string;
  /** Chart renderer (default: renderSvg in this thread). */
  render?: RenderFn;
  /** Assay chart blocks by their inputs (the build's store), and the renderer of their charts; see VariantPagesOptions. */
  block?: BlockFn;
  blockRender?: RenderFn;
  /** Variant pages per Eleventy run (default PAGES_PER_RUN). */
  pagesPerRun?: number;
  /** Called after each run of variant pages (the build collects garbage there when it is heavy). */
  afterRun?: () => void;
  /** Progress: ('charts', variant pages done, total) while rendering, then ('pages', 0, 1) and ('pages', 1, 1) around Eleventy. */
  onProgress?: (phase: string, done: number, total: number) => void;
  /** When the study is built inside an archive: links back to it and the variants' change lines (src/site/archive-links.ts). */
  archive?: SiteArchive;
}

const templatesDir = fileURLToPath(new URL('../../templates/', import.meta.url));
const configPath = fileURLToPath(new URL('../../.eleventy.js', import.meta.url));
/** The templates paginated over site.variants: a variant's page and its single-file report. */
const variantTemplates = join(templatesDir, '{variant,report}.njk');

/**
 * Variant pages built and written per Eleventy run (default): each run compiles the templates
 * again, and one run's pages and SVGs are in memory at a time, so this bounds the build's memory.
 */
export const PAGES_PER_RUN = 75;

export { variantSiteData };

/**
 * One Eleventy run: `input` is the templates folder or a glob of templates in it; returns the HTML
 * pages written. The site data goes in as global data (templates/_data/site.js then gives way to it).
 */
async function runEleventy(input: string, outDir: string, site: unknown): Promise<number> {
  const elev = new Eleventy(input, outDir, {
    configPath,
    quietMode: true,
    config(cfg) {
      cfg.addGlobalData('site', site);
    },
  });
  elev.disableLogger();
  // write() resolves to [passthroughCopies, templates] for the file system.
  const written = (await elev.write()) as unknown[];
  const templates = (Array.isArray(written[1]) ? written[1] : []) as Array<{ outputPath?: unknown }>;
  return templates.filter((r) => typeof r.outputPath === 'string' && r.outputPath.endsWith('.html')).length;
}

/**
 * Build the site into outDir (which should be empty). Returns the number of HTML pages written.
 * Progress: ('charts', variant pages done, total) while variant pages are drawn and written,
 * then ('pages', 0, 1) and ('pages', 1, 1) around the study-level pages.
 */
export async function buildSite(results: StudyResults, outDir: string, options: BuildSiteOptions = {}): Promise<{ pages: number }> {
  const slugs = uniqueSlugs(results.variants.map((v) => v.id));
  const progress = options.onProgress;
  const total = results.variants.length;
  progress?.('charts', 0, total);
  const resultsSha256 = options.resultsSha256 ?? jsonSha256(results as unknown as Record<string, unknown>);
  const frame: SiteFrame = siteFrame(
    results,
    { resultsSha256, ...(options.sourceDateEpoch !== undefined ? { sourceDateEpoch: options.sourceDateEpoch } : {}), ...(options.archive ? { archive: options.archive } : {}) },
    slugs,
  );
  // What the variant templates read of the site besides their page: Eleventy is given only this.
  const variantSite = variantSiteData(frame);
  const build = variantPageBuilder(results, slugs, options.chartsFor, {
    builtAt: frame.builtAt,
    ...(options.render ? { render: options.render } : {}),
    ...(options.block ? { block: options.block } : {}),
    ...(options.blockRender ? { blockRender: options.blockRender } : {}),
    ...(progress ? { onVariant: (d: number) => progress('charts', d, total) } : {}),
  });
  let pages = 0;
  const perRun = options.pagesPerRun ?? PAGES_PER_RUN;
  // Every chart also as an SVG file of its own (charts/), each block given its file's path.
  const chartFiles = chartFileWriter(outDir);
  for (let i = 0; i < results.variants.length; i += perRun) {
    const batch = withArchiveNotes(await build(results.variants.slice(i, i + perRun)), options.archive);
    for (const page of batch) await chartFiles.write(page.path, page);
    pages += await runEleventy(variantTemplates, outDir, { ...variantSite, variants: batch });
    options.afterRun?.();
  }
  progress?.('pages', 0, 1);
  const charts = await studyCharts(results, slugs, options.render);
  for (const a of charts.assays) await chartFiles.write(a.path, a);
  await chartFiles.write(PATHS.residues, charts.residues);
  await chartFiles.write(PATHS.compare, charts.compare);
  pages += await runEleventy(templatesDir, outDir, { ...frame, ...charts, chartFiles: chartFiles.list(), chartSvgs: [] });
  progress?.('pages', 1, 1);
  return { pages };
}
