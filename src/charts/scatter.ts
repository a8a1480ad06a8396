/**
 * Cross-assay scatter: for two assays, each variant's effect on the first assay's primary metric
 * against its effect on the second's, with both 95% CIs as cross-hairs. The shaded rectangle is
 * where both effects lie inside their WT-like bands. Marks are coloured and shaped by overall call.
 */
import type { MetricComparison, StudyResults } from '../results/types.js';
import { type ChartDef, effectScale, fmt, fmtCi, metricLabel, variantById, variantNames } from './chart-def.js';
import { BAND_FILL, CI_COLOUR, FUNCTION_CALL_STYLE, callScale } from './palette.js';

type Pick = { assay: string; metric: string };

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
    return { name: names.get(id) ?? id, x: x.effect as number, xlo: x.ciLow, xhi: x.ciHigh, y: y.effect as number, ylo: y.ciLow, yhi: y.ciHigh, call: byId.get(id)?.overall.call ?? 'indeterminate' };
  });
  if (rows.length < 2) return null;
  const first = ca.get(ids[0]) as MetricComparison;
  const second = cb.get(ids[0]) as MetricComparison;
  const la = metricLabel(results, a.assay, a.metric);
  const lb = metricLabel(results, b.assay, b.metric);
  const sx = effectScale([...rows.flatMap((r) => [r.x, r.xlo, r.xhi]), ...first.band], first.scale === 'ratio');
  const sy = effectScale([...rows.flatMap((r) => [r.y, r.ylo, r.yhi]), ...second.band], second.scale === 'ratio');
  const short = (p: Pick) => results.assays.find((x) => x.id === p.assay)?.metrics.find((m) => m.id === p.metric)?.label ?? p.metric;
  // Axis titles name the metric only (the chart title names the assays): long titles push the plot down.
  const titleOf = (c: MetricComparison, p: Pick) => (c.scale === 'ratio' ? `${short(p)}: ratio to WT (log)` : `${short(p)}: difference from WT`);
  const X = (field: string) => ({ field, type: 'quantitative', scale: sx.scale, axis: sx.axis, title: titleOf(first, a) });
  const Y = (field: string) => ({ field, type: 'quantitative', scale: sy.scale, axis: sy.axis, title: titleOf(second, b) });
  const calls = [...new Set(rows.map((r) => r.call))];
  const title = `${la} against ${lb}`;
  const spec = {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title,
    width: 360,
    height: 320,
    layer: [
      {
        data: { values: [{ x: first.band[0], x2: first.band[1], y: second.band[0], y2: second.band[1] }] },
        mark: { type: 'rect', color: BAND_FILL },
        encoding: { x: X('x'), x2: { field: 'x2' }, y: Y('y'), y2: { field: 'y2' } },
      },
      {
        data: { values: rows.filter((r) => r.xlo !== null && r.xhi !== null) },
        mark: { type: 'rule', color: CI_COLOUR, strokeWidth: 1.2 },
        encoding: { x: X('xlo'), x2: { field: 'xhi' }, y: Y('y') },
      },
      {
        data: { values: rows.filter((r) => r.ylo !== null && r.yhi !== null) },
        mark: { type: 'rule', color: CI_COLOUR, strokeWidth: 1.2 },
        encoding: { y: Y('ylo'), y2: { field: 'yhi' }, x: X('x') },
      },
      {
        data: { values: rows },
        mark: { type: 'point', filled: true, size: 110, opacity: 1, stroke: '#ffffff', strokeWidth: 0.8 },
        encoding: {
          x: X('x'),
          y: Y('y'),
          color: { field: 'call', type: 'nominal', title: 'Overall call', scale: callScale(FUNCTION_CALL_STYLE, calls as never, 'colour') },
          shape: { field: 'call', type: 'nominal', title: 'Overall call', scale: callScale(FUNCTION_CALL_STYLE, calls as never, 'shape') },
        },
      },
      ...(rows.length <= 40
        ? [{ data: { values: rows }, mark: { type: 'text', align: 'left', dx: 7, dy: -7, fontSize: 10, color: '#222222' }, encoding: { x: X('x'), y: Y('y'), text: { field: 'name', type: 'nominal' } } }]
        : []),
    ],
  };
  const description =
    `${rows.length} variants measured in both assays: ${la} on the horizontal axis, ${lb} on the vertical axis, each with its 95% CI; ` +
    `the shaded rectangle is where both lie inside their WT-like bands. ` +
    rows.map((r) => `${r.name} ${fmt(r.x)} and ${fmt(r.y)}, ${r.call}`).join('; ') + '.';
  const table = {
    columns: ['Variant', la, '95% CI', lb, '95% CI', 'Overall call'],
    rows: rows.map((r) => [r.name, fmt(r.x), fmtCi(r.xlo, r.xhi), fmt(r.y), fmtCi(r.ylo, r.yhi), r.call]),
  };
  return { key: `scatter:${a.assay}.${a.metric}:${b.assay}.${b.metric}`, title, description, spec, table };
}

/** Scatter charts for each pair among the first four assays' primary metrics. */
export function scatterCharts(results: StudyResults): ChartDef[] {
  const picks = primaryMetrics(results).slice(0, 4);
  const out: ChartDef[] = [];
  for (let i = 0; i < picks.length; i++) for (let j = i + 1; j < picks.length; j++) {
    const c = scatterChart(results, picks[i], picks[j]);
    if (c) out.push(c);
  }
  return out;
}
