/**
 * Static report site from StudyResults.
 *
 *   StudyResults ──view builders (slugs, relative paths, numbers as text)──▶ site data
 *                ──chart specs ──render (renderSvg, or the build's stored render)──▶ SVG strings
 *   variant pages, in batches of VARIANT_BATCH: charts ──▶ Eleventy on templates/variant.njk alone
 *                 ──▶ HTML in outDir
 *   study pages: site data without variants ──Eleventy (templates/, .eleventy.js)──▶ HTML in outDir
 *   templates/assets ──copy──▶ outDir/assets
 *
 * Only one batch of variant pages (their SVGs and HTML) is in memory at a time, so memory stays
 * bounded however many variants a study has. Both Eleventy runs use the same templates and
 * configuration, so a variant page is the same as from one run over everything.
 *
 * Writes into the given (empty) folder; the caller swaps folders and writes downloads/.
 */
import { cp } from 'node:fs/promises';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import Eleventy from '@11ty/eleventy';
import type { ChartsFor } from '../charts/assay-charts.js';
import type { StudyResults } from '../results/types.js';
import { chartFileWriter } from './chart-files.js';
import { PATHS, uniqueSlugs } from './paths.js';
import { type SiteArchive, archiveFrame, withArchiveNotes } from './archive-links.js';
import { FUNCTION_CALL_STYLE } from '../charts/palette.js';
import type { FunctionCall, VariantResult } from '../results/types.js';
import { type BlockFn, type RenderFn, STANDARD_CAVEATS, functionCall } from './view-common.js';
import { assayPages, compareCharts, methodsData, provenanceData, residueCharts } from './view-study.js';
import { type VariantPage, indexRows, variantPageBuilder } from './view-variant.js';

