/**
 * The site's data, as the templates read it under `site`: built from StudyResults by the view
 * builders. Two ways in, one shape:
 * - the build (src/site/build-site.ts) hands it to Eleventy itself, variant pages in batches;
 * - Eleventy's own command line gets it through the data cascade (templates/_data/site.js →
 *   siteFromResultsFile), from a results.json, all pages in one run:
 *
 *     MYOFOLIO_RESULTS=_site/downloads/results.json npx @11ty/eleventy --config=.eleventy.js --input=templates --output=out
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { ASSAYS } from '../assays/registry.js';
import { type ChartsFor, chartsFromModules } from '../charts/assay-charts.js';
import type { StudyResults } from '../results/types.js';
import { type SiteArchive, archiveFrame } from './archive-links.js';
import { chartFileNamer } from './chart-files.js';
import { PATHS, uniqueSlugs } from './paths.js';
import { RESEARCH_LINE, type RenderFn, STANDARD_CAVEATS, siteLegend, studyCaveats } from './view-common.js';
import { assayPages, compareCharts, glossaryData, methodsData, provenanceData, residueCharts } from './view-study.js';
import { type VariantPage, type VariantPagesOptions, indexRows, variantPageBuilder } from './view-variant.js';

export interface SiteDataOptions {
  /** Seconds since the epoch (SOURCE_DATE_EPOCH); shown as the build time instead of provenance.builtAt. */
  sourceDateEpoch?: number;
  /** SHA-256 of the results.json these pages show (quoted by the single-file reports). */
  resultsSha256: string;
  /** When the study is built inside an archive (src/site/archive-links.ts). */
  archive?: SiteArchive;
}

/** The build time the pages show: SOURCE_DATE_EPOCH when set, else when the results were built. */
export function builtAtOf(results: StudyResults, sourceDateEpoch?: number): string {
  return sourceDateEpoch !== undefined && Number.isFinite(sourceDateEpoch) ? new Date(sourceDateEpoch * 1000).toISOString().replace('.000Z', 'Z') : results.provenance.builtAt;
}

/** The site data without charts and without variant pages: known before any chart is drawn. */
export function siteFrame(results: StudyResults, options: SiteDataOptions, slugs: Map<string, string>) {
  const builtAt = builtAtOf(results, options.sourceDateEpoch);
  const rows = indexRows(results, slugs);
  const nav = [
    { key: 'index', label: 'Variants', href: PATHS.index },
    ...results.assays.map((a) => ({ key: `assay-${a.id}`, label: a.label, href: PATHS.assay(a.id) })),
    { key: 'residues', label: 'Residue map', href: PATHS.residues },
    { key: 'compare', label: 'Assays compared', href: PATHS.compare },
    { key: 'methods', label: 'Methods', href: PATHS.methods },
    { key: 'glossary', label: 'Flags explained', href: PATHS.glossary },
    { key: 'provenance', label: 'Provenance', href: PATHS.provenance },
    { key: 'downloads', label: 'Downloads', href: PATHS.downloads },
  ];
  const uniq = (xs: string[]) => [...new Set(xs)].sort();
  const flagCodes = uniq(rows.flatMap((r) => r.flags));
  return {
    study: results.study,
    tool: results.tool,
    builtAt,
    /** The study's identity as the single-file reports state it. */
    identity: { resultsSha256: options.resultsSha256 },
    standardCaveats: STANDARD_CAVEATS,
    /** The study's own caveats, less those that only repeat a standard one. */
    studyCaveats: studyCaveats(results.study.caveats),
    researchLine: RESEARCH_LINE,
    legend: siteLegend(),
    nav,
    paths: PATHS,
    /** The archive the study was built in (base.njk links back to it), or null. */
    archive: archiveFrame(options.archive),
    assayList: results.assays.map((a) => ({ id: a.id, label: a.label })),
    index: {
      rows,
      genes: uniq(rows.map((r) => r.gene)),
      calls: uniq(rows.map((r) => r.overall.call)),
      flags: flagCodes.map((code) => rows.flatMap((r) => r.flagChips).find((c) => c.code === code)!),
      search: Object.fromEntries(rows.map((r) => [r.id, r.search])),
    },
    variants: [] as VariantPage[],
    methods: methodsData(results, slugs),
    provenance: provenanceData(results),
    glossary: glossaryData(),
  };
}

export type SiteFrame = ReturnType<typeof siteFrame>;

/**
 * The part of the site data the variant templates (variant.njk, report.njk, their layouts and
 * includes) read besides their page: variant pages are rendered from this alone
 * (tests/site/variant-site-data.test.ts checks the templates read nothing else).
 */
export function variantSiteData(site: SiteFrame) {
  return {
    study: site.study,
    tool: site.tool,
    builtAt: site.builtAt,
    identity: site.identity,
    standardCaveats: site.standardCaveats,
    studyCaveats: site.studyCaveats,
    researchLine: site.researchLine,
    legend: site.legend,
    nav: site.nav,
    paths: site.paths,
    archive: site.archive,
  };
}

/** The study pages' charts (assay pages, residue maps, assays compared), all asked for at once. */
export async function studyCharts(results: StudyResults, slugs: Map<string, string>, render: RenderFn | undefined) {
  const [assays, residues, compare] = await Promise.all([assayPages(results, slugs, render), residueCharts(results, render), compareCharts(results, render)]);
  return { assays, residues, compare };
}

/** All of the site data in one object, every variant page included (Eleventy's own command line). */
export async function siteData(results: StudyResults, options: SiteDataOptions & { chartsFor?: ChartsFor; pages?: VariantPagesOptions }) {
  const slugs = uniqueSlugs(results.variants.map((v) => v.id));
  const frame = siteFrame(results, options, slugs);
  const build = variantPageBuilder(results, slugs, options.chartsFor, { ...options.pages, builtAt: frame.builtAt });
  const variants = await build(results.variants);
  const charts = await studyCharts(results, slugs, options.pages?.render);
  // Chart files named in the order the build writes them (src/site/build-site.ts), rendered by charts.njk.
  const namer = chartFileNamer();
  const chartSvgs = [
    ...variants.flatMap((v) => namer.name(v.path, v)),
    ...charts.assays.flatMap((a) => namer.name(a.path, a)),
    ...namer.name(PATHS.residues, charts.residues),
    ...namer.name(PATHS.compare, charts.compare),
  ];
  return { ...frame, ...charts, variants, chartFiles: namer.list(), chartSvgs };
}

/**
 * Site data from a results.json file (its own SHA-256 is the one the reports quote), with the
 * assay charts drawn from its units by the registered assay modules.
 */
export async function siteFromResultsFile(file: string, options: { sourceDateEpoch?: number } = {}) {
  const bytes = readFileSync(file);
  const results = JSON.parse(bytes.toString('utf8')) as StudyResults;
  if (results?.schemaVersion !== 1 || !Array.isArray(results.variants)) throw new Error(`${file} is not a myofolio results.json (schemaVersion 1).`);
  const resultsSha256 = createHash('sha256').update(bytes).digest('hex');
  return siteData(results, { ...options, resultsSha256, chartsFor: chartsFromModules(results, ASSAYS) });
}
