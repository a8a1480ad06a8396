/**
 * Per-assay effects: every variant's effect on one metric with its 95% CI, sorted by effect,
 * against the metric's WT-like band (shaded) and the no-change line (1 for ratios, 0 for differences).
 */
import type { MetricComparison, StudyResults } from '../results/types.js';
import { type ChartDef, axisTitle, chartTitle, effectScale, fmt, fmtCi, fmtP, metricLabel, unitSuffix, variantById, variantNames } from './chart-def.js';
import { BAND_FILL, CI_COLOUR, type ControlSide, LABEL_COLOUR, METRIC_MARK_STYLE, REFERENCE, callScale, controlRingLayer, controlSide, metricMark } from './palette.js';

/** Variants an effects chart labels one row each; larger studies get a ranked plot without names. */
export const EFFECTS_LABELLED_MAX = 150;
/** Height in px of the ranked (unlabelled) effects plot. */
const EFFECTS_RANKED_HEIGHT = 560;
/** Width in px of the effects plot (about 680 px with names, control notes and legend: an A4 page at 100%). */
export const EFFECTS_WIDTH = 440;
/** Height in px of one labelled row. */
const EFFECTS_ROW = 20;

/** How a known control is noted beside its row, e.g. 'pathogenic control'. */
export function controlNote(cls: string): string {
  return `${cls} control`;
}

