/**
 * Levey–Jennings chart of one WT control metric: batch values in batch order, centre line at the
 * baseline mean and lines at ±1, ±2 and ±3 SD. Points that trigger a Westgard rule are marked by
 * shape (triangle for warnings, square for rejections) as well as colour, and named in the table.
 */
import type { ControlChart, StudyResults } from '../results/types.js';
import { type ChartDef, fmt, metricLabel, unitSuffix } from './chart-def.js';

/** Westgard rules that are warnings; every other triggered rule rejects the batch. */
const WARNING_RULES = new Set(['1-2s', '1_2s', '12s']);

const STATUS = {
  'in control': { colour: '#55636f', shape: 'circle' },
  'warning (1-2s)': { colour: '#9a7412', shape: 'triangle-up' },
  rejected: { colour: '#b3471d', shape: 'square' },
} as const;
type Status = keyof typeof STATUS;

function statusOf(rules: string[]): Status {
  if (rules.length === 0) return 'in control';
  return rules.every((r) => WARNING_RULES.has(r)) ? 'warning (1-2s)' : 'rejected';
}

/** Levey–Jennings chart, or null when mean/SD are unknown or there are no points. */
export function leveyJenningsChart(results: StudyResults, cc: ControlChart): ChartDef | null {
  if (cc.mean === null || cc.sd === null || cc.points.length === 0) return null;
  const mean = cc.mean;
  const sd = cc.sd;
  const def = results.assays.find((a) => a.id === cc.assay)?.metrics.find((m) => m.id === cc.metric);
  const label = metricLabel(results, cc.assay, cc.metric);
  const points = cc.points.map((p, i) => ({ order: i + 1, batch: p.batch, value: p.value, z: p.z, status: statusOf(p.rules), rules: p.rules.join(', ') }));
  const lines = [-3, -2, -1, 0, 1, 2, 3].map((k) => ({
    k,
    y: mean + k * sd,
    label: k === 0 ? 'mean' : `${k > 0 ? '+' : '−'}${Math.abs(k)} SD`,
    dash: k === 0 ? 'solid' : Math.abs(k) === 1 ? 'dot' : Math.abs(k) === 2 ? 'dash' : 'long dash',
  }));
  const present = (Object.keys(STATUS) as Status[]).filter((s) => points.some((p) => p.status === s));
  // Sorted by the order field, not by a list of batch names (vega turns a list into one nested expression per name).
  const x = { field: 'batch', type: 'ordinal', sort: { field: 'order', op: 'min' }, title: 'Batch (in order)', axis: { labelAngle: -40, labelLimit: 90 } };
  const yTitle = `${def?.label ?? cc.metric}${unitSuffix(def?.unit)}`;
  const lo = Math.min(mean - 3.6 * sd, ...points.map((p) => p.value - 0.3 * sd));
  const hi = Math.max(mean + 3.6 * sd, ...points.map((p) => p.value + 0.3 * sd));
  const y = (field: string) => ({ field, type: 'quantitative', scale: { zero: false, nice: false, domain: [lo, hi] }, title: yTitle });
  const title = `WT control chart: ${label}`;
  const spec = {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title,
    width: Math.max(300, Math.min(640, points.length * 40)),
    height: 220,
    layer: [
      {
        data: { values: lines },
        mark: { type: 'rule', color: '#7a8a80' },
        encoding: {
          y: y('y'),
          strokeDash: {
            field: 'dash',
            type: 'nominal',
            legend: null,
            scale: { domain: ['solid', 'dot', 'dash', 'long dash'], range: [[1, 0], [1, 3], [5, 3], [10, 4]] },
          },
        },
      },
      {
        data: { values: lines },
        mark: { type: 'text', align: 'left', dx: 4, fontSize: 10, color: '#3b4a42', x: 'width' },
        encoding: { y: y('y'), text: { field: 'label', type: 'nominal' } },
      },
      {
        data: { values: points },
        layer: [
          { mark: { type: 'line', color: '#9aa5ad', strokeWidth: 1 }, encoding: { x, y: y('value') } },
          {
            mark: { type: 'point', filled: true, size: 90, opacity: 1 },
            encoding: {
              x,
              y: y('value'),
              color: { field: 'status', type: 'nominal', title: 'Westgard status', scale: { domain: present, range: present.map((s) => STATUS[s].colour) } },
              shape: { field: 'status', type: 'nominal', title: 'Westgard status', scale: { domain: present, range: present.map((s) => STATUS[s].shape) } },
            },
          },
        ],
      },
    ],
    config: { view: { stroke: null }, legend: { orient: 'bottom', direction: 'horizontal' } },
  };
  const flagged = points.filter((p) => p.status !== 'in control');
  const description =
    `${points.length} WT batch values of ${label} in batch order; centre line at mean ${fmt(mean)} and lines at ±1, ±2 and ±3 SD (SD ${fmt(sd)}; ${cc.baseline}). ` +
    (flagged.length ? `Flagged: ${flagged.map((p) => `${p.batch} (${p.rules})`).join('; ')}.` : 'No Westgard rule was triggered.');
  const table = {
    columns: ['Batch', 'Value', 'z', 'Rules triggered', 'Status'],
    rows: points.map((p) => [p.batch, fmt(p.value), fmt(p.z), p.rules || '—', p.status]),
  };
  return { key: `lj:${cc.assay}:${cc.metric}`, title, description, spec, table };
}
