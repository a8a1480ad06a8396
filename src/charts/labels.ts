/**
 * Label placement for charts whose marks carry names (cross-assay scatter, residue map): each
 * label goes next to its mark if there is room, else further out with a leader line, else it is
 * left off (the chart's table lists every variant). Placed labels never overlap each other, any
 * mark, or a leader line, and stay inside the plot.
 *
 *   marks (px) ──candidates by distance (8 beside, then rings further out with a leader)──▶
 *   first candidate that is free ──▶ label box, anchor, leader (or left off)
 *
 * Pure and deterministic: labels are placed in the order given (most important first), and the
 * candidates of each in a fixed order. Widths come from the chart font (src/charts/text-width.ts).
 */
import { textWidth } from './text-width.js';

/** Axis-aligned box in px: x0 < x1, y0 < y1 (y grows downwards, as in SVG). */
export interface Box {
  x0: number;
  y0: number;
  x1: number;
  y1: number;
}

export interface LabelRequest {
  /** Key of the labelled datum (returned with its placement). */
  id: string;
  /** Colour of the leader line, if any (e.g. the mark's colour, which ties label and mark together). */
  colour?: string;
  text: string;
  /** Mark centre in px. */
  x: number;
  y: number;
  /** Half the mark's size in px (its box is centre ± r). */
  r: number;
}

export interface PlacedLabel {
  id: string;
  text: string;
  colour?: string;
  /** Anchor of the text: `x` is its left edge, centre or right edge by `align`; `y` its vertical middle. */
  x: number;
  y: number;
  align: 'left' | 'center' | 'right';
  /** Ink box of the label (the text plus a small pad). */
  box: Box;
  /** Leader from the mark's edge to the label's box, when the label is not beside its mark. */
  leader?: { x1: number; y1: number; x2: number; y2: number };
}

export interface PlaceOptions {
  /** Plot area: labels stay inside [0, width] × [0, height]. */
  width: number;
  height: number;
  fontSize: number;
  /** Boxes no label may cover besides the marks (e.g. a legend inside the plot). */
  obstacles?: Box[];
  /** Directions tried around a mark: 'all' (scatter) or 'vertical' (above and below only, residue map). */
  directions?: 'all' | 'vertical';
  /** Furthest a label's centre may be from its mark, in px (default 110). */
  maxDistance?: number;
  /** Space kept around label boxes, in px (default 1.5). */
  pad?: number;
}

/** Vertical ink extent of a line of DejaVu Sans about its middle (baseline 'middle'): capitals 0.73 em above the baseline, descenders 0.24 em below. */
const INK_ABOVE_MIDDLE = 0.45;
const INK_BELOW_MIDDLE = 0.55;

const overlaps = (a: Box, b: Box) => a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1;

/** True when segment p→q passes through box b (Liang–Barsky clipping). */
export function segmentHitsBox(px: number, py: number, qx: number, qy: number, b: Box): boolean {
  let t0 = 0;
  let t1 = 1;
  const dx = qx - px;
  const dy = qy - py;
  const clip = (p: number, q: number) => {
    if (p === 0) return q >= 0;
    const r = q / p;
    if (p < 0) {
      if (r > t1) return false;
      if (r > t0) t0 = r;
    } else {
      if (r < t0) return false;
      if (r < t1) t1 = r;
    }
    return true;
  };
  return clip(-dx, px - b.x0) && clip(dx, b.x1 - px) && clip(-dy, py - b.y0) && clip(dy, b.y1 - py) && t0 < t1;
}

/** True when segments a→b and c→d cross (proper intersection; touching ends do not count). */
function segmentsCross(a: [number, number], b: [number, number], c: [number, number], d: [number, number]): boolean {
  const orient = (p: [number, number], q: [number, number], r: [number, number]) => Math.sign((q[0] - p[0]) * (r[1] - p[1]) - (q[1] - p[1]) * (r[0] - p[0]));
  return orient(a, b, c) * orient(a, b, d) < 0 && orient(c, d, a) * orient(c, d, b) < 0;
}

/** The point of box b nearest to (x, y). */
function nearestPoint(b: Box, x: number, y: number): [number, number] {
  return [Math.min(Math.max(x, b.x0), b.x1), Math.min(Math.max(y, b.y0), b.y1)];
}

interface Candidate {
  /** Label centre. */
  cx: number;
  cy: number;
  leader: boolean;
}

/**
 * Candidate label centres around a mark, nearest first: 8 positions touching the mark (right,
 * left, above, below, then the corners), then rings of 16 directions every `step` px out to
 * maxDistance, each wanting a leader line. 'vertical' keeps to positions above and below
 * (shifted sideways by up to one label width).
 */
