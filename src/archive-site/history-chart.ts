/**
 * The forest plot of one metric of a variant's history: one row per study and release, each with
 * its effect, 95% CI, WT-like band and call, drawn at build time like the study charts (vega-lite →
 * SVG, src/charts/render.ts). Ratio rows share a log axis with a reference line at 1; difference
 * rows a linear axis with a line at 0; rows of both scales (after a change of method) are drawn in
 * two panels, since their effects cannot share one axis. Pure: history rows in, a ChartDef out.
 */
import type { MetricHistory, MetricRow } from '../archive/history-types.js';
import { releaseName } from '../archive/release.js';
import { type ChartDef, effectScale, fmt, fmtCi } from '../charts/chart-def.js';
import { fmtBand } from '../results/format.js';
import { assayById } from '../assays/registry.js';
import { BAND_FILL, CI_COLOUR, METRIC_MARK_STYLE, type MetricMark, REFERENCE, callScale, metricMark } from '../charts/palette.js';
import type { MetricScale } from '../results/types.js';

interface Row {
  row: string;
  effect: number;
  lo: number | null;
  hi: number | null;
  bandLo: number;
  bandHi: number;
  /** The direction the row's call implies (palette.ts metricMark): the same marks as the study's forest plots. */
  call: MetricMark;
}

/** How a chart row names its analysis: the study and its date, then the release or 'current build' (two lines). */
export function rowName(r: MetricRow): string {
  return `${r.studyTitle}${r.studyDate ? ` (${r.studyDate})` : ''}\n${r.release ? releaseName(r.release) : 'current build'}`;
}

/** A chart constant computed from the data: a top-level parameter, referenced as { expr: name }. */
interface Param {
  name: string;
  value: unknown;
}

/**
 * One panel. Its axis range and ticks depend on the numbers, so they are parameters (pushed onto
 * `params`), not literals: charts with the same rows (studies) and calls then share one shape,
 * compiled once (src/charts/render.ts), as the study's own forest plots do.
 */
function panel(rows: Row[], order: string[], scale: MetricScale, calls: MetricMark[], params: Param[], differenceTitle: string) {
  const log = scale === 'ratio';
  const fitted0 = effectScale(rows.flatMap((r) => [r.effect, r.lo, r.hi, r.bandLo, r.bandHi]), log);
  params.push({ name: `${scale}Domain`, value: fitted0.scale.domain });
  const axis: Record<string, unknown> = { ...fitted0.axis };
  if (Array.isArray(fitted0.axis.values)) {
    axis.values = { expr: `${scale}Ticks` };
    params.push({ name: `${scale}Ticks`, value: fitted0.axis.values });
  }
  const fitted = { scale: { ...fitted0.scale, domain: { expr: `${scale}Domain` } }, axis };
  const y = { field: 'row', type: 'nominal', sort: order, title: null, axis: { labelLimit: 720, labelExpr: "split(datum.label, '\\n')", labelLineHeight: 14, labelOffset: -7 } };
  const xTitle = log ? 'Ratio to paired WT (log scale)' : differenceTitle;
  const x = (field: string) => ({ field, type: 'quantitative', scale: fitted.scale, axis: fitted.axis, title: xTitle });
  return {
    width: 380,
    height: Math.max(44, rows.length * 40),
    data: { values: rows },
    layer: [
      { mark: { type: 'rect', color: BAND_FILL }, encoding: { y, x: x('bandLo'), x2: { field: 'bandHi' } } },
      { data: { values: [{ ref: log ? 1 : 0 }] }, mark: { type: 'rule', color: REFERENCE, strokeDash: [4, 3] }, encoding: { x: x('ref') } },
      { data: { values: rows.filter((r) => r.lo !== null && r.hi !== null) }, mark: { type: 'rule', color: CI_COLOUR, strokeWidth: 2 }, encoding: { y, x: x('lo'), x2: { field: 'hi' } } },
      {
        mark: { type: 'point', filled: true, size: 110, opacity: 1, stroke: '#ffffff', strokeWidth: 0.8 },
        encoding: {
          y,
          x: x('effect'),
          color: { field: 'call', type: 'nominal', title: 'Metric call (direction it implies)', scale: callScale(METRIC_MARK_STYLE, calls, 'colour') },
          shape: { field: 'call', type: 'nominal', title: 'Metric call (direction it implies)', scale: callScale(METRIC_MARK_STYLE, calls, 'shape') },
        },
      },
    ],
  };
}

