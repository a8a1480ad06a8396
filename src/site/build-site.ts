/**
 * Static report site from StudyResults.
 *
 *   StudyResults ──view builders (slugs, relative paths, numbers as text)──▶ site data
 *                ──chart specs ──renderSvg──▶ SVG strings inside the site data
 *   variant pages, in batches of VARIANT_BATCH: charts ──▶ Eleventy on templates/variant.njk alone
 *                 ──▶ HTML in outDir (the next batch's charts render in the pool meanwhile)
 *                 With a cache: a page whose data (variantSiteData, its page data with chart
 *                 blocks as cache keys, the code and templates) is unchanged is copied from the
 *                 page cache, without reading or drawing its charts or running Eleventy for it.
 *   study pages: site data without variants ──Eleventy (templates/, .eleventy.js)──▶ HTML in outDir
 *   templates/assets ──copy──▶ outDir/assets
 *
 * Only one or two batches of variant pages (their SVGs and HTML) are in memory at a time, so
 * memory stays bounded however many variants a study has. Both Eleventy runs use the same
 * templates and configuration, so a variant page is the same as from one run over everything.
 *
 * Writes into the given (empty) folder; the caller swaps folders and writes downloads/.
 */
import { createHash } from 'node:crypto';
import { mkdirSync } from 'node:fs';
import { cp } from 'node:fs/promises';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import Eleventy from '@11ty/eleventy';
import type { ChartsFor } from '../charts/assay-charts.js';
import { DEFAULT_CHART_CACHE, type PageSlots } from '../charts/cache.js';
import { type ChartRenderer, createChartRenderer, defaultWorkers } from '../charts/pool.js';
import type { StudyResults } from '../results/types.js';
import { PATHS, uniqueSlugs } from './paths.js';
import { collectGarbage } from '../memory.js';
import { siteFingerprint } from '../fingerprint.js';
import { FUNCTION_CALL_STYLE } from '../charts/palette.js';
import type { FunctionCall, VariantResult } from '../results/types.js';
import { type RenderFn, STANDARD_CAVEATS, functionCall } from './view-common.js';
import { assayPages, compareCharts, methodsData, provenanceData, residueCharts } from './view-study.js';
import { Q_SLOT_STEM, type VariantPage, indexRows, variantPageBuilder } from './view-variant.js';

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
const variantTemplate = join(templatesDir, 'variant.njk');

/**
 * Variant pages built and written per Eleventy run. Each run compiles the templates again
 * (about 0.2 s), and one batch's pages and SVGs are in memory at a time (with the next one
 * being drawn), with the garbage of rendering them. Measured on the 1,000-variant benchmark
 * (cold): 250 pages per run peaked at 1.64 GB in this phase, 125 at 1.42–1.45 GB, at the same
 * build time; with chart Views kept between charts (src/charts/render.ts) 125 peaked at
 * 1.56 GB and 100 at 1.50 GB (1.49–1.50 GB in this phase in two later runs), 75 at 1.44 GB
 * (then set by the analysis phase; one run).
 */
export const VARIANT_BATCH = 75;

interface Prepared {
  slugs: Map<string, string>;
  render: RenderFn | undefined;
  /** The same, for charts drawn when no other chart waits (the study pages' charts). */
  renderLater: RenderFn | undefined;
  /** Chart-block cache of the renderer (assay charts found by their input key), if there is a renderer. */
  block: ChartRenderer['block'] | undefined;
  /** Page cache of the renderer, if it has a cache. */
  pages: ChartRenderer['pages'];
  /** Charts drawn and charts served from the cache so far. */
  stats: () => { rendered: number; cached: number };
  close: () => Promise<void>;
}

/**
 * The chart renderer buildSite makes from its options (workers, chartCache): undefined when
 * charts are drawn in this thread without a cache. A caller that wants the workers started
 * early makes it with this, passes it as `renderer` and closes it.
 */
export function createSiteRenderer(options: Pick<BuildSiteOptions, 'workers' | 'chartCache'>): ChartRenderer | undefined {
  const workers = options.workers === undefined || options.workers === 'auto' ? defaultWorkers() : options.workers;
  const cacheDir = options.chartCache ?? DEFAULT_CHART_CACHE;
  return workers === 0 && cacheDir === false ? undefined : createChartRenderer({ workers, cacheDir });
}

