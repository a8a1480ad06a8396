/**
 * Boxes of the text and point marks of a chart, read from vega's SVG (drawRaw, which keeps vega's
 * role classes): every group's translate is applied, text boxes are measured with the chart font's
 * advance widths (src/charts/text-width.ts) from the anchor vega wrote, and symbol boxes from their
 * path data. Used to check that no two labels overlap and no label covers a mark.
 *
 * Vertical ink extent of a text line: 0.76 em above the baseline (ascenders of DejaVu Sans,
 * 1556/2048 em) and 0.24 em below (descenders, 483/2048 em; hhea of DejaVu Sans 2.37).
 */
import { textWidth } from '../../src/charts/text-width.js';

export interface Box {
  x0: number;
  y0: number;
  x1: number;
  y1: number;
}

export interface TextBox extends Box {
  text: string;
  /** vega role of the text's mark, e.g. 'axis-label', 'legend-label', 'mark', 'title-text'. */
  role: string;
}

export interface SymbolBox extends Box {
  /** vega role: 'mark' for data marks, 'legend-symbol' for legend entries. */
  role: string;
}

const ABOVE = 0.76;
const BELOW = 0.24;

type Matrix = [number, number, number, number, number, number]; // a b c d e f: x' = a x + c y + e, y' = b x + d y + f

const IDENTITY: Matrix = [1, 0, 0, 1, 0, 0];
function multiply(m: Matrix, n: Matrix): Matrix {
  return [m[0] * n[0] + m[2] * n[1], m[1] * n[0] + m[3] * n[1], m[0] * n[2] + m[2] * n[3], m[1] * n[2] + m[3] * n[3], m[0] * n[4] + m[2] * n[5] + m[4], m[1] * n[4] + m[3] * n[5] + m[5]];
}
function apply(m: Matrix, x: number, y: number): [number, number] {
  return [m[0] * x + m[2] * y + m[4], m[1] * x + m[3] * y + m[5]];
}

/** The matrix of an SVG transform attribute made of translate() and rotate() (what vega writes). */
export function parseTransform(text: string | undefined): Matrix {
  let m = IDENTITY;
  for (const [, kind, list = ''] of (text ?? '').matchAll(/(translate|rotate)\(([^)]*)\)/g)) {
    const args = list.split(/[\s,]+/).filter(Boolean).map(Number);
    if (kind === 'translate') m = multiply(m, [1, 0, 0, 1, args[0] ?? 0, args[1] ?? 0]);
    else {
      const a = ((args[0] ?? 0) * Math.PI) / 180;
      m = multiply(m, [Math.cos(a), Math.sin(a), -Math.sin(a), Math.cos(a), 0, 0]);
    }
  }
  return m;
}

function attrs(tag: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [, name, value] of tag.matchAll(/([\w:-]+)="([^"]*)"/g)) if (name !== undefined && value !== undefined) out[name] = value;
  return out;
}

const decode = (s: string) => s.replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&#39;/g, "'").replace(/&#(\d+);/g, (_m, d: string) => String.fromCharCode(Number(d))).replace(/&amp;/g, '&');

/** Extent of a symbol path about its origin: the largest |coordinate| or radius it reaches. */
function pathRadius(d: string): number {
  let r = 0;
  let x = 0;
  let y = 0;
  for (const [, command, list = ''] of d.matchAll(/([MLHVAZmlhvaz])([^MLHVAZmlhvaz]*)/g)) {
    const n = list.split(/[\s,]+/).filter(Boolean).map(Number);
    switch (command) {
      case 'M':
      case 'L':
        for (let i = 0; i + 1 < n.length; i += 2) [x, y] = [n[i] ?? x, n[i + 1] ?? y];
        break;
      case 'h':
        x += n[0] ?? 0;
        break;
      case 'v':
        y += n[0] ?? 0;
        break;
      case 'H':
        x = n[0] ?? x;
        break;
      case 'V':
        y = n[0] ?? y;
        break;
      case 'A':
        r = Math.max(r, Math.abs(n[0] ?? 0), Math.abs(n[1] ?? 0));
        [x, y] = [n[5] ?? x, n[6] ?? y];
        break;
      default:
        break;
    }
    r = Math.max(r, Math.abs(x), Math.abs(y));
  }
  return r;
}

