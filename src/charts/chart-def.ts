/** What every study-level chart builder returns: a spec plus the words and numbers that go with it. */
import type { ChartSpec } from '../assays/types.js';
import type { StudyResults, VariantResult } from '../results/types.js';

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
 * Display form of a number: 3 significant digits, trailing zeros dropped; '—' for null/NaN.
 * Example: fmt(1.23456) → '1.23'; fmt(0.000123456) → '0.000123'; fmt(null) → '—'.
 */
export function fmt(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (x === 0) return '0';
  const abs = Math.abs(x);
  if (abs >= 1e-3 && abs < 1e6) return String(Number(x.toPrecision(digits)));
  return x.toExponential(digits - 1);
}

/** q and p values: 2 significant digits, '< 0.0001' below that. Example: fmtP(0.01234) → '0.012'. */
export function fmtP(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (x < 1e-4) return '< 0.0001';
  return String(Number(x.toPrecision(2)));
}

/** Interval as 'low–high'. */
export function fmtCi(lo: number | null, hi: number | null): string {
  if (lo === null || hi === null || !Number.isFinite(lo) || !Number.isFinite(hi)) return '—';
  return `${fmt(lo)}–${fmt(hi)}`;
}

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

/** Unit suffix for axis titles, e.g. ' (s⁻¹)' or ''. */
export function unitSuffix(unit: string | undefined): string {
  return unit ? ` (${unit})` : '';
}
