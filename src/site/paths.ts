/**
 * Slugs and relative links of the site, computed once here (never in templates) so that pages
 * work from file:// and under any sub-path: every link is relative, no link starts with '/'.
 */
import { posix } from 'node:path';

/**
 * File-safe slug: ASCII letters and digits, other runs become '-', lower case.
 * Example: slug('SYNM1 p.Gly120Ser') → 'synm1-p-gly120ser'.
 */
export function slug(text: string): string {
  const s = text
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '');
  return s || 'item';
}

/** Slugs for a list of ids, made unique by suffixes -2, -3, … in list order. */
export function uniqueSlugs(ids: string[]): Map<string, string> {
  const used = new Set<string>();
  const out = new Map<string, string>();
  for (const id of ids) {
    const base = slug(id);
    let s = base;
    for (let i = 2; used.has(s); i++) s = `${base}-${i}`;
    used.add(s);
    out.set(id, s);
  }
  return out;
}

/** Prefix from a page's output path back to the site root. Example: rootPrefix('variants/a.html') → '../'. */
export function rootPrefix(outputPath: string): string {
  const depth = outputPath.split('/').length - 1;
  return depth === 0 ? './' : '../'.repeat(depth);
}

/** Relative link from one output path to another. Example: relLink('variants/a.html', 'index.html') → '../index.html'. */
export function relLink(from: string, to: string): string {
  const r = posix.relative(posix.dirname(from), to);
  return r === '' ? posix.basename(to) : r;
}

/** Output paths of every page kind: the one definition (templates take their permalinks from it). */
export const PATHS = {
  index: 'index.html',
  variant: (s: string) => `variants/${s}.html`,
  assay: (s: string) => `assays/${s}.html`,
  residues: 'residues.html',
  compare: 'compare.html',
  methods: 'methods.html',
  provenance: 'provenance.html',
  downloads: 'downloads.html',
  glossary: 'glossary.html',
  /** The single-file report of a variant (inline styles and SVG, no other file needed). */
  report: (s: string) => `downloads/reports/${s}.html`,
  resultsJson: 'downloads/results.json',
  resultsCsv: 'downloads/results.csv',
  /** Every chart as a standalone SVG (src/site/chart-files.ts). */
  chartsDir: 'charts',
  chartSvg: (name: string) => `charts/${name}.svg`,
  css: 'assets/site.css',
  js: 'assets/table.js',
} as const;
