/**
 * Per-assay effects: every variant's effect on one metric with its 95% CI, sorted by effect,
 * against the metric's WT-like band (shaded) and the no-change line (1 for ratios, 0 for differences).
 */
import type { MetricComparison, StudyResults } from '../results/types.js';
import { type ChartDef, effectScale, fmt, fmtCi, fmtP, metricLabel, unitSuffix, variantNames } from './chart-def.js';
import { BAND_FILL, CI_COLOUR, METRIC_CALL_STYLE, REFERENCE, callScale } from './palette.js';

/** Variants an effects chart labels one row each; larger studies get a ranked plot without names. */
export const EFFECTS_LABELLED_MAX = 150;
/** Height in px of the ranked (unlabelled) effects plot. */
const EFFECTS_RANKED_HEIGHT = 560;

/** Effects chart of one metric of one assay, or null when no variant has an estimable effect. */
export function effectsChart(results: StudyResults, assayId: string, metricId: string): ChartDef | null {
  const names = variantNames(results);
  const comps = results.comparisons.filter((c) => c.assay === assayId && c.metric === metricId);
  const est = comps
    .filter((c): c is MetricComparison & { effect: number } => c.effect !== null && Number.isFinite(c.effect))
    .sort((a, b) => a.effect - b.effect || (a.variant < b.variant ? -1 : 1));
  if (est.length === 0) return null;
  const def = results.assays.find((a) => a.id === assayId)?.metrics.find((m) => m.id === metricId);
  const scale = est[0].scale;
  const log = scale === 'ratio';
  const band = results.settings.bands[`${assayId}.${metricId}`] ?? est[0].band;
  const rows = est.map((c, i) => ({ row: names.get(c.variant) ?? c.variant, rank: i + 1, effect: c.effect, lo: c.ciLow, hi: c.ciHigh, call: c.call }));
  // Up to EFFECTS_LABELLED_MAX variants, one labelled row each, in rank order (sorted by the rank
  // field: an explicit list of names becomes one nested expression per name in vega, which
  // overflows the stack at about 10,000). Beyond that, a ranked plot of fixed height without names:
  // the table below the chart lists every variant.
  const labelled = rows.length <= EFFECTS_LABELLED_MAX;
  const y = labelled
    ? { field: 'row', type: 'nominal', sort: { field: 'rank', op: 'min' }, title: 'Variant', axis: { labelLimit: 200 } }
    : { field: 'rank', type: 'quantitative', scale: { domain: [0, rows.length + 1], nice: false, zero: false, reverse: true }, title: `Variants ranked by effect (1 = lowest of ${rows.length})`, axis: { tickCount: 8, format: 'd' } };
  const { scale: xScale, axis } = effectScale([...rows.flatMap((r) => [r.effect, r.lo, r.hi]), band[0], band[1]], log);
  const label = metricLabel(results, assayId, metricId);
  const xTitle = log ? `${def?.label ?? metricId}: ratio to paired WT (log scale)` : `${def?.label ?? metricId}: difference from paired WT${unitSuffix(def?.unit)}`;
  const x = (field: string) => ({ field, type: 'quantitative', scale: xScale, axis, title: xTitle });
  const calls = [...new Set(rows.map((r) => r.call))];
  const title = `${label}: all variants against paired WT`;
  const spec = {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title,
    width: 420,
    height: labelled ? Math.max(60, rows.length * 22) : EFFECTS_RANKED_HEIGHT,
    layer: [
      { data: { values: [{ lo: band[0], hi: band[1] }] }, mark: { type: 'rect', color: BAND_FILL }, encoding: { x: x('lo'), x2: { field: 'hi' } } },
      { data: { values: [{ ref: log ? 1 : 0 }] }, mark: { type: 'rule', color: REFERENCE, strokeDash: [4, 3] }, encoding: { x: x('ref') } },
      {
        data: { values: rows.filter((r) => r.lo !== null && r.hi !== null) },
        // Ranked: thousands of overlapping intervals, drawn faint so the effects stay visible.
        mark: labelled ? { type: 'rule', color: CI_COLOUR, strokeWidth: 2 } : { type: 'rule', color: CI_COLOUR, strokeWidth: 1, opacity: 0.15 },
        encoding: { y, x: x('lo'), x2: { field: 'hi' } },
      },
      {
        data: { values: rows },
        mark: labelled ? { type: 'point', filled: true, size: 100, opacity: 1, stroke: '#ffffff', strokeWidth: 0.8 } : { type: 'point', filled: true, size: 16, opacity: 0.9 },
        encoding: {
          y,
          x: x('effect'),
          color: { field: 'call', type: 'nominal', title: 'Metric call', scale: callScale(METRIC_CALL_STYLE, calls as never, 'colour') },
          shape: { field: 'call', type: 'nominal', title: 'Metric call', scale: callScale(METRIC_CALL_STYLE, calls as never, 'shape') },
        },
      },
    ],
  };
  const countBy = (call: string) => rows.filter((r) => r.call === call).length;
  const description =
    `${rows.length} variants sorted by ${log ? 'ratio to' : 'difference from'} paired WT for ${label}, with 95% confidence intervals; ` +
    `the shaded WT-like band runs from ${fmt(band[0])} to ${fmt(band[1])}. ` +
    calls.map((c) => `${countBy(c)} ${c}`).join(', ') +
    `. Lowest: ${rows[0].row} ${fmt(rows[0].effect)}; highest: ${rows[rows.length - 1].row} ${fmt(rows[rows.length - 1].effect)}.`;
  const table = {
    columns: ['Variant', 'Effect', '95% CI', 'q', 'Call'],
    rows: comps
      .slice()
      .sort((a, b) => (a.effect ?? Infinity) - (b.effect ?? Infinity) || (a.variant < b.variant ? -1 : 1))
      .map((c) => [names.get(c.variant) ?? c.variant, fmt(c.effect), fmtCi(c.ciLow, c.ciHigh), fmtP(c.q), c.call]),
  };
  return { key: `effects:${assayId}:${metricId}`, title, description, spec, table };
}
