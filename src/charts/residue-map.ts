/**
 * Residue map of one gene: the lab's declared domains as bars along the sequence, and every
 * variant with a residue as a mark above them, coloured and shaped by its overall call and
 * placed in a lane per call, so the call can also be read from the lane's name.
 *
 * Each variant's name sits above or below its mark, moved sideways with a leader line where
 * neighbours crowd (src/charts/labels.ts); a lane grows in height until every name fits, up to
 * RESIDUE_LANE_MAX px, and a name that still finds no room is left off (the table lists every
 * variant). Lanes and labels are laid out here in plot pixels; residues go through the same
 * linear scale vega draws the domain bars with.
 */
import type { FunctionCall, StudyResults } from '../results/types.js';
import { type ChartDef, chartTitle, variantNames } from './chart-def.js';
import { type PlacedLabel, axisPosition, labelLayers, placeLabels } from './labels.js';
import { FUNCTION_CALL_STYLE, LABEL_COLOUR, LEADER_COLOUR, callScale, controlRingLayer, controlSide } from './palette.js';
import { controlNote } from './effects.js';
import { textWidth } from './text-width.js';

/** Colours of domain bars, alternating so neighbouring domains stay apart. */
const DOMAIN_FILLS = ['#c9d6e3', '#e3d5c1'] as const;
/** Width of the plot in px (about 680 px with lane names: an A4 page at 100%). */
export const RESIDUE_MAP_WIDTH = 560;
/** Lane heights tried, smallest first, until every label of the lane is placed. */
const RESIDUE_LANE_MIN = 34;
export const RESIDUE_LANE_MAX = 130;
const LANE_STEP = 16;
const POINT_SIZE = 100;
/** Area (px²) of the ring round a known control's mark. */
const RING_SIZE = 300;
const LABEL_FONT = 11;
const DOMAIN_FONT = 11;