export interface BuildSiteOptions {
  /** Per-variant assay charts (data and fits beside WT); see chartsFromModules(). */
  chartsFor?: ChartsFor;
  /** Seconds since the epoch (SOURCE_DATE_EPOCH); shown as the build time instead of provenance.builtAt. */
  sourceDateEpoch?: number;
  /** Chart renderer (default: renderSvg in this thread). */
  render?: RenderFn;
  /** Assay chart blocks by their inputs (the build's store), and the renderer of their charts; see VariantPagesOptions. */
  block?: BlockFn;
  blockRender?: RenderFn;
  /** Variant pages per Eleventy run (default VARIANT_BATCH). */
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
const variantTemplate = join(templatesDir, 'variant.njk');

/**
 * Variant pages built and written per Eleventy run (default): each run compiles the templates
 * again, and one run's pages and SVGs are in memory at a time, so this bounds the build's memory.
 */
export const VARIANT_BATCH = 250;

/** Escaped as Nunjucks escapes text it writes into a template (autoescape; node_modules/nunjucks/src/lib.js). */
const NUNJUCKS_ESCAPES: Record<string, string> = { '&': '&amp;', '"': '&quot;', "'": '&#39;', '<': '&lt;', '>': '&gt;', '\\': '&#92;' };
export function escapeAsNunjucks(text: string): string {
  return text.replace(/[&"'<>\\]/g, (ch) => NUNJUCKS_ESCAPES[ch]);
}

/**
 * The body rows of a chart's data table as the chart macro (templates/_includes/macros.njk) writes
 * them: the first cell of a row is its header. Written here, not by a loop in the template: a
 * study-level chart's table has a row per variant, and a Nunjucks loop keeps its loop variables
 * cell by cell. Cells are written as Nunjucks
 * writes `{{ cell }}` (null and undefined as nothing, the rest as text, escaped).
 * @example dataRowsHtml([['A<B', 1]]) // → '      <tr><th scope="row">A&lt;B</th><td>1</td></tr>\n'
 */
export function dataRowsHtml(rows: ReadonlyArray<ReadonlyArray<unknown>> | undefined): string {
  let out = '';
  for (const row of rows ?? []) {
    out += '      <tr>';
    row.forEach((cell, i) => {
      const text = cell === null || cell === undefined ? '' : escapeAsNunjucks(String(cell));
      out += i === 0 ? `<th scope="row">${text}</th>` : `<td>${text}</td>`;
    });
    out += '</tr>\n';
  }
  return out;
}

/**
 * The part of the site data the variant template (and its layout and macros) reads besides its
 * own page: study, tool, build time, caveats, navigation and paths. Variant pages are rendered
 * from this alone (tests/site/variant-site-data.test.ts checks the templates read nothing else).
 */
export function variantSiteData(site: ReturnType<typeof studyFrame>) {
  return { study: site.study, tool: site.tool, builtAt: site.builtAt, standardCaveats: site.standardCaveats, legend: site.legend, nav: site.nav, paths: site.paths, archive: site.archive };
}

/** The site data without charts and without variant pages: known before any chart is drawn. */
function studyFrame(results: StudyResults, options: BuildSiteOptions, slugs: Map<string, string>) {
  const builtAt =
    options.sourceDateEpoch !== undefined && Number.isFinite(options.sourceDateEpoch)
      ? new Date(options.sourceDateEpoch * 1000).toISOString().replace('.000Z', 'Z')
      : results.provenance.builtAt;
  const rows = indexRows(results, slugs);
  const nav = [
    { key: 'index', label: 'Variants', href: PATHS.index },
    ...results.assays.map((a) => ({ key: `assay-${a.id}`, label: a.label, href: PATHS.assay(a.id) })),
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
    archive: archiveFrame(options.archive),
    assayList: results.assays.map((a) => ({ id: a.id, label: a.label })),
    index: {
      rows,
      genes: uniq(rows.map((r) => r.gene)),
      calls: uniq(rows.map((r) => r.overall.call)),
      flags: uniq(rows.flatMap((r) => r.flags)),
      search: Object.fromEntries(rows.map((r) => [r.id, r.search])),
    },
    variants: [] as VariantPage[],
    methods: methodsData(results),
    provenance: provenanceData(results),
  };
}

/** The study pages' charts (assay pages, residue maps, assays compared), all asked for at once. */
async function studyCharts(results: StudyResults, render: RenderFn | undefined) {
  const [assays, residues, compare] = await Promise.all([assayPages(results, render), residueCharts(results, render), compareCharts(results, render)]);
  return { assays, residues, compare };
}

/** One Eleventy run: `input` is the templates folder or one template in it; returns the HTML pages written. */
async function runEleventy(input: string, outDir: string, site: unknown): Promise<number> {
  const elev = new Eleventy(input, outDir, {
    configPath,
    quietMode: true,
    config(cfg) {
      cfg.addGlobalData('site', site);
      // On Nunjucks itself: a filter added by addFilter is timed by Eleventy, which prints a
      // warning when one takes more than 8% of a run, as this one can on a large study.
      cfg.amendLibrary('njk', (env) => env.addFilter('dataRows', dataRowsHtml));
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
  const frame = studyFrame(results, options, slugs);
  // What the variant template reads of the site besides its page: Eleventy is given only this.
  const variantSite = variantSiteData(frame);
  const build = variantPageBuilder(results, slugs, options.chartsFor, {
    ...(options.render ? { render: options.render } : {}),
    ...(options.block ? { block: options.block } : {}),
    ...(options.blockRender ? { blockRender: options.blockRender } : {}),
    ...(progress ? { onVariant: (d: number) => progress('charts', d, total) } : {}),
  });
  let pages = 0;
  const perRun = options.pagesPerRun ?? VARIANT_BATCH;
  // Every chart also as an SVG file of its own (charts/), each block given its file's path.
  const chartFiles = chartFileWriter(outDir);
  for (let i = 0; i < results.variants.length; i += perRun) {
    const batch = withArchiveNotes(await build(results.variants.slice(i, i + perRun)), options.archive);
    for (const page of batch) await chartFiles.write(page.path, page);
    pages += await runEleventy(variantTemplate, outDir, { ...variantSite, variants: batch });
    options.afterRun?.();
  }
  progress?.('pages', 0, 1);
  const charts = await studyCharts(results, options.render);
  for (const a of charts.assays) await chartFiles.write(a.path, a);
  await chartFiles.write(PATHS.residues, charts.residues);
  await chartFiles.write(PATHS.compare, charts.compare);
  pages += await runEleventy(templatesDir, outDir, { ...frame, ...charts, chartFiles: chartFiles.list() });
  await cp(join(templatesDir, 'assets'), join(outDir, 'assets'), { recursive: true });
  progress?.('pages', 1, 1);
  return { pages };
}