function candidates(req: LabelRequest, w: number, h: number, gap: number, step: number, maxDistance: number, directions: 'all' | 'vertical'): Candidate[] {
  const out: Candidate[] = [];
  const near = req.r + gap;
  if (directions === 'all') {
    out.push(
      { cx: req.x + near + w / 2, cy: req.y, leader: false },
      { cx: req.x - near - w / 2, cy: req.y, leader: false },
      { cx: req.x, cy: req.y - near - h / 2, leader: false },
      { cx: req.x, cy: req.y + near + h / 2, leader: false },
      { cx: req.x + near * 0.7 + w / 2, cy: req.y - near * 0.7 - h / 2, leader: false },
      { cx: req.x - near * 0.7 - w / 2, cy: req.y - near * 0.7 - h / 2, leader: false },
      { cx: req.x + near * 0.7 + w / 2, cy: req.y + near * 0.7 + h / 2, leader: false },
      { cx: req.x - near * 0.7 - w / 2, cy: req.y + near * 0.7 + h / 2, leader: false },
    );
    for (let d = near + step; d <= maxDistance; d += step) {
      for (let k = 0; k < 24; k++) {
        const a = (k * Math.PI) / 12;
        // Label centre at distance d along the direction, pushed out by half the box so that the box, not its centre, is d away.
        const ux = Math.cos(a);
        const uy = -Math.sin(a);
        out.push({ cx: req.x + ux * (d + w / 2), cy: req.y + uy * (d + h / 2), leader: true });
      }
    }
  } else {
    const shifts = [0, 0.35, -0.35, 0.7, -0.7, 1, -1, 1.5, -1.5, 2, -2, 3, -3];
    out.push({ cx: req.x, cy: req.y - near - h / 2, leader: false }, { cx: req.x, cy: req.y + near + h / 2, leader: false });
    for (let d = near; d <= maxDistance; d += step) {
      for (const s of shifts) {
        for (const sign of [-1, 1]) {
          if (d === near && s === 0) continue;
          out.push({ cx: req.x + s * w, cy: req.y + sign * (d + h / 2), leader: true });
        }
      }
    }
  }
  return out;
}

/**
 * Boxes filed by the square cells of a grid they touch, so that a test against "every box" looks at
 * the boxes near the one asked about: the placement's answers are the same as a scan of all boxes
 * (every box that can overlap the query shares a cell with it), only found without visiting the rest.
 */
class BoxGrid<T extends { box: Box }> {
  private readonly cells = new Map<number, T[]>();
  constructor(private readonly size: number) {}
  private *keys(b: Box): Generator<number> {
    const s = this.size;
    for (let i = Math.floor(b.x0 / s); i <= Math.floor(b.x1 / s); i++) {
      for (let j = Math.floor(b.y0 / s); j <= Math.floor(b.y1 / s); j++) yield i * 100_003 + j;
    }
  }
  add(item: T): void {
    for (const k of this.keys(item.box)) {
      const list = this.cells.get(k);
      if (list) list.push(item);
      else this.cells.set(k, [item]);
    }
  }
  /** Whether any filed item near `b` satisfies `test`. */
  some(b: Box, test: (item: T) => boolean): boolean {
    for (const k of this.keys(b)) {
      for (const item of this.cells.get(k) ?? []) if (test(item)) return true;
    }
    return false;
  }
}

/** The box around a segment. */
const segmentBox = (x1: number, y1: number, x2: number, y2: number): Box => ({ x0: Math.min(x1, x2), y0: Math.min(y1, y2), x1: Math.max(x1, x2), y1: Math.max(y1, y2) });

/**
 * Place labels in the order given. Returns the placed labels (in that order) and the ids of those
 * left off for want of room.
 * @example placeLabels([{ id: 'a', text: 'A', x: 50, y: 50, r: 5 }], { width: 100, height: 100, fontSize: 10 }).placed[0].align // → 'left' (to the right of its mark)
 */