/** The table under the chart: every row, also those without an estimate. */
export function historyTable(m: MetricHistory): ChartDef['table'] {
  return {
    columns: ['Study and analysis', 'Scale', 'Effect', '95% CI', 'WT-like band', 'n preparations (variant / WT)', 'Call'],
    rows: m.rows.map((r) => [
      rowName(r).replace('\n', ', '),
      r.scale === 'ratio' ? 'ratio to WT' : 'difference from WT',
      fmt(r.effect),
      fmtCi(r.ciLow, r.ciHigh),
      fmtBand(r.band, r.scale),
      `${r.nVariantUnits} / ${r.nWtUnits}`,
      r.call,
    ]),
  };
}

/** The forest plot of one metric across studies and releases, or null when no row has an estimate. */
export function historyChart(variantName: string, m: MetricHistory): ChartDef | null {
  const estimable = m.rows.filter((r): r is MetricRow & { effect: number } => r.effect !== null && Number.isFinite(r.effect));
  if (estimable.length === 0) return null;
  // Marked by the direction a change implies, from the metric's definition in the assay registry (as on the study's own charts).
  const hyper = assayById(m.assay)?.metrics.find((d) => d.id === m.metric)?.hyper ?? 'none';
  const toRow = (r: MetricRow & { effect: number }): Row => ({ row: rowName(r), effect: r.effect, lo: r.ciLow, hi: r.ciHigh, bandLo: r.band[0], bandHi: r.band[1], call: metricMark(r.call, hyper) });
  const calls = [...new Set(estimable.map((r) => metricMark(r.call, hyper)))];
  const scales: MetricScale[] = (['ratio', 'difference'] as const).filter((s) => estimable.some((r) => r.scale === s));
  const params: Param[] = [];
  const panels = scales.map((s) => {
    const rows = estimable.filter((r) => r.scale === s).map(toRow);
    // A difference is in the metric's unit (one metric: one unit), named on its axis as on the study's forest plots.
    return panel(rows, rows.map((r) => r.row), s, calls, params, m.unit ? `Difference from paired WT (${m.unit})` : `${m.label}: difference from paired WT`);
  });
  const title = `${m.label} (${m.assayLabel}) of ${variantName}, study by study`;
  const spec = {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title,
    params,
    vconcat: panels,
    spacing: 18,
    resolve: { scale: { color: 'shared', shape: 'shared' }, legend: { color: 'shared', shape: 'shared' } },
    // The legend under the plot, its title whole (at the right, vega cut it to 'Metric call (direction it i…').
    config: { legend: { orient: 'bottom', direction: 'horizontal', columns: 3, titleOrient: 'top', titleAnchor: 'start', labelLimit: 260, titleLimit: 400 } },
  };
  const parts = estimable.map((r) => `${rowName(r).replace('\n', ', ')}: ${fmt(r.effect)} (95% CI ${fmtCi(r.ciLow, r.ciHigh)}), ${r.call}`);
  const missing = m.rows.length - estimable.length;
  const description =
    `Forest plot: ${m.label} of ${variantName} in each study and release, as ${scales.map((s) => (s === 'ratio' ? 'a ratio to paired WT on a log axis' : 'a difference from paired WT on a linear axis')).join(' or ')}, ` +
    `with its 95% confidence interval; shaded areas are each analysis's WT-like band. ${parts.join('; ')}.` +
    (missing ? ` ${missing} ${missing === 1 ? 'analysis has' : 'analyses have'} no estimate (see the table).` : '');
  return { key: `history:${variantName}:${m.key}`, title, description, spec, table: historyTable(m) };
}
