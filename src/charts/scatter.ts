/**
 * Cross-assay scatter: for two assays, each variant's effect on the first assay's primary metric
 * against its effect on the second's, with both 95% CIs as cross-hairs. The shaded rectangle is
 * where both effects lie inside their WT-like bands. Marks are coloured and shaped by overall call.
 * Labels are placed beside their marks or, in a crowd, further out with a leader line
 * (src/charts/labels.ts); a label with no room is left off and its variant named in the note.
 */
import type { FunctionCall, MetricComparison, StudyResults } from '../results/types.js';
import { type ChartDef, axisTitle, chartTitle, effectScale, fmt, fmtCi, metricLabel, variantById, variantNames } from './chart-def.js';
import { axisPosition, labelLayers, placeLabels } from './labels.js';
import { BAND_FILL, CI_COLOUR, FUNCTION_CALL_STYLE, LABEL_COLOUR, LEADER_COLOUR, callScale, controlRingLayer, controlSide } from './palette.js';
import { controlNote } from './effects.js';

type Pick = { assay: string; metric: string };

/** Plot area of a scatter, px: fits an A4 page at 100% with its axes and legend (about 680 px in all). */
export const SCATTER_WIDTH = 580;
export const SCATTER_HEIGHT = 440;
/** Point size (area, px²) and label font size; a known control's ring is larger than its point. */
const POINT_SIZE = 100;
const RING_SIZE = 300;
const LABEL_FONT = 11;
/** Up to this many variants every one is offered a label; beyond it only variants with a call other than within WT range. */
export const SCATTER_LABEL_ALL_MAX = 60;

/** Labelling order: calls that matter most first, so that a crowd leaves off the least telling labels. */
const LABEL_PRIORITY: Record<FunctionCall, number> = { hypercontractile: 0, hypocontractile: 0, mixed: 1, indeterminate: 2, 'within WT range': 3, 'not measured': 4, reference: 5 };

/** The first primary metric of each assay (declaration order), for cross-assay comparison. */
export function primaryMetrics(results: StudyResults): Pick[] {
  return results.assays.flatMap((a) => {
    const m = a.metrics.find((x) => x.primary) ?? a.metrics[0];
    return m ? [{ assay: a.id, metric: m.id }] : [];
  });
}

function comparisonMap(results: StudyResults, p: Pick): Map<string, MetricComparison> {
  return new Map(results.comparisons.filter((c) => c.assay === p.assay && c.metric === p.metric && c.effect !== null).map((c) => [c.variant, c]));
}