export function placeLabels(requests: readonly LabelRequest[], options: PlaceOptions): { placed: PlacedLabel[]; unplaced: string[] } {
  const { width, height, fontSize } = options;
  const pad = options.pad ?? 1.5;
  const maxDistance = options.maxDistance ?? 110;
  const directions = options.directions ?? 'all';
  const markBoxes = requests.map((r) => ({ x0: r.x - r.r, y0: r.y - r.r, x1: r.x + r.r, y1: r.y + r.r }));
  const fixed = new BoxGrid<{ box: Box; index: number }>(32);
  [...markBoxes, ...(options.obstacles ?? [])].forEach((box, index) => fixed.add({ box, index }));
  const placed: PlacedLabel[] = [];
  // Placed labels by their box, and their leader lines by the box around each line.
  const placedBoxes = new BoxGrid<{ box: Box }>(32);
  const placedLeaders = new BoxGrid<{ box: Box; leader: NonNullable<PlacedLabel['leader']> }>(32);
  const unplaced: string[] = [];
  const h = fontSize * (INK_ABOVE_MIDDLE + INK_BELOW_MIDDLE);
  requests.forEach((req, index) => {
    const w = textWidth(req.text, fontSize);
    const own = { x0: req.x - req.r, y0: req.y - req.r, x1: req.x + req.r, y1: req.y + req.r };
    for (const c of candidates(req, w + 2 * pad, h + 2 * pad, 2, Math.max(8, fontSize), maxDistance, directions)) {
      const box = { x0: c.cx - w / 2 - pad, x1: c.cx + w / 2 + pad, y0: c.cy - h / 2 - pad, y1: c.cy + h / 2 + pad };
      if (box.x0 < 0 || box.y0 < 0 || box.x1 > width || box.y1 > height) continue;
      if (fixed.some(box, (f) => overlaps(f.box, box))) continue;
      if (placedBoxes.some(box, (p) => overlaps(p.box, box))) continue;
      if (placedLeaders.some(box, ({ leader: l }) => segmentHitsBox(l.x1, l.y1, l.x2, l.y2, box))) continue;
      let leader: PlacedLabel['leader'];
      if (c.leader) {
        const [x2, y2] = nearestPoint(box, req.x, req.y);
        const len = Math.hypot(x2 - req.x, y2 - req.y);
        if (len <= req.r + 1) continue;
        // From the edge of the mark, so the line does not run over it.
        const x1 = req.x + ((x2 - req.x) * (req.r + 1)) / len;
        const y1 = req.y + ((y2 - req.y) * (req.r + 1)) / len;
        const hits = (b: Box) => segmentHitsBox(x1, y1, x2, y2, b);
        // Marks that overlap the labelled one cannot be avoided by its leader; others must be.
        const line = segmentBox(x1, y1, x2, y2);
        if (fixed.some(line, (f) => f.index !== index && !overlaps(f.box, own) && hits(f.box))) continue;
        if (placedBoxes.some(line, (p) => hits(p.box))) continue;
        if (placedLeaders.some(line, ({ leader: l }) => segmentsCross([x1, y1], [x2, y2], [l.x1, l.y1], [l.x2, l.y2]))) continue;
        leader = { x1, y1, x2, y2 };
      }
      // Anchor: the text's left edge when right of the mark, right edge when left of it, else its centre.
      const align: PlacedLabel['align'] = box.x0 >= req.x ? 'left' : box.x1 <= req.x ? 'right' : 'center';
      const x = align === 'left' ? box.x0 + pad : align === 'right' ? box.x1 - pad : c.cx;
      placed.push({ id: req.id, text: req.text, ...(req.colour ? { colour: req.colour } : {}), x, y: c.cy, align, box, ...(leader ? { leader } : {}) });
      placedBoxes.add({ box });
      if (leader) placedLeaders.add({ box: segmentBox(leader.x1, leader.y1, leader.x2, leader.y2), leader });
      return;
    }
    unplaced.push(req.id);
  });
  return { placed, unplaced };
}

/**
 * Position of a value on a continuous axis of `length` px, as vega draws it with a domain
 * [lo, hi] and no nice rounding: linear or log. `reverse` for a y axis (0 at the top).
 * @example axisPosition(10, [1, 100], 200, 'log', false) // → 100
 */
export function axisPosition(value: number, domain: readonly [number, number], length: number, type: 'linear' | 'log', reverse: boolean): number {
  const f = (v: number) => (type === 'log' ? Math.log(v) : v);
  const t = (f(value) - f(domain[0])) / (f(domain[1]) - f(domain[0]));
  return (reverse ? 1 - t : t) * length;
}

/**
 * Vega-Lite layers that draw placed labels in plot pixels (positions bypass the scales:
 * `scale: null`): leader lines, then each label over a white halo so it stays readable where it
 * crosses an interval or a band. One pair of text layers per alignment (vega-lite has no align
 * channel); labels are data values only.
 */
export function labelLayers(placed: readonly PlacedLabel[], fontSize: number, colour: string, leaderColour: string): Array<Record<string, unknown>> {
  const px = (field: string) => ({ field, type: 'quantitative', scale: null, axis: null });
  const leaders = placed.filter((p) => p.leader).map((p) => ({ x: r1(p.leader!.x1), y: r1(p.leader!.y1), x2: r1(p.leader!.x2), y2: r1(p.leader!.y2), colour: p.colour ?? leaderColour }));
  const layers: Array<Record<string, unknown>> = [];
  // One rule layer per leader colour (a colour channel would share, and spoil, the chart's colour scale).
  for (const colour of [...new Set(leaders.map((l) => l.colour))]) {
    const values = leaders.filter((l) => l.colour === colour).map(({ colour: _c, ...l }) => l);
    layers.push({ data: { values }, mark: { type: 'rule', color: colour, strokeWidth: 1.1 }, encoding: { x: px('x'), y: px('y'), x2: { field: 'x2' }, y2: { field: 'y2' } } });
  }
  for (const align of ['left', 'center', 'right'] as const) {
    const values = placed.filter((p) => p.align === align).map((p) => ({ x: r1(p.x), y: r1(p.y), text: p.text }));
    if (values.length === 0) continue;
    const encoding = { x: px('x'), y: px('y'), text: { field: 'text', type: 'nominal' } };
    layers.push(
      { data: { values }, mark: { type: 'text', align, baseline: 'middle', fontSize, stroke: '#ffffff', strokeWidth: 3, strokeOpacity: 0.85, strokeJoin: 'round', color: '#ffffff' }, encoding },
      { data: { values }, mark: { type: 'text', align, baseline: 'middle', fontSize, color: colour }, encoding },
    );
  }
  return layers;
}

const r1 = (x: number) => Math.round(x * 10) / 10;
