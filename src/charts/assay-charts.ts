/**
 * Per-variant assay charts (data and fits beside paired WT) come from the assay modules.
 * This file adapts modules to the site's `chartsFor` callback and turns any spec's inline data
 * into a table, so the numbers behind an assay chart are readable without the picture.
 */
import type { AssayModule, ChartSpec } from '../assays/types.js';
import type { StudyResults } from '../results/types.js';
import { type DataTable, fmt } from './chart-def.js';

/** One chart of one assay for one variant report. */
export interface AssayChart {
  assay: string;
  title: string;
  spec: ChartSpec;
  description?: string;
}

export type ChartsFor = (variantId: string) => AssayChart[] | Promise<AssayChart[]>;

/**
 * Build a `chartsFor` callback from assay modules: for each assay the variant has units in,
 * call the module's chart() with the variant's units and the WT units of the same batches.
 */
export function chartsFromModules(results: StudyResults, modules: ReadonlyArray<Pick<AssayModule, 'id' | 'label' | 'chart'>>): ChartsFor {
  const wtIds = new Set(results.variants.filter((v) => v.isWT).map((v) => v.id));
  return (variantId) => {
    const v = results.variants.find((x) => x.id === variantId);
    if (!v || v.isWT) return [];
    return modules.flatMap((m) => {
      const variantUnits = results.units.filter((u) => u.assay === m.id && u.variant === variantId);
      if (variantUnits.length === 0) return [];
      const batches = new Set(variantUnits.map((u) => u.batch));
      const wtUnits = results.units.filter((u) => u.assay === m.id && wtIds.has(u.variant) && batches.has(u.batch));
      const spec = m.chart({ variantLabel: v.short, variantUnits, wtUnits });
      const description = typeof spec.description === 'string' ? spec.description : undefined;
      return [{ assay: m.id, title: `${m.label}: ${v.short} beside paired WT`, spec, ...(description ? { description } : {}) }];
    });
  };
}

function collectValues(node: unknown, out: Array<Record<string, unknown>[]>): void {
  if (Array.isArray(node)) {
    for (const x of node) collectValues(x, out);
    return;
  }
  if (!node || typeof node !== 'object') return;
  const obj = node as Record<string, unknown>;
  const data = obj.data as { values?: unknown } | undefined;
  if (data && Array.isArray(data.values) && data.values.every((r) => r && typeof r === 'object')) out.push(data.values as Record<string, unknown>[]);
  for (const [k, v] of Object.entries(obj)) if (k !== 'data' && typeof v === 'object') collectValues(v, out);
}

const cell = (v: unknown) => (typeof v === 'number' ? fmt(v) : v === null || v === undefined ? '—' : String(v));

/** The inline data of a spec as one table (union of columns), at most `maxRows` rows. */
export function specTable(spec: ChartSpec, maxRows = 200): DataTable {
  const sets: Array<Record<string, unknown>[]> = [];
  collectValues(spec, sets);
  const rows = sets.flat();
  const columns: string[] = [];
  for (const r of rows) for (const k of Object.keys(r)) if (!columns.includes(k)) columns.push(k);
  const shown = rows.slice(0, maxRows);
  return {
    columns,
    rows: shown.map((r) => columns.map((c) => cell(r[c]))),
    note: rows.length > maxRows ? `First ${maxRows} of ${rows.length} rows; all values are in results.json.` : undefined,
  };
}
