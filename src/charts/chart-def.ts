/** What every study-level chart builder returns: a spec plus the words and numbers that go with it. */
import { fmtP as formatP } from '../results/format.js';
import type { ChartSpec } from '../assays/types.js';
import type { StudyResults, VariantResult } from '../results/types.js';
import { textWidth } from './text-width.js';

/** The chart's numbers as a plain table (cells are display strings). */
export interface DataTable {
  columns: string[];
  rows: string[][];
  note?: string;
}

export interface ChartDef {
  /** Stable key, unique on the site; also the seed of the SVG id prefix. */
  key: string;
  title: string;
  /** Plain-text description of what the chart shows, with its main numbers. */
  description: string;
  spec: ChartSpec;
  table: DataTable;
}

/**
 * The numbers of charts' descriptions and tables: the one formatter of src/results/format.ts
 * (3 significant figures, the minus sign, '—' for none, intervals 'low to high'; p and q values as
 * in the results' sentences), so that a chart and its report never show one number two ways.
 */
export { fmt, fmtCi } from '../results/format.js';
export const fmtP = formatP;

/** Display names of variants, unique within the study (short form, gene-qualified when needed). */
export function variantNames(results: StudyResults): Map<string, string> {
  const count = new Map<string, number>();
  for (const v of results.variants) count.set(v.short, (count.get(v.short) ?? 0) + 1);
  const genes = new Set(results.variants.map((v) => v.gene)).size;
  const names = new Map<string, string>();
  for (const v of results.variants) {
    const base = v.isWT ? `WT` : v.short;
    const qualified = genes > 1 || (count.get(v.short) ?? 0) > 1 ? `${v.gene} ${base}` : base;
    names.set(v.id, (count.get(v.short) ?? 0) > 1 && genes === 1 ? `${base} (${v.id})` : qualified);
  }
  return names;
}

export function variantById(results: StudyResults): Map<string, VariantResult> {
  return new Map(results.variants.map((v) => [v.id, v]));
}

/** Label of an assay metric, e.g. 'ATPase: kcat (actin-activated)'. */
export function metricLabel(results: StudyResults, assay: string, metric: string): string {
  const a = results.assays.find((x) => x.id === assay);
  const m = a?.metrics.find((x) => x.id === metric);
  return `${a?.label ?? assay}: ${m?.label ?? metric}`;
}

/**
 * A shorter "assay: metric" label for chart axes, without parenthetical parts.
 * Example: 'Single turnover (mant-nucleotide chase): Fast-phase rate' → 'Single turnover: Fast-phase rate'.
 */
export function shortMetricLabel(results: StudyResults, assay: string, metric: string): string {
  return metricLabel(results, assay, metric).replace(/\s*\([^)]*\)/g, '');
}

/** Unit suffix for axis titles, e.g. ' (s⁻¹)' or ''. */
export function unitSuffix(unit: string | undefined): string {
  return unit ? ` (${unit})` : '';
}

/** Ratio tick candidates: symmetric about 1 on the log scale (0.8 ↔ 1.25, 0.67 ↔ 1.5, 0.5 ↔ 2). */
const RATIO_TICKS = [0.01, 0.02, 0.05, 0.1, 0.2, 0.25, 0.33, 0.5, 0.67, 0.8, 1, 1.25, 1.5, 2, 3, 4, 5, 10, 20, 50, 100];
const COARSE_TICKS = [0.01, 0.02, 0.05, 0.1, 0.2, 0.5, 1, 2, 5, 10, 20, 50, 100];

/**
 * Explicit x or y scale for effects, so that every interval and band is inside the plot and ticks
 * stay readable (vega's text-width estimate in Node hides overlapping labels unpredictably).
 * Log scale: domain from the smallest to the largest value (always including 1), widened by 8%
 * on each side multiplicatively; ticks from a fixed list of ratios. Linear: 6% padding, 0 included.
 * Example: effectScale([0.55, 1.76], true) → domain [0.509, 1.90], ticks [0.67, 0.8, 1, 1.25, 1.5].
 */
export function effectScale(values: Array<number | null | undefined>, log: boolean): { scale: Record<string, unknown>; axis: Record<string, unknown> } {
  const finite = values.filter((v): v is number => typeof v === 'number' && Number.isFinite(v) && (!log || v > 0));
  if (log) {
    const lo = Math.min(1, ...finite) / 1.08;
    const hi = Math.max(1, ...finite) * 1.08;
    let ticks = RATIO_TICKS.filter((t) => t >= lo && t <= hi);
    if (ticks.length > 9) ticks = COARSE_TICKS.filter((t) => t >= lo && t <= hi);
    return { scale: { type: 'log', domain: [Number(lo.toPrecision(3)), Number(hi.toPrecision(3))], nice: false }, axis: { values: ticks, format: '~g' } };
  }
  const lo = Math.min(0, ...finite);
  const hi = Math.max(0, ...finite);
  const pad = (hi - lo || 1) * 0.06;
  return { scale: { domain: [lo - pad, hi + pad], nice: false, zero: false }, axis: { tickCount: 6 } };
}

/** Font size of chart titles (src/charts/render.ts sets it in every chart's config). */
export const TITLE_FONT_SIZE = 14;

/**
 * Text broken into lines of at most `maxWidth` px at `fontSize` (bold or not), at spaces; a single
 * word longer than the width keeps a line of its own. One string when it fits on one line.
 * @example wrapText('Mean velocity of moving filaments (µm/s)', 150, 12, true) // → ['Mean velocity of', 'moving filaments', '(µm/s)']
 */
export function wrapText(text: string, maxWidth: number, fontSize: number, bold: boolean): string | string[] {
  if (textWidth(text, fontSize, bold) <= maxWidth) return text;
  const lines: string[] = [];
  let line = '';
  for (const word of text.split(' ')) {
    const next = line ? `${line} ${word}` : word;
    if (line && textWidth(next, fontSize, bold) > maxWidth) {
      lines.push(line);
      line = word;
    } else line = next;
  }
  if (line) lines.push(line);
  const [only, ...more] = lines;
  return only !== undefined && more.length === 0 ? only : lines;
}

/**
 * A chart title broken into lines of at most `maxWidth` px (bold, TITLE_FONT_SIZE), so that a long
 * title does not widen the chart beyond its plot; one string when it fits.
 * @example chartTitle('Short title', 600) // → 'Short title'
 */
export function chartTitle(text: string, maxWidth: number): string | string[] {
  return wrapText(text, maxWidth, TITLE_FONT_SIZE, true);
}

/** Font size of axis titles (src/charts/render.ts); axis titles are bold. */
export const AXIS_TITLE_FONT_SIZE = 12;

/** An axis title broken into lines that fit `length` px (the axis's length), so it is never cut short. */
export function axisTitle(text: string, length: number): string | string[] {
  return wrapText(text, length, AXIS_TITLE_FONT_SIZE, true);
}
