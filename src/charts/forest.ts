/**
 * Forest plot of one variant's normalised metrics: effect and 95% CI of every metric against
 * its WT-like band. Ratio metrics (variant/WT, no unit) share a log axis with a reference line at
 * 1. Difference metrics (variant − WT) are in the metric's own unit, so they never share an axis
 * across units: one linear panel per unit, its axis titled with the unit, with a reference line at
 * 0; a difference without a unit (pCa50, a fraction) has a panel of its own, titled by the metric.
 */
import { groupBy } from '../assays/assay-common.js';
import type { MetricComparison, MetricScale, StudyResults, VariantResult } from '../results/types.js';
import { fmtBand, fmtEffect, fmtEffectCi } from '../results/format.js';
import { type ChartDef, axisTitle, chartTitle, effectScale, fmtP, metricLabel, shortMetricLabel } from './chart-def.js';
import { BAND_FILL, CI_COLOUR, METRIC_MARK_STYLE, type MetricMark, REFERENCE, callScale, metricMark } from './palette.js';

/** Width in px of each forest panel (about 680 px with the two-line row names: an A4 page at 100%). */
export const FOREST_WIDTH = 400;
/** Height in px of one row (two lines of name). */
const FOREST_ROW = 34;

interface Row {
  row: string;
  effect: number;
  lo: number | null;
  hi: number | null;
  bandLo: number;
  bandHi: number;
  /** The direction the metric's call implies (palette.ts metricMark). */
  call: MetricMark;
}

/** A chart constant computed from the data: a top-level parameter, referenced as { expr: name }. */
interface Param {
  name: string;
  value: unknown;
}

/** One panel's rows, its scale and the title of its axis. */
export interface ForestPanel {
  scale: MetricScale;
  /** Axis title: the scale, and for a difference its unit (or the metric, when it has no unit). */
  axisTitle: string;
  rows: Row[];
}

/**
 * The panels of a forest plot: every ratio row in one panel (ratios have no unit), then one panel
 * per unit of the difference rows, in the order the rows come; a difference row without a unit
 * gets a panel of its own. So no axis ever holds lengths in two units.
 * @example forestPanels([{ row: 'pCa50', unit: '', scale: 'difference', … }, { row: 'Passive', unit: 'kPa', scale: 'difference', … }])
 * // → panels titled 'pCa50: difference from paired WT' and 'Difference from paired WT (kPa)'
 */
export function forestPanels(rows: ReadonlyArray<Row & { scale: MetricScale; unit: string; metricName: string }>): ForestPanel[] {
  const panels: ForestPanel[] = [];
  const ratio = rows.filter((r) => r.scale === 'ratio');
  if (ratio.length) panels.push({ scale: 'ratio', axisTitle: 'Ratio to paired WT (log scale)', rows: ratio.map(plainRow) });
  const byKey = new Map<string, ForestPanel>();
  for (const r of rows) {
    if (r.scale !== 'difference') continue;
    const key = r.unit ? `unit ${r.unit}` : `metric ${r.row}`;
    let p = byKey.get(key);
    if (!p) {
      p = { scale: 'difference', axisTitle: r.unit ? `Difference from paired WT (${r.unit})` : `${r.metricName}: difference from paired WT`, rows: [] };
      byKey.set(key, p);
      panels.push(p);
    }
    p.rows.push(plainRow(r));
  }
  return panels;
}

/** A row as the chart draws it (without the fields that only sort it into panels). */
function plainRow(r: Row): Row {
  return { row: r.row, effect: r.effect, lo: r.lo, hi: r.hi, bandLo: r.bandLo, bandHi: r.bandHi, call: r.call };
}

/**
 * One panel. Its axis range and tick values depend on the variant's numbers, so they are
 * parameters (pushed onto `params`, named after the panel's position) rather than literals: every
 * forest plot with the same rows and calls then has the same shape and is compiled once
 * (src/charts/render.ts).
 */
function panel(p: ForestPanel, index: number, calls: MetricMark[], params: Param[]) {
  const { rows, scale } = p;
  const log = scale === 'ratio';
  const name = `panel${index}`;
  const fitted = effectScale(rows.flatMap((r) => [r.effect, r.lo, r.hi, r.bandLo, r.bandHi]), log);
  const xScale: Record<string, unknown> = { ...fitted.scale, domain: { expr: `${name}Domain` } };
  params.push({ name: `${name}Domain`, value: fitted.scale.domain });
  const axis: Record<string, unknown> = { ...fitted.axis };
  if (Array.isArray(fitted.axis.values)) {
    axis.values = { expr: `${name}Ticks` };
    params.push({ name: `${name}Ticks`, value: fitted.axis.values });
  }
  // Each row label on two lines, the assay above the metric (split at the line break in the row's
  // name): on one line, the longer ones were cut short by vega's text-width estimate (0.8 em per
  // character, so 720 px holds 75 characters at 12 px; the axis is only as wide as its longest label).
  const y = { field: 'row', type: 'nominal', sort: rows.map((r) => r.row), title: null, axis: { labelLimit: 720, labelExpr: "split(datum.label, '\\n')", labelLineHeight: 14, labelOffset: -7 } };
  const x = (field: string) => ({ field, type: 'quantitative', scale: xScale, axis, title: axisTitle(p.axisTitle, FOREST_WIDTH) });
  const legendTitle = 'Metric call (direction it implies)';
  return {
    width: FOREST_WIDTH,
    height: rows.length * FOREST_ROW,
    data: { values: rows },
    layer: [
      { mark: { type: 'rect', color: BAND_FILL }, encoding: { y, x: x('bandLo'), x2: { field: 'bandHi' } } },
      {
        data: { values: [{ ref: log ? 1 : 0 }] },
        mark: { type: 'rule', color: REFERENCE, strokeDash: [4, 3] },
        encoding: { x: x('ref') },
      },
      {
        data: { values: rows.filter((r) => r.lo !== null && r.hi !== null) },
        mark: { type: 'rule', color: CI_COLOUR, strokeWidth: 2 },
        encoding: { y, x: x('lo'), x2: { field: 'hi' } },
      },
      {
        mark: { type: 'point', filled: true, size: 110, opacity: 1, stroke: '#ffffff', strokeWidth: 0.8 },
        encoding: {
          y,
          x: x('effect'),
          color: { field: 'call', type: 'nominal', title: legendTitle, scale: callScale(METRIC_MARK_STYLE, calls, 'colour') },
          shape: { field: 'call', type: 'nominal', title: legendTitle, scale: callScale(METRIC_MARK_STYLE, calls, 'shape') },
        },
      },
    ],
  };
}

