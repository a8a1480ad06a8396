/**
 * Forest plot of one variant's normalised metrics: effect and 95% CI of every metric against
 * its WT-like band. Ratio metrics (variant/WT) share a log axis with a reference line at 1;
 * difference metrics (variant − WT) get their own linear panel with a reference line at 0.
 */
import { groupBy } from '../assays/assay-common.js';
import type { MetricComparison, MetricScale, StudyResults, VariantResult } from '../results/types.js';
import { type ChartDef, chartTitle, effectScale, fmt, fmtCi, fmtP, metricLabel, shortMetricLabel } from './chart-def.js';
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

/**
 * One panel. Its axis range and tick values depend on the variant's numbers, so they are
 * parameters (pushed onto `params`) rather than literals: every forest plot with the same rows
 * and calls then has the same shape and is compiled once (src/charts/render.ts).
 */
function panel(rows: Row[], scale: MetricScale, calls: MetricMark[], params: Param[]) {
  const log = scale === 'ratio';
  const fitted = effectScale(rows.flatMap((r) => [r.effect, r.lo, r.hi, r.bandLo, r.bandHi]), log);
  const xScale: Record<string, unknown> = { ...fitted.scale, domain: { expr: `${scale}Domain` } };
  params.push({ name: `${scale}Domain`, value: fitted.scale.domain });
  const axis: Record<string, unknown> = { ...fitted.axis };
  if (Array.isArray(fitted.axis.values)) {
    axis.values = { expr: `${scale}Ticks` };
    params.push({ name: `${scale}Ticks`, value: fitted.axis.values });
  }
  // Each row label on two lines, the assay above the metric (split at the line break in the row's
  // name): on one line, the longer ones were cut short by vega's text-width estimate (0.8 em per
  // character, so 720 px holds 75 characters at 12 px; the axis is only as wide as its longest label).
  const y = { field: 'row', type: 'nominal', sort: rows.map((r) => r.row), title: null, axis: { labelLimit: 720, labelExpr: "split(datum.label, '\\n')", labelLineHeight: 14, labelOffset: -7 } };
  const xTitle = log ? 'Ratio to paired WT (log scale)' : 'Difference from paired WT';
  const x = (field: string) => ({ field, type: 'quantitative', scale: xScale, axis, title: xTitle });
  const legendTitle = 'Metric call (direction it implies)';
  return {
    width: FOREST_WIDTH,
    height: Math.max(40, rows.length * FOREST_ROW),
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
  const toRow = (c: MetricComparison & { effect: number }): Row => ({
    row: shortMetricLabel(results, c.assay, c.metric).replace(': ', '\n'),
    effect: c.effect,
    lo: c.ciLow,
    hi: c.ciHigh,
    bandLo: c.band[0],
    bandHi: c.band[1],
    call: metricMark(c.call, results.assays.find((a) => a.id === c.assay)?.metrics.find((m) => m.id === c.metric)?.hyper ?? 'none'),
  });
  const ratio = estimable.filter((c) => c.scale === 'ratio').map(toRow);
  const diff = estimable.filter((c) => c.scale === 'difference').map(toRow);
  const rowsAll = [...ratio, ...diff];
  const calls = [...new Set(rowsAll.map((r) => r.call))];
  const params: Param[] = [];
  const panels = [...(ratio.length ? [panel(ratio, 'ratio', calls, params)] : []), ...(diff.length ? [panel(diff, 'difference', calls, params)] : [])];
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
    return `${metricLabel(results, c.assay, c.metric)} ${fmt(c.effect)} (95% CI ${fmtCi(c.ciLow, c.ciHigh)}), ${c.call}${mark !== c.call ? ` (${mark})` : ''}`;
  });
  const description =
    `Forest plot: each metric of ${name} as ${ratio.length ? 'a ratio to WT on a log axis' : ''}` +
    `${ratio.length && diff.length ? ' or ' : ''}${diff.length ? 'a difference from WT on a linear axis' : ''}, ` +
    `with its 95% confidence interval; shaded areas are the WT-like bands. ${parts.join('; ')}.`;
  return { key: `forest:${variant.id}`, title, description, spec, table: forestTable(results, variant) };
}

/** The numbers table under a variant's forest plot: every comparison, with its q value. */
export function forestTable(results: StudyResults, variant: VariantResult): ChartDef['table'] {
  return {
    columns: ['Metric', 'Scale', 'Effect', '95% CI', 'WT-like band', 'q', 'Call'],
    rows: comparisonsOf(results, variant.id).map((c) => [
      metricLabel(results, c.assay, c.metric),
      c.scale === 'ratio' ? 'ratio to WT' : 'difference from WT',
      fmt(c.effect),
      fmtCi(c.ciLow, c.ciHigh),
      `${fmt(c.band[0])}–${fmt(c.band[1])}`,
      fmtP(c.q),
      c.call,
    ]),
  };
}
