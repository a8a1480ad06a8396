/**
 * Vega-Lite building blocks for the per-variant assay charts: the variant's units beside the
 * WT units of the same batches. User text (variant and unit labels) goes in as data values only.
 */
import { fmt } from '../results/format.js';
import type { MetricDef, UnitResult } from '../results/types.js';
import type { AssayChartInput, ChartSpec } from './types.js';

/**
 * Group marks of the per-variant assay charts: WT in light grey circles and dashed lines, the
 * variant in near-black crosses and solid lines. Neither colour nor shape is a call's (a vermilion
 * ▲ would read as hypercontractile; src/charts/palette.ts lists every mark of the site), and the
 * two groups differ in lightness, shape and dash, in print as on screen.
 */
export const GROUP_STYLE = {
  WT: { colour: '#8a969e', shape: 'circle', dash: [5, 3] },
  variant: { colour: '#1d1d1f', shape: 'cross', dash: [1, 0] },
} as const;

/** Group colours by the value of the `group` field ('WT' or 'Variant'). */
export const GROUP_COLOURS = { WT: GROUP_STYLE.WT.colour, Variant: GROUP_STYLE.variant.colour } as const;

/**
 * Name of the chart parameter holding the variant's name: the group field's values stay 'WT' and
 * 'Variant' (so every chart of an assay has one shape, compiled once), and the legend shows the
 * variant's name instead of 'Variant' (groupChannel's labelExpr). The name travels as a parameter
 * value, never inside an expression.
 */
export const VARIANT_NAME_PARAM = 'variantName';

/** The chart parameters of the group legend: the variant's name. */
export function groupParams(input: AssayChartInput): Array<{ name: string; value: unknown }> {
  return [{ name: VARIANT_NAME_PARAM, value: input.variantLabel }];
}

/**
 * One group channel (colour or shape) keyed by the `group` field, both with the same legend
 * settings, so that vega-lite merges them into one legend naming WT and the variant. Lines get
 * their colour and dash from groupCurveLayers instead (a dash channel on the same field would
 * clash with this legend).
 */
export function groupChannel(prop: 'colour' | 'shape'): Record<string, unknown> {
  return {
    field: 'group',
    type: 'nominal',
    title: null,
    scale: { domain: ['WT', 'Variant'], range: prop === 'colour' ? [GROUP_STYLE.WT.colour, GROUP_STYLE.variant.colour] : [GROUP_STYLE.WT.shape, GROUP_STYLE.variant.shape] },
    legend: { labelExpr: `datum.label === 'Variant' ? ${VARIANT_NAME_PARAM} : datum.label`, symbolSize: 80, symbolOpacity: 1, symbolStrokeWidth: 0 },
  };
}

/**
 * Fitted curves as two line layers, WT's (light grey, dashed) and then the variant's (near-black,
 * solid) over them: each group one broken path (brokenPaths, keyed by `key`), drawn in its order.
 */
export function groupCurveLayers(
  wt: ReadonlyArray<Record<string, unknown>>,
  variant: ReadonlyArray<Record<string, unknown>>,
  key: string,
  x: Record<string, unknown> & { field: string },
  y: Record<string, unknown> & { field: string },
  mark: Record<string, unknown> = {},
): Array<Record<string, unknown>> {
  return ([['WT', wt], ['variant', variant]] as const).map(([g, rows]) => ({
    data: { values: brokenPaths(rows, key, x.field, y.field) },
    mark: { type: 'line', strokeWidth: 1.5, ...mark, color: GROUP_STYLE[g].colour, strokeDash: GROUP_STYLE[g].dash },
    encoding: { x, y, order: { field: 'seq', type: 'quantitative' } },
  }));
}

export function groupEncoding(): Record<string, unknown> {
  return { color: groupChannel('colour') };
}

/** Plot area of the per-variant assay charts, px (about 680 px with axes and legend: an A4 page at 100%). */
export const UNIT_CHART_WIDTH = 520;
export const UNIT_CHART_HEIGHT = 300;

/** Flatten units' plot data, tagging each row with group ('WT' or 'Variant'), unit and batch. */
export function flattenUnits(units: UnitResult[], group: 'WT' | 'Variant', part: 'points' | 'curve'): Array<Record<string, unknown>> {
  const rows: Array<Record<string, unknown>> = [];
  for (const u of units) {
    for (const r of u.plot[part] ?? []) rows.push({ ...r, group, unit: `${u.unit} (${u.batch})`, batch: u.batch });
  }
  return rows;
}

interface UnitChartOptions {
  title: string;
  description: string;
  x: { field: string; title: string; reverse?: boolean };
  y: { field: string; title: string };
  encodingExtra: Record<string, unknown>;
  /** The assay's metrics, listed per preparation in the chart's numbers table. */
  metrics: readonly MetricDef[];
}

/**
 * Curve rows of many preparations as one path per group: rows in their given order, numbered
 * by `seq` (the line's drawing order), with a row whose x and y are null between two
 * preparations, where the line breaks. One line per group instead of one per preparation draws
 * the same picture with far fewer vega operators (each `detail` line is a dataflow of its own).
 */
export function brokenPaths(rows: ReadonlyArray<Record<string, unknown>>, key: string, x: string, y: string): Array<Record<string, unknown>> {
  const out: Array<Record<string, unknown>> = [];
  let previous: unknown;
  for (const r of rows) {
    if (out.length > 0 && r[key] !== previous) out.push({ ...r, [x]: null, [y]: null, seq: out.length });
    out.push({ ...r, seq: out.length });
    previous = r[key];
  }
  return out;
}

/**
 * Points per unit with a fitted curve per unit, variant and WT overlaid (the variant's on top), shapes by group.
 * The numbers table lists each preparation's metrics (the drawn readings and curves are in
 * results.json), not the drawn points.
 */
export function unitChart(input: AssayChartInput, o: UnitChartOptions): ChartSpec {
  const points = [...flattenUnits(input.wtUnits, 'WT', 'points'), ...flattenUnits(input.variantUnits, 'Variant', 'points')];
  const x = { field: o.x.field, type: 'quantitative', title: o.x.title, scale: { reverse: o.x.reverse ?? false, zero: false } };
  const y = { field: o.y.field, type: 'quantitative', title: o.y.title };
  const table = {
    columns: ['Group', 'Preparation', 'Batch', 'Readings', ...o.metrics.map((m) => (m.unit ? `${m.label} (${m.unit})` : m.label))],
    rows: [...input.wtUnits.map((u) => ({ u, group: 'WT' })), ...input.variantUnits.map((u) => ({ u, group: input.variantLabel }))].map(({ u, group }) => [
      group,
      u.unit,
      u.batch,
      String(u.nTechnical),
      ...o.metrics.map((m) => fmt(u.metrics[m.id])),
    ]),
    note: 'The chart draws every reading and each preparation’s fitted curve; both are in results.json (plot of each preparation).',
  };
  return {
    title: o.title,
    description: o.description,
    usermeta: { table },
    params: groupParams(input),
    width: UNIT_CHART_WIDTH,
    height: UNIT_CHART_HEIGHT,
    layer: [
      {
        data: { values: points },
        mark: { type: 'point', filled: true, size: 36, opacity: 0.75 },
        encoding: { x, y, shape: groupChannel('shape'), ...o.encodingExtra },
      },
      // One curve per preparation (keyed by preparation, so two never join), WT's and then the variant's.
      ...groupCurveLayers(flattenUnits(input.wtUnits, 'WT', 'curve'), flattenUnits(input.variantUnits, 'Variant', 'curve'), 'unit', x, y, { opacity: 0.9 }),
    ],
  };
}