/** Comparisons of each variant, indexed once per results object (a scan per variant is quadratic in study size). */
const comparisonsByVariant = new WeakMap<StudyResults, Map<string, MetricComparison[]>>();
function comparisonsOf(results: StudyResults, variantId: string): MetricComparison[] {
  let index = comparisonsByVariant.get(results);
  if (!index) {
    index = groupBy(results.comparisons, (c) => c.variant);
    comparisonsByVariant.set(results, index);
  }
  return index.get(variantId) ?? [];
}

/** Title of a variant's forest plot. */
export function forestTitle(name: string): string {
  return `Normalised metrics of ${name} against paired WT`;
}

/** Forest plot of one variant, or null when it has no estimable comparison. */
export function forestChart(results: StudyResults, variant: VariantResult, name: string): ChartDef | null {
  const comps = comparisonsOf(results, variant.id);
  const estimable = comps.filter((c): c is MetricComparison & { effect: number } => c.effect !== null && Number.isFinite(c.effect));
  if (estimable.length === 0) return null;
  const defOf = (c: MetricComparison) => results.assays.find((a) => a.id === c.assay)?.metrics.find((m) => m.id === c.metric);
  const toRow = (c: MetricComparison & { effect: number }) => ({
    row: shortMetricLabel(results, c.assay, c.metric).replace(': ', '\n'),
    effect: c.effect,
    lo: c.ciLow,
    hi: c.ciHigh,
    bandLo: c.band[0],
    bandHi: c.band[1],
    call: metricMark(c.call, defOf(c)?.hyper ?? 'none'),
    scale: c.scale,
    // The comparison's own unit (as results.json states it), else the metric's definition.
    unit: c.unit ?? defOf(c)?.unit ?? '',
    metricName: defOf(c)?.label ?? c.metric,
  });
  const rows = estimable.map(toRow);
  const ratio = rows.filter((r) => r.scale === 'ratio');
  const diff = rows.filter((r) => r.scale === 'difference');
  const calls = [...new Set(rows.map((r) => r.call))];
  const params: Param[] = [];
  const layout = forestPanels(rows);
  const panels = layout.map((p, i) => panel(p, i, calls, params));
  const title = forestTitle(name);
  const spec = {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: chartTitle(title, FOREST_WIDTH + 260),
    params,
    vconcat: panels,
    spacing: 18,
    resolve: { scale: { color: 'shared', shape: 'shared' }, legend: { color: 'shared', shape: 'shared' } },
    config: { legend: { orient: 'bottom', direction: 'horizontal', columns: 3, titleOrient: 'top', titleAnchor: 'start', labelLimit: 260, titleLimit: 400 } },
  };
  const parts = estimable.map((c) => {
    const mark = metricMark(c.call, results.assays.find((a) => a.id === c.assay)?.metrics.find((m) => m.id === c.metric)?.hyper ?? 'none');
    return `${metricLabel(results, c.assay, c.metric)} ${fmtEffect(c.effect, c.scale, c.band)}${c.scale === 'difference' && c.unit ? ` ${c.unit}` : ''} (95% CI ${fmtEffectCi(c.ciLow, c.ciHigh, c.scale, c.effect, c.band)}), ${c.call}${mark !== c.call ? ` (${mark})` : ''}`;
  });
  const diffPanels = layout.filter((p) => p.scale === 'difference').length;
  const description =
    `Forest plot: each metric of ${name} as ${ratio.length ? 'a ratio to WT on a log axis' : ''}` +
    `${ratio.length && diff.length ? ' or ' : ''}${diff.length ? (diffPanels === 1 ? 'a difference from WT on a linear axis in its unit of measurement' : `a difference from WT on linear axes, one per unit of measurement (${diffPanels} panels)`) : ''}, ` +
    `with its 95% confidence interval; shaded areas are the WT-like bands. ${parts.join('; ')}.`;
  return { key: `forest:${variant.id}`, title, description, spec, table: forestTable(results, variant) };
}

/**
 * The numbers table under a variant's forest plot: every comparison, with its q value, each number
 * written as the report's table of metrics writes it (src/results/format.ts: effect, CI and band
 * at one precision; a negative range as '−0.100 to 0.100').
 */
export function forestTable(results: StudyResults, variant: VariantResult): ChartDef['table'] {
  return {
    columns: ['Metric', 'Scale', 'Effect', '95% CI', 'WT-like band', 'q', 'Call'],
    rows: comparisonsOf(results, variant.id).map((c) => [
      metricLabel(results, c.assay, c.metric),
      c.scale === 'ratio' ? 'ratio to WT' : c.unit ? `difference from WT (${c.unit})` : 'difference from WT',
      fmtEffect(c.effect, c.scale, c.band),
      fmtEffectCi(c.ciLow, c.ciHigh, c.scale, c.effect, c.band),
      fmtBand(c.band, c.scale),
      fmtP(c.q),
      c.call,
    ]),
  };
}