function prepare(results: StudyResults, options: BuildSiteOptions): Prepared {
  const slugs = uniqueSlugs(results.variants.map((v) => v.id));
  const ownRenderer = options.renderer ? undefined : createSiteRenderer(options);
  const renderer = options.renderer ?? ownRenderer;
  const render: RenderFn | undefined = renderer ? (spec, o) => renderer.render(spec, o) : undefined;
  const renderLater: RenderFn | undefined = renderer ? (spec, o) => renderer.render(spec, o, true) : undefined;
  const block: ChartRenderer['block'] | undefined = renderer ? (parts, make) => renderer.block(parts, make) : undefined;
  return { slugs, render, renderLater, block, pages: renderer?.pages, stats: () => renderer?.stats() ?? { rendered: 0, cached: 0 }, close: async () => ownRenderer?.close() };
}

/**
 * Version of the variant page cache entries; bump when what a page is made from changes outside
 * src/ and templates/ (both are in siteFingerprint).
 */
const PAGE_CACHE_VERSION = 1;

/** Start of the placeholder for the build time in variant pages made for the page cache (patched when written out). */
const BUILT_AT_STEM = 'myofolio-built-at-7f';

/** Escaped as Nunjucks escapes text it writes into a template (autoescape; node_modules/nunjucks/src/lib.js). */
const NUNJUCKS_ESCAPES: Record<string, string> = { '&': '&amp;', '"': '&quot;', "'": '&#39;', '<': '&lt;', '>': '&gt;', '\\': '&#92;' };
export function escapeAsNunjucks(text: string): string {
  return text.replace(/[&"'<>\\]/g, (ch) => NUNJUCKS_ESCAPES[ch]);
}

/**
 * The body rows of a chart's data table as the chart macro (templates/_includes/macros.njk) writes
 * them: the first cell of a row is its header. Written here, not by a loop in the template: a
 * study-level chart's table has a row per variant, and Nunjucks spent some 0.15 s of a
 * 1,000-variant rebuild setting its loop variables cell by cell. Cells are written as Nunjucks
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

const Q_SLOT_STEM_BYTES = Buffer.from(Q_SLOT_STEM, 'utf8');

/** A variant page's q slots and their texts as they go into the HTML (see qSlots in src/site/view-variant.ts). */
function slotsOf(p: VariantPage): PageSlots {
  return { stem: Q_SLOT_STEM_BYTES, fills: (p.qFills ?? []).map(escapeAsNunjucks) };
}

/**
 * The part of the site data the variant template (and its layout and macros) reads besides its
 * own page: study, tool, build time, caveats, navigation and paths. Variant pages are rendered
 * from this alone (tests/site/variant-site-data.test.ts checks the templates read nothing else).
 */
export function variantSiteData(site: ReturnType<typeof studyFrame>) {
  return { study: site.study, tool: site.tool, builtAt: site.builtAt, standardCaveats: site.standardCaveats, legend: site.legend, nav: site.nav, paths: site.paths };
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
 * Build the site into outDir (which should be empty). Returns the number of HTML pages written
 * and how many charts were drawn and how many came from the cache.
 * Progress: ('charts', variant pages done, total) while variant pages are drawn and written,
 * then ('pages', 0, 1) and ('pages', 1, 1) around the study-level pages.
 */
export async function buildSite(results: StudyResults, outDir: string, options: BuildSiteOptions = {}): Promise<{ pages: number; charts: { rendered: number; cached: number } }> {
  const prepared = prepare(results, options);
  let pages = 0;
  let charts = { rendered: 0, cached: 0 };
  try {
    const progress = options.onProgress;
    const total = results.variants.length;
    progress?.('charts', 0, total);
    const frame = studyFrame(results, options, prepared.slugs);
    // The study pages' charts are drawn while the variant pages are made, whenever no chart of a
    // variant page waits (the pages' pipeline waits on those); they are awaited at the end.
    const charted = studyCharts(results, prepared.renderLater);
    charted.catch(() => undefined);
    // What the variant template reads of the site besides its page: Eleventy is given only this,
    // so a page is a function of it, its page data and the templates (the page cache key). The
    // build time changes with every build: pages are made and kept with a placeholder in its
    // place, and the time is written over it as each page is written out.
    const variantSite = variantSiteData(frame);
    const builtAt = variantSite.builtAt;
    // The placeholder has the build time's length (in UTF-8 bytes), so that kept pages are copied
    // and patched in place; ISO times are at least 20 bytes, as is the placeholder's stem.
    const builtAtBytes = Buffer.from(builtAt, 'utf8');
    const placeholder = builtAtBytes.length >= 20 ? `${BUILT_AT_STEM}${'~'.repeat(builtAtBytes.length - BUILT_AT_STEM.length)}` : undefined;
    const pageStore = placeholder !== undefined ? prepared.pages : undefined;
    const placeholderBytes = Buffer.from(placeholder ?? '', 'utf8');
    const renderSite = pageStore ? { ...variantSite, builtAt: placeholder as string } : variantSite;
    const siteKey = pageStore ? JSON.stringify([PAGE_CACHE_VERSION, siteFingerprint(), renderSite]) : '';
    const build = variantPageBuilder(results, prepared.slugs, options.chartsFor, {
      render: prepared.render,
      block: prepared.block,
      lazyBlocks: pageStore !== undefined,
      qSlots: pageStore !== undefined,
      onVariant: progress ? (d) => progress('charts', d, total) : undefined,
    });
    /** One batch: its pages built, pages found in the page cache written out, the others' charts loaded. */
    const prepareBatch = async (batch: VariantResult[]) => {
      const built = await build(batch);
      if (!pageStore) return { render: built, keys: [] as string[], found: 0 };
      const render: VariantPage[] = [];
      const keys: string[] = [];
      let found = 0;
      const made = new Set<string>();
      for (const p of built) {
        const key = createHash('sha256').update(siteKey).update('\n').update(JSON.stringify(p)).digest('hex');
        const dest = join(outDir, p.path);
        const dir = dirname(dest);
        if (!made.has(dir)) {
          mkdirSync(dir, { recursive: true });
          made.add(dir);
        }
        const blocks = [p.forest?.blockKey, ...p.assays.flatMap((a) => a.charts.map((c) => c.blockKey))].filter((b): b is string => b !== undefined);
        if (pageStore.fetchPage(key, dest, builtAtBytes, blocks, slotsOf(p))) {
          found++;
        } else {
          render.push(p);
          keys.push(key);
        }
      }
      await Promise.all(render.flatMap((p) => [p.forest?.fill?.(), ...p.assays.flatMap((a) => a.charts.map((c) => c.fill?.()))]));
      return { render, keys, found };
    };
    const batches: VariantResult[][] = [];
    for (let i = 0; i < results.variants.length; i += VARIANT_BATCH) batches.push(results.variants.slice(i, i + VARIANT_BATCH));
    // Pipeline: the pool draws batch k + 1 while Eleventy writes batch k. Pages that are not kept
    // are written in runs of up to VARIANT_BATCH: on a rebuild where a few pages of each batch
    // changed, they are gathered into one run instead of one run (and one template compile) per batch.
    const waiting: { render: VariantPage[]; keys: string[] } = { render: [], keys: [] };
    const flush = async () => {
      const { render, keys } = waiting;
      if (render.length === 0) return;
      waiting.render = [];
      waiting.keys = [];
      pages += await runEleventy(variantTemplate, outDir, { ...renderSite, variants: render });
      render.forEach((p, i) => pageStore?.keepPage(keys[i], join(outDir, p.path), placeholderBytes, builtAtBytes, slotsOf(p)));
      // These pages' SVGs and HTML are garbage now; without a collection here, V8 lets them pile
      // up for several runs and the build's peak memory grows with the study. A small run leaves
      // little garbage, and a full collection of the results costs more than it frees.
      if (render.length >= VARIANT_BATCH / 2) collectGarbage();
    };
    let next = batches.length > 0 ? prepareBatch(batches[0]) : undefined;
    for (let k = 0; k < batches.length; k++) {
      const got = await (next as ReturnType<typeof prepareBatch>);
      next = k + 1 < batches.length ? prepareBatch(batches[k + 1]) : undefined;
      // Awaited in the next round; the no-op handler keeps a failure meanwhile from counting as unhandled.
      next?.catch(() => undefined);
      pages += got.found;
      if (waiting.render.length + got.render.length > VARIANT_BATCH) await flush();
      waiting.render.push(...got.render);
      waiting.keys.push(...got.keys);
      if (waiting.render.length >= VARIANT_BATCH || k === batches.length - 1) await flush();
    }
    progress?.('pages', 0, 1);
    pages += await runEleventy(templatesDir, outDir, { ...frame, ...(await charted) });
    await cp(join(templatesDir, 'assets'), join(outDir, 'assets'), { recursive: true });
    progress?.('pages', 1, 1);
    charts = prepared.stats();
  } finally {
    await prepared.close();
  }
  return { pages, charts };
}