/** Scatter of two assays' primary metrics, or null when fewer than two variants have both. */
export function scatterChart(results: StudyResults, a: Pick, b: Pick): ChartDef | null {
  const names = variantNames(results);
  const byId = variantById(results);
  const ca = comparisonMap(results, a);
  const cb = comparisonMap(results, b);
  const ids = [...ca.keys()].filter((id) => cb.has(id)).sort();
  const rows = ids.map((id) => {
    const x = ca.get(id) as MetricComparison;
    const y = cb.get(id) as MetricComparison;
    const control = byId.get(id)?.control?.class;
    return { id, name: names.get(id) ?? id, x: x.effect as number, xlo: x.ciLow, xhi: x.ciHigh, y: y.effect as number, ylo: y.ciLow, yhi: y.ciHigh, call: byId.get(id)?.overall.call ?? ('indeterminate' as FunctionCall), control };
  });
  const [firstId] = ids;
  if (rows.length < 2 || firstId === undefined) return null;
  const first = ca.get(firstId) as MetricComparison;
  const second = cb.get(firstId) as MetricComparison;
  const la = metricLabel(results, a.assay, a.metric);
  const lb = metricLabel(results, b.assay, b.metric);
  const xLog = first.scale === 'ratio';
  const yLog = second.scale === 'ratio';
  const sx = effectScale([...rows.flatMap((r) => [r.x, r.xlo, r.xhi]), ...first.band], xLog);
  const sy = effectScale([...rows.flatMap((r) => [r.y, r.ylo, r.yhi]), ...second.band], yLog);
  const short = (p: Pick) => results.assays.find((x) => x.id === p.assay)?.metrics.find((m) => m.id === p.metric)?.label ?? p.metric;
  // Axis titles name the metric only (the chart title names the assays): long titles push the plot down.
  const titleOf = (c: MetricComparison, p: Pick) => (c.scale === 'ratio' ? `${short(p)}: ratio to WT (log)` : `${short(p)}: difference from WT`);
  const X = (field: string) => ({ field, type: 'quantitative', scale: sx.scale, axis: sx.axis, title: axisTitle(titleOf(first, a), SCATTER_WIDTH) });
  const Y = (field: string) => ({ field, type: 'quantitative', scale: sy.scale, axis: sy.axis, title: axisTitle(titleOf(second, b), SCATTER_HEIGHT) });
  const calls = [...new Set(rows.map((r) => r.call))];
  const title = `${la} against ${lb}`;

  // Labels: placed in plot pixels from the same domains vega draws with (nice: false).
  const px = (v: number) => axisPosition(v, sx.scale.domain as [number, number], SCATTER_WIDTH, xLog ? 'log' : 'linear', false);
  const py = (v: number) => axisPosition(v, sy.scale.domain as [number, number], SCATTER_HEIGHT, yLog ? 'log' : 'linear', true);
  // Within a priority, marks in a crowd first (most neighbours within 40 px): a lone mark finds room anywhere later.
  const crowd = new Map(rows.map((r) => [r.id, rows.filter((q) => q !== r && Math.hypot(px(q.x) - px(r.x), py(q.y) - py(r.y)) < 40).length]));
  const offered = rows
    .filter((r) => rows.length <= SCATTER_LABEL_ALL_MAX || r.call !== 'within WT range')
    .sort((p, q) => LABEL_PRIORITY[p.call] - LABEL_PRIORITY[q.call] || (crowd.get(q.id) ?? 0) - (crowd.get(p.id) ?? 0) || (p.name < q.name ? -1 : 1));
  // A mark's extent: its point, or a known control's ring round it (labels keep clear of both).
  const radiusOf = (r: (typeof rows)[number]) => Math.sqrt(r.control ? RING_SIZE : POINT_SIZE) / 2 + 0.5;
  const { placed, unplaced } = placeLabels(
    offered.map((r) => ({ id: r.id, text: r.name, x: px(r.x), y: py(r.y), r: radiusOf(r), colour: FUNCTION_CALL_STYLE[r.call].colour })),
    { width: SCATTER_WIDTH, height: SCATTER_HEIGHT, fontSize: LABEL_FONT, maxDistance: 150, obstacles: rows.filter((r) => !offered.includes(r)).map((r) => ({ x0: px(r.x) - radiusOf(r), x1: px(r.x) + radiusOf(r), y0: py(r.y) - radiusOf(r), y1: py(r.y) + radiusOf(r) })) },
  );
  const controls = rows.flatMap((r) => (r.control ? [{ name: r.name, x: r.x, y: r.y, ring: controlSide(r.control), control: r.control }] : []));
  const labelled = new Set(placed.map((p) => p.id));
  const unlabelled = rows.filter((r) => !labelled.has(r.id)).map((r) => r.name);

  const spec = {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: chartTitle(title, SCATTER_WIDTH + 60),
    width: SCATTER_WIDTH,
    height: SCATTER_HEIGHT,
    layer: [
      {
        data: { values: [{ x: first.band[0], x2: first.band[1], y: second.band[0], y2: second.band[1] }] },
        mark: { type: 'rect', color: BAND_FILL },
        encoding: { x: X('x'), x2: { field: 'x2' }, y: Y('y'), y2: { field: 'y2' } },
      },
      {
        data: { values: rows.filter((r) => r.xlo !== null && r.xhi !== null) },
        mark: { type: 'rule', color: CI_COLOUR, strokeWidth: 1, opacity: 0.45 },
        encoding: { x: X('xlo'), x2: { field: 'xhi' }, y: Y('y') },
      },
      {
        data: { values: rows.filter((r) => r.ylo !== null && r.yhi !== null) },
        mark: { type: 'rule', color: CI_COLOUR, strokeWidth: 1, opacity: 0.45 },
        encoding: { y: Y('ylo'), y2: { field: 'yhi' }, x: X('x') },
      },
      {
        data: { values: rows.map(({ name, x, y, call }) => ({ name, x, y, call })) },
        mark: { type: 'point', filled: true, size: POINT_SIZE, opacity: 1, stroke: '#ffffff', strokeWidth: 0.8 },
        encoding: {
          x: X('x'),
          y: Y('y'),
          color: { field: 'call', type: 'nominal', title: 'Overall call', scale: callScale(FUNCTION_CALL_STYLE, calls as never, 'colour') },
          shape: { field: 'call', type: 'nominal', title: 'Overall call', scale: callScale(FUNCTION_CALL_STYLE, calls as never, 'shape') },
        },
      },
      // Known controls: a ring round the mark, solid or dashed by the control's side (the legend says which).
      ...(controls.length > 0 ? [controlRingLayer(controls.map(({ x, y, ring }) => ({ x, y, ring })), { x: X('x'), y: Y('y') }, RING_SIZE, { orient: 'top', direction: 'horizontal', columns: 2 })] : []),
      ...labelLayers(placed, LABEL_FONT, LABEL_COLOUR, LEADER_COLOUR),
    ],
    config: { legend: { orient: 'bottom', direction: 'horizontal', columns: 3, titleOrient: 'left', titleAnchor: 'start' } },
  };
  const description =
    `${rows.length} variants measured in both assays: ${la} on the horizontal axis, ${lb} on the vertical axis, each with its 95% CI; ` +
    `the shaded rectangle is where both lie inside their WT-like bands. ` +
    rows.map((r) => `${r.name} ${fmt(r.x)} and ${fmt(r.y)}, ${r.call}`).join('; ') +
    '.' +
    (controls.length ? ` Known controls, ringed (solid: pathogenic side; dashed: benign side): ${controls.map((c) => `${c.name} (${controlNote(c.control)})`).join('; ')}.` : '') +
    (unlabelled.length ? ` Not labelled for want of room: ${unlabelled.join(', ')} (all are in the table).` : '');
  const table = {
    columns: ['Variant', la, '95% CI', lb, '95% CI', 'Overall call', 'Known control'],
    rows: rows.map((r) => [r.name, fmt(r.x), fmtCi(r.xlo, r.xhi), fmt(r.y), fmtCi(r.ylo, r.yhi), r.call, r.control ?? '—']),
    ...(unlabelled.length ? { note: `Variants without a label on the chart (no room beside their mark): ${unlabelled.join(', ')}.` } : {}),
  };
  void unplaced;
  return { key: `scatter:${a.assay}.${a.metric}:${b.assay}.${b.metric}`, title, description, spec, table };
}

/** Scatter charts for each pair among the first four assays' primary metrics. */
export function scatterCharts(results: StudyResults): ChartDef[] {
  const picks = primaryMetrics(results).slice(0, 4);
  const out: ChartDef[] = [];
  picks.forEach((a, i) => {
    for (const b of picks.slice(i + 1)) {
      const c = scatterChart(results, a, b);
      if (c) out.push(c);
    }
  });
  return out;
}
