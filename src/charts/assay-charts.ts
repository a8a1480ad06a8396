/**
 * Per-variant assay charts (data and fits beside paired WT) come from the assay modules.
 * This file adapts modules to the site's `chartsFor` callback and turns any spec's inline data
 * into a table, so the numbers behind an assay chart are readable without the picture.
 */
import type { AssayChartInput, AssayModule, ChartSpec } from '../assays/types.js';
import type { StudyResults, UnitResult } from '../results/types.js';
import { type DataTable, fmt } from './chart-def.js';

/** One chart of one assay for one variant report. */
export interface AssayChart {
  assay: string;
  title: string;
  /** The spec, built when first read: a chart found in the store by its inputs never builds it. */
  readonly spec: ChartSpec;
  readonly description?: string;
  /** What the chart is drawn from (the module's chart() input): equal inputs give equal specs for the same code. */
  inputs: AssayChartInput;
}

export type ChartsFor = (variantId: string) => AssayChart[] | Promise<AssayChart[]>;

/**
 * Build a `chartsFor` callback from assay modules: for each assay the variant has units in,
 * call the module's chart() with the variant's units and the WT units of the same batches.
 * Units are indexed once by (assay, variant) and WT units by (assay, batch), so a study of
 * N variants costs O(units) in all instead of a scan of every unit per variant.
 */
export function chartsFromModules(results: StudyResults, modules: ReadonlyArray<Pick<AssayModule, 'id' | 'label' | 'chart'>>): ChartsFor {
  const wtIds = new Set(results.variants.filter((v) => v.isWT).map((v) => v.id));
  const variants = new Map(results.variants.map((v) => [v.id, v]));
  const byVariant = new Map<string, UnitResult[]>();
  const wtByBatch = new Map<string, UnitResult[]>();
  const push = (m: Map<string, UnitResult[]>, k: string, u: UnitResult) => {
    const list = m.get(k);
    if (list) list.push(u);
    else m.set(k, [u]);
  };
  // JSON.stringify of the pair: no separator character in an id or batch can make two keys equal.
  for (const u of results.units) {
    push(byVariant, JSON.stringify([u.assay, u.variant]), u);
    if (wtIds.has(u.variant)) push(wtByBatch, JSON.stringify([u.assay, u.batch]), u);
  }
  return (variantId) => {
    const v = variants.get(variantId);
    if (!v || v.isWT) return [];
    return modules.flatMap((m) => {
      const variantUnits = byVariant.get(JSON.stringify([m.id, variantId])) ?? [];
      if (variantUnits.length === 0) return [];
      const batches = [...new Set(variantUnits.map((u) => u.batch))];
      // WT units in results order (as the former scan gave them), whatever the order of the batches.
      const wtUnits = batches.length === 1 ? (wtByBatch.get(JSON.stringify([m.id, batches[0]])) ?? []) : resultsOrder(results, batches.flatMap((b) => wtByBatch.get(JSON.stringify([m.id, b])) ?? []));
      const inputs: AssayChartInput = { variantLabel: v.short, variantUnits, wtUnits };
      let spec: ChartSpec | undefined;
      const build = () => (spec ??= m.chart(inputs));
      const chart: AssayChart = {
        assay: m.id,
        title: `${m.label}: ${v.short} beside paired WT`,
        inputs,
        get spec() {
          return build();
        },
        get description() {
          const d = build().description;
          return typeof d === 'string' ? d : undefined;
        },
      };
      return [chart];
    });
  };
}

/** Units sorted by their position in results.units (positions looked up once per results object). */
const positions = new WeakMap<StudyResults, Map<UnitResult, number>>();
function resultsOrder(results: StudyResults, units: UnitResult[]): UnitResult[] {
  let pos = positions.get(results);
  if (!pos) {
    pos = new Map(results.units.map((u, i) => [u, i]));
    positions.set(results, pos);
  }
  const p = pos;
  return units.sort((a, b) => (p.get(a) ?? 0) - (p.get(b) ?? 0));
}

/**
 * The numbers table a chart declares for itself in `usermeta.table` (columns, rows of display
 * strings, optional note), if any: assay charts whose drawn data are summaries (histograms,
 * thinned readings) list the unit-level numbers there instead of the drawn points.
 */
export function declaredTable(spec: ChartSpec): DataTable | undefined {
  const t = (spec.usermeta as { table?: DataTable } | undefined)?.table;
  if (!t || !Array.isArray(t.columns) || !Array.isArray(t.rows)) return undefined;
  return { columns: t.columns.map(String), rows: t.rows.map((r) => r.map((c) => (typeof c === 'number' ? fmt(c) : String(c)))), ...(t.note ? { note: String(t.note) } : {}) };
}

/** The spec without `usermeta` (what the renderer needs; the table travels beside the SVG). */
export function drawnSpec(spec: ChartSpec): ChartSpec {
  if (!('usermeta' in spec)) return spec;
  const { usermeta: _dropped, ...rest } = spec;
  return rest;
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
  const declared = declaredTable(spec);
  if (declared) return declared;
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
