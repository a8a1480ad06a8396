/**
 * Levey–Jennings chart of one WT control metric: WT values in run order, centre line at the
 * baseline mean and lines at ±1, ±2 and ±3 SD. Points that trigger a Westgard rule are marked by
 * shape (hollow diamond for warnings, a cross for rejections; src/charts/palette.ts QC_STATUS_STYLE)
 * as well as colour, and named in the table.
 */
import type { ControlChart, StudyResults } from '../results/types.js';
import { type ChartDef, axisTitle, chartTitle, fmt, metricLabel, unitSuffix } from './chart-def.js';
import { QC_STATUS_STYLE } from './palette.js';
import { textWidth } from './text-width.js';

/** Westgard rules that are warnings; every other triggered rule rejects the batch. */
const WARNING_RULES = new Set(['1-2s', '1_2s', '12s']);

const STATUS = QC_STATUS_STYLE;
type Status = keyof typeof STATUS;

function statusOf(rules: string[]): Status {
  if (rules.length === 0) return 'in control';
  return rules.every((r) => WARNING_RULES.has(r)) ? 'warning (1-2s)' : 'rejected';
}

/** Width in px of the plot (about 680 px with axis and SD labels: an A4 page at 100%). */
export const LJ_WIDTH = 560;
const LJ_HEIGHT = 240;
/** Largest marker (area, px²); smaller when runs are closer than its width, so markers never overlap. */
const LJ_MARKER_MAX = 80;
/** Alternating fills of batch bands. */
const BATCH_FILLS = ['#f1f4f6', '#ffffff'];

/**
 * Levey–Jennings chart, or null when mean/SD are unknown or there are no points.
 * Values are drawn in run order (the order of cc.points), one position each, so that several
 * WT preparations of a batch sit side by side inside that batch's band instead of one above
 * another; the line joins them in that order. Batches are named above their bands.
 */
export function leveyJenningsChart(results: StudyResults, cc: ControlChart): ChartDef | null {
  if (cc.mean === null || cc.sd === null || cc.points.length === 0) return null;
  const mean = cc.mean;
  const sd = cc.sd;
  const def = results.assays.find((a) => a.id === cc.assay)?.metrics.find((m) => m.id === cc.metric);
  const label = metricLabel(results, cc.assay, cc.metric);
  const points = cc.points.map((p, i) => ({ run: i + 1, batch: p.batch, value: p.value, z: p.z, status: statusOf(p.rules), rules: p.rules.join(', ') }));
  const n = points.length;
  // Batch bands: consecutive runs of one batch (a batch met again later gets a band of its own).
  const bands: Array<{ batch: string; from: number; to: number; mid: number; fill: number }> = [];
  for (const p of points) {
    const last = bands[bands.length - 1];
    if (last && last.batch === p.batch) {
      last.to = p.run + 0.5;
      last.mid = (last.from + last.to) / 2;
    } else bands.push({ batch: p.batch, from: p.run - 0.5, to: p.run + 0.5, mid: p.run, fill: bands.length % 2 });
  }
  const lines = [-3, -2, -1, 0, 1, 2, 3].map((k) => ({
    k,
    y: mean + k * sd,
    label: k === 0 ? 'mean' : `${k > 0 ? '+' : '−'}${Math.abs(k)} SD`,
    dash: k === 0 ? 'solid' : Math.abs(k) === 1 ? 'dot' : Math.abs(k) === 2 ? 'dash' : 'long dash',
  }));
  const present = (Object.keys(STATUS) as Status[]).filter((s) => points.some((p) => p.status === s));
  const spacing = LJ_WIDTH / n;
  const size = Math.max(9, Math.min(LJ_MARKER_MAX, Math.floor((spacing * 0.8) ** 2)));
  const x = (field: string) => ({
    field,
    type: 'quantitative',
    scale: { domain: [0.5, n + 0.5], nice: false, zero: false },
    axis: { labels: false, ticks: false, grid: false, domain: false },
    title: 'WT preparations in run order, batch by batch',
  });
  // The metric without its parenthetical (the chart title gives it in full), so that the unit always shows.
  const yTitle = `${(def?.label ?? cc.metric).replace(/\s*\([^)]*\)/g, '')}${unitSuffix(def?.unit)}`;
  // Room above the +3 SD line for the batch names.
  const lo = Math.min(mean - 3.6 * sd, ...points.map((p) => p.value - 0.3 * sd));
  const hi = Math.max(mean + 4.4 * sd, ...points.map((p) => p.value + 1.2 * sd));
  const y = (field: string) => ({ field, type: 'quantitative', scale: { zero: false, nice: false, domain: [lo, hi] }, title: axisTitle(yTitle, LJ_HEIGHT) });
  const title = `WT control chart: ${label}`;
  // Batch names are drawn only when each fits its band (else the table and the description name them).
  const namesFit = bands.every((b) => textWidth(b.batch, 10) + 4 <= (b.to - b.from) * spacing);
  const spec = {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: chartTitle(title, LJ_WIDTH + 60),
    width: LJ_WIDTH,
    height: LJ_HEIGHT,
    layer: [
      ...[0, 1].map((f) => ({
        data: { values: bands.filter((b) => b.fill === f) },
        mark: { type: 'rect', color: BATCH_FILLS[f] },
        encoding: { x: x('from'), x2: { field: 'to' } },
      })),
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
        mark: { type: 'text', align: 'left', dx: 4, fontSize: 10, color: '#3b4a42', x: 'width', baseline: 'middle' },
        encoding: { y: y('y'), text: { field: 'label', type: 'nominal' } },
      },
      ...(namesFit
        ? [{ data: { values: bands }, mark: { type: 'text', fontSize: 10, color: '#3b4a42', baseline: 'top', y: 3 }, encoding: { x: x('mid'), text: { field: 'batch', type: 'nominal' } } }]
        : []),
      {
        data: { values: points },
        layer: [
          { mark: { type: 'line', color: '#9aa5ad', strokeWidth: 1 }, encoding: { x: x('run'), y: y('value'), order: { field: 'run', type: 'quantitative' } } },
          {
            mark: { type: 'point', filled: true, size, opacity: 1, stroke: '#ffffff', strokeWidth: 0.6 },
            encoding: {
              x: x('run'),
              y: y('value'),
              color: { field: 'status', type: 'nominal', title: 'Westgard status', scale: { domain: present, range: present.map((s) => STATUS[s].colour) } },
              shape: { field: 'status', type: 'nominal', title: 'Westgard status', scale: { domain: present, range: present.map((s) => STATUS[s].shape) } },
            },
          },
        ],
      },
    ],
    config: { view: { stroke: '#c9d1d6' }, legend: { orient: 'bottom', direction: 'horizontal', titleOrient: 'left' } },
  };
  const flagged = points.filter((p) => p.status !== 'in control');
  const description =
    `${n} WT values of ${label} in run order, batch by batch (${bands.map((b) => b.batch).join(', ')}); centre line at mean ${fmt(mean)} and lines at ±1, ±2 and ±3 SD (SD ${fmt(sd)}; ${cc.baseline}). ` +
    (flagged.length ? `Flagged: ${flagged.map((p) => `run ${p.run}, batch ${p.batch} (${p.rules})`).join('; ')}.` : 'No Westgard rule was triggered.');
  const table = {
    columns: ['Batch', 'Value', 'z', 'Rules triggered', 'Status', 'Run (order)'],
    rows: points.map((p) => [p.batch, fmt(p.value), fmt(p.z), p.rules || '—', p.status, String(p.run)]),
  };
  return { key: `lj:${cc.assay}:${cc.metric}`, title, description, spec, table };
}