/**
 * Text boxes and symbol boxes of a raw vega SVG. A label drawn twice at one place (a white halo
 * under it) counts once.
 */
export function svgBoxes(svg: string): { texts: TextBox[]; symbols: SymbolBox[] } {
  const texts: TextBox[] = [];
  const symbols: SymbolBox[] = [];
  const root = { m: IDENTITY, role: '' };
  const stack: Array<{ m: Matrix; role: string }> = [root];
  const tokens = svg.match(/<[^>]+>|[^<]+/g) ?? [];
  for (let i = 0; i < tokens.length; i++) {
    const tok = tokens[i] ?? '';
    if (!tok.startsWith('<')) continue;
    const top = stack[stack.length - 1] ?? root;
    if (tok.startsWith('</g')) {
      stack.pop();
      continue;
    }
    const name = /^<(\w+)/.exec(tok)?.[1] ?? '';
    const a = attrs(tok);
    const selfClosing = tok.endsWith('/>');
    if (name === 'g' || name === 'svg') {
      const role = /role-([\w-]+)/.exec(a.class ?? '')?.[1] ?? top.role;
      if (name === 'g' && !selfClosing) stack.push({ m: multiply(top.m, parseTransform(a.transform)), role });
      continue;
    }
    if (name === 'path' && a.transform && a.d && /^(mark|legend-symbol)$/.test(top.role)) {
      const m = multiply(top.m, parseTransform(a.transform));
      const r = pathRadius(a.d);
      const [cx, cy] = apply(m, 0, 0);
      if (r > 0 && r < 30) symbols.push({ role: top.role, x0: cx - r, x1: cx + r, y0: cy - r, y1: cy + r });
      continue;
    }
    if (name !== 'text') continue;
    // The text's lines: its own content, or one line per <tspan> (x="0" dy="…" starts a new line).
    const lines: Array<{ text: string; dy: number }> = [];
    let j = i + 1;
    let pendingDy = 0;
    for (; j < tokens.length && !(tokens[j] ?? '').startsWith('</text'); j++) {
      const t = tokens[j] ?? '';
      if (t.startsWith('<tspan')) pendingDy += Number(attrs(t).dy ?? 0);
      else if (!t.startsWith('<')) {
        lines.push({ text: decode(t), dy: pendingDy });
        pendingDy = 0;
      }
    }
    i = j;
    const m = multiply(top.m, parseTransform(a.transform));
    const size = Number.parseFloat(a['font-size'] ?? '11');
    const bold = a['font-weight'] === 'bold';
    const anchor = a['text-anchor'] ?? 'start';
    let y = 0;
    for (const line of lines) {
      y += line.dy;
      const w = textWidth(line.text.trim(), size, bold);
      const x0 = anchor === 'middle' ? -w / 2 : anchor === 'end' ? -w : 0;
      const corners = [apply(m, x0, y - ABOVE * size), apply(m, x0 + w, y - ABOVE * size), apply(m, x0, y + BELOW * size), apply(m, x0 + w, y + BELOW * size)];
      const box = {
        text: line.text,
        role: top.role,
        x0: Math.min(...corners.map((c) => c[0])),
        x1: Math.max(...corners.map((c) => c[0])),
        y0: Math.min(...corners.map((c) => c[1])),
        y1: Math.max(...corners.map((c) => c[1])),
      };
      const r1 = (v: number) => Math.round(v * 10);
      if (!texts.some((t) => t.text === box.text && r1(t.x0) === r1(box.x0) && r1(t.y0) === r1(box.y0))) texts.push(box);
    }
  }
  return { texts, symbols };
}

/** Overlap of two boxes: the smaller of the two overlaps along x and y (≤ 0 when apart). */
export function overlap(a: Box, b: Box): number {
  return Math.min(Math.min(a.x1, b.x1) - Math.max(a.x0, b.x0), Math.min(a.y1, b.y1) - Math.max(a.y0, b.y0));
}

/** Pairs of boxes that overlap by more than `tolerance` px, described for a failure message. */
export function overlappingPairs<T extends Box>(boxes: readonly T[], describe: (b: T) => string, tolerance = 0.5): string[] {
  const out: string[] = [];
  boxes.forEach((a, i) => {
    for (const b of boxes.slice(i + 1)) if (overlap(a, b) > tolerance) out.push(`${describe(a)} × ${describe(b)}`);
  });
  return out;
}