/** Residue map of one gene, or null when no variant of the gene has a residue and no domain is declared. */
export function residueMapChart(results: StudyResults, gene: string): ChartDef | null {
  const names = variantNames(results);
  const g = results.study.genes.find((x) => x.symbol === gene);
  const variants = results.variants.filter((v) => v.gene === gene && !v.isWT && typeof v.residue === 'number');
  const domains = (g?.domains ?? []).slice().sort((a, b) => a.start - b.start);
  if (variants.length === 0 && domains.length === 0) return null;
  const maxResidue = Math.max(g?.length ?? 0, ...variants.map((v) => v.residue as number), ...domains.map((d) => d.end), 1);
  const points = variants
    .map((v) => ({ id: v.id, residue: v.residue as number, name: names.get(v.id) ?? v.short, call: v.overall.call, domain: v.domain ?? '', control: v.control?.class }))
    .sort((a, b) => a.residue - b.residue || (a.name < b.name ? -1 : 1));
  const W = RESIDUE_MAP_WIDTH;
  const xDomain: [number, number] = [1, maxResidue];
  const px = (residue: number) => axisPosition(residue, xDomain, W, 'linear', false);
  const calls = [...new Set(points.map((p) => p.call))];
  const lanes = (Object.keys(FUNCTION_CALL_STYLE) as FunctionCall[]).filter((c) => calls.includes(c));

  // Lanes top to bottom; each as tall as its labels need. Marks sit on the lane's middle line.
  // A mark's extent: its point, or a known control's ring round it (labels keep clear of both).
  const radiusOf = (p: (typeof points)[number]) => Math.sqrt(p.control ? RING_SIZE : POINT_SIZE) / 2 + 0.5;
  let top = 0;
  const laneRows: Array<{ call: FunctionCall; y: number; top: number; height: number }> = [];
  const labels: PlacedLabel[] = [];
  const unlabelled: string[] = [];
  for (const call of lanes) {
    const mine = points.filter((p) => p.call === call);
    let height = RESIDUE_LANE_MIN;
    let best: ReturnType<typeof placeLabels> | null = null;
    for (; height <= RESIDUE_LANE_MAX; height += LANE_STEP) {
      best = placeLabels(
        mine.map((p) => ({ id: p.id, text: p.name, x: px(p.residue), y: height / 2, r: radiusOf(p), colour: FUNCTION_CALL_STYLE[call].colour })),
        { width: W, height, fontSize: LABEL_FONT, directions: 'vertical', maxDistance: height / 2 },
      );
      if (best.unplaced.length === 0) break;
    }
    height = Math.min(height, RESIDUE_LANE_MAX);
    const placed = best ?? { placed: [], unplaced: [] };
    for (const l of placed.placed) {
      labels.push({
        ...l,
        y: l.y + top,
        box: { ...l.box, y0: l.box.y0 + top, y1: l.box.y1 + top },
        ...(l.leader ? { leader: { ...l.leader, y1: l.leader.y1 + top, y2: l.leader.y2 + top } } : {}),
      });
    }
    unlabelled.push(...mine.filter((p) => placed.unplaced.includes(p.id)).map((p) => p.name));
    laneRows.push({ call, y: top + height / 2, top, height });
    top += height;
  }
  const plotHeight = Math.max(40, top);
  const laneY = new Map(laneRows.map((l) => [l.call, l.y]));
  const controls = points.flatMap((p) => (p.control ? [{ residue: p.residue, y: laneY.get(p.call) as number, ring: controlSide(p.control) }] : []));

  const x = { type: 'quantitative', scale: { domain: xDomain, nice: false, zero: false }, title: `Residue (${gene})` };
  const pxField = (field: string) => ({ field, type: 'quantitative', scale: null, axis: null });
  const colour = { field: 'call', type: 'nominal', scale: callScale(FUNCTION_CALL_STYLE, calls as never, 'colour'), legend: null };
  const shape = { field: 'call', type: 'nominal', scale: callScale(FUNCTION_CALL_STYLE, calls as never, 'shape'), legend: null };
  const title = `Residue map of ${gene}: variants by overall call`;
  const variantPanel = {
    width: W,
    height: plotHeight,
    layer: [
      // Lane lines, and each lane's name with its mark at the left (the chart's legend).
      { data: { values: laneRows.map((l) => ({ y: l.y })) }, mark: { type: 'rule', color: '#d5dbe0', strokeWidth: 1 }, encoding: { y: pxField('y'), x: { value: 0 }, x2: { value: W } } },
      { data: { values: laneRows.slice(1).map((l) => ({ y: l.top })) }, mark: { type: 'rule', color: '#eef1f3', strokeWidth: 1 }, encoding: { y: pxField('y'), x: { value: 0 }, x2: { value: W } } },
      { data: { values: laneRows.map((l) => ({ y: l.y, call: l.call })) }, mark: { type: 'point', filled: true, size: 70, opacity: 1 }, encoding: { y: pxField('y'), x: { value: -10 }, color: colour, shape } },
      { data: { values: laneRows.map((l) => ({ y: l.y, name: l.call })) }, mark: { type: 'text', align: 'right', baseline: 'middle', fontSize: 12, color: LABEL_COLOUR }, encoding: { y: pxField('y'), x: { value: -20 }, text: { field: 'name', type: 'nominal' } } },
      ...labelLayers(labels, LABEL_FONT, LABEL_COLOUR, LEADER_COLOUR),
      {
        data: { values: points.map((p) => ({ residue: p.residue, y: laneY.get(p.call) as number, name: p.name, call: p.call })) },
        mark: { type: 'point', filled: true, size: POINT_SIZE, opacity: 1, stroke: '#ffffff', strokeWidth: 0.8 },
        encoding: { x: { field: 'residue', ...x, axis: null }, y: pxField('y'), color: colour, shape },
      },
      // Known controls: a ring round the mark, solid or dashed by the control's side (the legend says which).
      ...(controls.length > 0 ? [controlRingLayer(controls, { x: { field: 'residue', ...x, axis: null }, y: pxField('y') }, RING_SIZE)] : []),
    ],
  };
  // Domain names inside their bars when they fit, else centred below the bar when that row has room, else left off (the description names every domain).
  const below: Array<{ x0: number; x1: number }> = [];
  const bars = domains.map((d) => {
    const mid = (d.start + d.end) / 2;
    const w = textWidth(d.name, DOMAIN_FONT);
    let row: 'inside' | 'below' | 'none' = 'inside';
    let cx = px(mid);
    if (w + 4 > px(d.end) - px(d.start)) {
      cx = Math.min(Math.max(cx, w / 2), W - w / 2);
      const span = { x0: cx - w / 2 - 3, x1: cx + w / 2 + 3 };
      row = below.some((b) => b.x0 < span.x1 && span.x0 < b.x1) ? 'none' : 'below';
      if (row === 'below') below.push(span);
    }
    return { name: d.name, start: d.start, end: d.end, cx: Math.round(cx * 10) / 10, row };
  });
  const barLayer = (fill: string, values: typeof bars) => ({
    data: { values },
    mark: { type: 'rect', stroke: '#5a6570', strokeWidth: 0.6, color: fill },
    encoding: { x: { field: 'start', ...x }, x2: { field: 'end' }, y: { value: 3 }, y2: { value: 27 } },
  });
  const nameLayer = (row: 'inside' | 'below', y: number) => ({
    data: { values: bars.filter((b) => b.row === row) },
    mark: { type: 'text', fontSize: DOMAIN_FONT, color: '#1b2530', baseline: 'middle' },
    encoding: { x: { field: 'cx', type: 'quantitative', scale: null, axis: null }, y: { value: y }, text: { field: 'name', type: 'nominal' } },
  });
  const domainPanel = {
    width: W,
    height: below.length > 0 ? 46 : 30,
    layer: [
      barLayer(DOMAIN_FILLS[0], bars.filter((_b, i) => i % 2 === 0)),
      barLayer(DOMAIN_FILLS[1], bars.filter((_b, i) => i % 2 === 1)),
      nameLayer('inside', 15),
      ...(below.length > 0 ? [nameLayer('below', 37)] : []),
      // The axis of the map (ticks at round residue numbers).
      { data: { values: [{ r: 1 }] }, mark: { type: 'point', opacity: 0 }, encoding: { x: { field: 'r', ...x, axis: { tickCount: 10, format: 'd' } } } },
    ],
  };
  const spec = {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: chartTitle(title, W + 140),
    vconcat: [variantPanel, domainPanel],
    spacing: 4,
    resolve: { scale: { x: 'shared' } },
    config: { view: { stroke: null }, legend: { orient: 'bottom', direction: 'horizontal', titleOrient: 'left', titleAnchor: 'start' } },
  };
  const description =
    `Map of ${gene} residues 1–${maxResidue}` +
    (domains.length ? ` with lab-declared domains ${domains.map((d) => `${d.name} (${d.start}–${d.end})`).join(', ')}` : ' (no domains declared)') +
    `. ${points.length} variants with a residue, in a lane per overall call: ` +
    (points.map((p) => `${p.name} at ${p.residue}, ${p.call}`).join('; ') || 'none') +
    '.' +
    (controls.length ? ` Known controls, ringed (solid: pathogenic side; dashed: benign side): ${points.flatMap((p) => (p.control ? [`${p.name} (${controlNote(p.control)})`] : [])).join('; ')}.` : '') +
    (unlabelled.length ? ` Not labelled for want of room: ${unlabelled.join(', ')} (all are in the table).` : '');
  const table = {
    columns: ['Variant', 'Residue', 'Domain', 'Overall call', 'Known control'],
    rows: points.map((p) => [p.name, String(p.residue), p.domain || '—', p.call, p.control ?? '—']),
    ...(unlabelled.length ? { note: `Variants without a label on the map (no room beside their mark): ${unlabelled.join(', ')}.` } : {}),
  };
  return { key: `residues:${gene}`, title, description, spec, table };
}