/** Effects chart of one metric of one assay, or null when no variant has an estimable effect. */
export function effectsChart(results: StudyResults, assayId: string, metricId: string): ChartDef | null {
  const names = variantNames(results);
  const byId = variantById(results);
  const comps = results.comparisons.filter((c) => c.assay === assayId && c.metric === metricId);
  const est = comps
    .filter((c): c is MetricComparison & { effect: number } => c.effect !== null && Number.isFinite(c.effect))
    .sort((a, b) => a.effect - b.effect || (a.variant < b.variant ? -1 : 1));
  const [lowest] = est;
  if (!lowest) return null;
  const def = results.assays.find((a) => a.id === assayId)?.metrics.find((m) => m.id === metricId);
  const scale = lowest.scale;
  const log = scale === 'ratio';
  const band = results.settings.bands[`${assayId}.${metricId}`] ?? lowest.band;
  const hyper = def?.hyper ?? 'none';
  const rows = est.map((c, i) => {
    const control = byId.get(c.variant)?.control?.class;
    return { row: names.get(c.variant) ?? c.variant, rank: i + 1, effect: c.effect, lo: c.ciLow, hi: c.ciHigh, call: metricMark(c.call, hyper), control: control ? controlNote(control) : '', ...(control ? { ring: controlSide(control) } : {}) };
  });
  const controls = rows.filter((r): r is (typeof rows)[number] & { ring: ControlSide } => r.ring !== undefined);
  // Up to EFFECTS_LABELLED_MAX variants, one labelled row each, in rank order (sorted by the rank
  // field: an explicit list of names becomes one nested expression per name in vega, which
  // overflows the stack at about 10,000). Beyond that, a ranked plot of fixed height without names:
  // the table below the chart lists every variant.
  const labelled = rows.length <= EFFECTS_LABELLED_MAX;
  const y = labelled
    ? { field: 'row', type: 'nominal', sort: { field: 'rank', op: 'min' }, title: 'Variant', axis: { labelLimit: 200 } }
    : { field: 'rank', type: 'quantitative', scale: { domain: [0, rows.length + 1], nice: false, zero: false, reverse: true }, title: `Variants ranked by effect (1 = lowest of ${rows.length})`, axis: { tickCount: 8, format: 'd', titleLimit: EFFECTS_RANKED_HEIGHT } };
  const { scale: xScale, axis } = effectScale([...rows.flatMap((r) => [r.effect, r.lo, r.hi]), band[0], band[1]], log);
  const label = metricLabel(results, assayId, metricId);
  const xTitle = log ? `${def?.label ?? metricId}: ratio to paired WT (log scale)` : `${def?.label ?? metricId}: difference from paired WT${unitSuffix(def?.unit)}`;
  const x = (field: string) => ({ field, type: 'quantitative', scale: xScale, axis, title: axisTitle(xTitle, EFFECTS_WIDTH) });
  const calls = [...new Set(rows.map((r) => r.call))];
  const title = `${label}: all variants against paired WT`;
  const legendTitle = 'Metric call (direction it implies)';
  const spec = {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: chartTitle(title, EFFECTS_WIDTH + 200),
    width: EFFECTS_WIDTH,
    height: labelled ? Math.max(60, rows.length * EFFECTS_ROW) : EFFECTS_RANKED_HEIGHT,
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
        mark: labelled ? { type: 'point', filled: true, size: 90, opacity: 1, stroke: '#ffffff', strokeWidth: 0.8 } : { type: 'point', filled: true, size: 16, opacity: 0.9 },
        encoding: {
          y,
          x: x('effect'),
          color: { field: 'call', type: 'nominal', title: legendTitle, scale: callScale(METRIC_MARK_STYLE, calls, 'colour') },
          shape: { field: 'call', type: 'nominal', title: legendTitle, scale: callScale(METRIC_MARK_STYLE, calls, 'shape') },
        },
      },
      // Known controls: a ring round the mark (solid or dashed by the control's side, as on every
      // all-variant plot) and the control's class written beside its row, right of the plot.
      ...(controls.length > 0
        ? [
            controlRingLayer(controls, { y, x: x('effect') }, labelled ? 300 : 160, { orient: 'bottom', direction: 'horizontal', columns: 2 }),
            {
              data: { values: controls },
              mark: { type: 'text', align: 'left', baseline: 'middle', fontSize: 11, fontStyle: 'italic', color: LABEL_COLOUR, x: EFFECTS_WIDTH + 6 },
              encoding: { y, text: { field: labelled ? 'control' : 'controlLabel', type: 'nominal' } },
            },
          ]
        : []),
    ],
    config: { legend: { orient: 'top', direction: 'horizontal', columns: 3, titleOrient: 'top', titleAnchor: 'start', labelLimit: 260, titleLimit: 400 } },
  };
  if (!labelled) for (const c of controls) Object.assign(c, { controlLabel: `${c.row}: ${c.control}` });
  const countBy = (call: string) => rows.filter((r) => r.call === call).length;
  // One row per estimable comparison, and there is at least one (checked above).
  const first = rows[0]!;
  const last = rows[rows.length - 1]!;
  const description =
    `${rows.length} variants sorted by ${log ? 'ratio to' : 'difference from'} paired WT for ${label}, with 95% confidence intervals; ` +
    `the shaded WT-like band runs from ${fmt(band[0])} to ${fmt(band[1])}. ` +
    calls.map((c) => `${countBy(c)} ${c}`).join(', ') +
    `. Lowest: ${first.row} ${fmt(first.effect)}; highest: ${last.row} ${fmt(last.effect)}.` +
    (controls.length ? ` Known controls, ringed and named at the right: ${controls.map((c) => `${c.row} (${c.control}) ${fmt(c.effect)}`).join('; ')}.` : '');
  const table = {
    columns: ['Variant', 'Effect', '95% CI', 'q', 'Call', 'Direction it implies', 'Known control'],
    rows: comps
      .slice()
      .sort((a, b) => (a.effect ?? Infinity) - (b.effect ?? Infinity) || (a.variant < b.variant ? -1 : 1))
      .map((c) => {
        const mark = metricMark(c.call, hyper);
        const control = byId.get(c.variant)?.control?.class;
        return [names.get(c.variant) ?? c.variant, fmt(c.effect), fmtCi(c.ciLow, c.ciHigh), fmtP(c.q), c.call, mark === c.call ? '—' : mark, control ?? '—'];
      }),
  };
  return { key: `effects:${assayId}:${metricId}`, title, description, spec, table };
}
