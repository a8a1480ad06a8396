/**
 * Vega-Lite spec → standalone, accessible, deterministic SVG string, in Node.
 *
 *   spec ──vega-lite compile──▶ vega spec ──parse──▶ View(renderer 'none') ──toSVG──▶ raw SVG
 *        ──renumber ids with a per-chart prefix──▶ add role/title/desc ──▶ SVG
 *
 * Vega numbers clip paths from a process-global counter (`clip1`, `clip2`, …), so the raw SVG
 * differs between runs and two charts from different processes can collide on one page.
 * Every id is renamed `<prefix>-<n>` in order of appearance, where the prefix is derived from
 * the chart key: the same chart always gives the same bytes.
 */
import { createHash } from 'node:crypto';
import { compile } from 'vega-lite';
import * as vega from 'vega';
import type { ChartSpec } from '../assays/types.js';
import { vegaTextWidth } from './text-width.js';

/**
 * Vega measures text with this function (its documented hook for renderers without a canvas):
 * the chart font's own widths instead of 0.8 em per character. Set before every draw, so a chart
 * never depends on what else ran in the process.
 */
function useChartFontMetrics(): void {
  // Exported by vega (from vega-scenegraph) but not in its type declarations.
  const metrics = (vega as unknown as { textMetrics: { width: unknown } }).textMetrics;
  if (metrics.width !== vegaTextWidth) metrics.width = vegaTextWidth;
}

/** Font stack present on build machines (DejaVu) and common in browsers. */
export const CHART_FONT = 'DejaVu Sans, Verdana, sans-serif';

export interface RenderOptions {
  /** Stable chart key (e.g. 'forest:var-1'); defaults to chartKey(spec). */
  key?: string;
  /** Accessible title; defaults to the spec's title text. */
  title?: string;
  /** Text description; defaults to the spec's description. */
  description?: string;
}

/** Canonical JSON: object keys sorted (undefined values left out), so equal specs give equal strings. */
export function canonical(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonical).join(',')}]`;
  if (value && typeof value === 'object') {
    const entries = Object.entries(value as Record<string, unknown>)
      .filter(([, v]) => v !== undefined)
      .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonical(v)}`).join(',')}}`;
  }
  return JSON.stringify(value) ?? 'null';
}

/**
 * Content key of a spec: SHA-256 of its canonical JSON (first 16 hex digits).
 * This is the seam for a render cache keyed by content. Example: chartKey({}) → '44136fa355b3678a'.
 */
export function chartKey(spec: ChartSpec): string {
  return createHash('sha256').update(canonical(spec)).digest('hex').slice(0, 16);
}

function escapeXml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}

/** Id prefix for a key: letters only at the start, safe in XML ids and CSS selectors. */
function idPrefix(key: string): string {
  return `c${createHash('sha256').update(key).digest('hex').slice(0, 10)}`;
}

/** Rename every id (and its url(#…)/href="#…" references) to `<prefix>-<n>` in order of appearance. */
export function renumberIds(svg: string, prefix: string): string {
  const ids: string[] = [];
  for (const [, id] of svg.matchAll(/\sid="([^"]+)"/g)) if (id !== undefined && !ids.includes(id)) ids.push(id);
  if (ids.length === 0) return svg;
  const map = new Map(ids.map((id, i) => [id, `${prefix}-${i + 1}`]));
  const alternation = ids.map((id) => id.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')).join('|');
  const re = new RegExp(`(\\sid="|url\\(#|href="#)(${alternation})(?=[")])`, 'g');
  return svg.replace(re, (_m, lead: string, id: string) => `${lead}${map.get(id)}`);
}

function specText(value: unknown): string | undefined {
  if (typeof value === 'string') return value;
  if (Array.isArray(value)) return value.join(' ');
  if (value && typeof value === 'object' && 'text' in value) return specText((value as { text: unknown }).text);
  return undefined;
}

/** Add the chart font to the spec's config without overriding what the spec sets. */
function withFont(spec: ChartSpec): ChartSpec {
  const config = (spec.config as Record<string, unknown> | undefined) ?? {};
  // aria: false drops vega's per-mark ARIA; the root <svg role="img"> carries title and description.
  // Slightly larger text than vega's defaults: charts are read on screen and on paper at 100%.
  const base = {
    font: CHART_FONT,
    aria: false,
    axis: { labelFontSize: 12, titleFontSize: 12 },
    legend: { labelFontSize: 12, titleFontSize: 12 },
    title: { fontSize: 14, anchor: 'start' },
  };
  const merged: Record<string, unknown> = { ...base };
  for (const [k, v] of Object.entries(config)) {
    const b = merged[k];
    merged[k] = b && typeof b === 'object' && v && typeof v === 'object' && !Array.isArray(v) ? { ...b, ...v } : v;
  }
  return { ...spec, config: merged };
}

/** Geometry attributes whose numbers are rounded by roundSvgGeometry. */
const GEOMETRY_ATTRS = /\s(d|transform|x|y|x1|x2|y1|y2|width|height|points|cx|cy|r|dx|dy)="([^"]*)"/g;
const DECIMAL = /-?(?:\d+\.\d*|\.\d+)(?:e[-+]?\d+)?/gi;

/**
 * Round every decimal number in SVG geometry attributes (path data, transforms, positions and
 * sizes) to one decimal place: 0.1 px is below what a screen or printer at 100% can show, and
 * vega writes up to 15 digits. Text, colours and opacities are left alone. Trailing '.0' is
 * dropped and '-0' becomes '0'. Deterministic: the same input always gives the same output.
 * @example roundSvgGeometry('<path d="M12.3456,7.0001L-0.04,3"/>') // → '<path d="M12.3,7L0,3"/>'
 */
export function roundSvgGeometry(svg: string): string {
  return svg.replace(GEOMETRY_ATTRS, (_m, name: string, value: string) => ` ${name}="${value.replace(DECIMAL, roundDecimal)}"`);
}

/**
 * One decimal number to one decimal place: String(Math.round(x · 10) / 10), '-0' as '0', written
 * from the integer k = Math.round(x · 10) as ⌊|k|/10⌋.(|k| mod 10) (integer formatting is much
 * cheaper than the shortest-round-trip formatting of a double; for |k| < 10¹⁵ the one-decimal
 * text is that shortest form). Non-finite results keep the original text.
 * @example roundDecimal('-12.3456') // → '-12.3'
 */
export function roundDecimal(n: string): string {
  const k = Math.round(Number(n) * 10);
  if (!Number.isFinite(k)) return n;
  if (k === 0) return '0';
  const a = k < 0 ? -k : k;
  if (a >= 1e15) return String(k / 10);
  const whole = Math.floor(a / 10);
  const tenth = a - whole * 10;
  return `${k < 0 ? '-' : ''}${whole}${tenth === 0 ? '' : `.${tenth}`}`;
}

/**
 * Drop what a static, non-interactive SVG does not need: vega's empty axis foreground paths and
 * zero-size background paths, pointer-events="none", opacity="1" (the default), and the class
 * names vega gives every group (nothing on the site styles or queries them). The root <svg>
 * keeps its attributes.
 * @example stripRedundant('<g class="mark-rule" pointer-events="none"><line opacity="1"/><path d="" display="none"/></g>') // → '<g><line/></g>'
 */
export function stripRedundant(svg: string): string {
  return svg
    .replace(/ pointer-events="none"/g, '')
    .replace(/ opacity="1"(?=[ />])/g, '')
    .replace(/(<(?!svg\b)[a-z]+)\s+class="[^"]*"/g, '$1')
    .replace(/<path d="" display="none"\/>/g, '')
    .replace(/<path d="M0,0h0v0h0Z"\/>/g, '');
}

/** Name of the signal that carries a chart's drawn title into a shared shape. */
const TITLE_SIGNAL = 'myofolio_title';
/** Prefix of the dataset names that replace inline `data.values` in a shape. */
const DATA_PREFIX = 'myofolio_data_';

/**
 * A spec split into its shape and its data: every inline `data: {values}` becomes a named
 * dataset `myofolio_data_<k>` (numbered in document order), and `title`/`description` are left
 * out of the shape, as are the values of top-level `params` of the form { name, value }.
 * Specs that differ only in those share a shape.
 * @example splitSpec({ title: 'A', data: { values: [{ x: 1 }] }, mark: 'point' })
 * // → { shape: { data: { name: 'myofolio_data_0' }, mark: 'point' }, datasets: [[{ x: 1 }]], title: 'A', signals: [] }
 */
export function splitSpec(spec: ChartSpec): { shape: ChartSpec; datasets: unknown[][]; title: unknown; signals: Array<[string, unknown]> } {
  const datasets: unknown[][] = [];
  const walk = (node: unknown): unknown => {
    if (Array.isArray(node)) return node.map(walk);
    if (!node || typeof node !== 'object') return node;
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(node as Record<string, unknown>)) {
      const values = k === 'data' && v && typeof v === 'object' ? (v as { values?: unknown }).values : undefined;
      if (Array.isArray(values) && Object.keys(v as object).length === 1) {
        out.data = { name: `${DATA_PREFIX}${datasets.length}` };
        datasets.push(values);
      } else out[k] = walk(v);
    }
    return out;
  };
  const { title, description: _d, params, ...rest } = spec;
  // Top-level parameters that are plain values ({ name, value }) are chart constants computed
  // from the data (axis ranges, tick values, axis titles): the shape keeps their names, each
  // chart sets their values. Other parameters (selections, bindings, expressions) stay in the shape.
  const signals: Array<[string, unknown]> = [];
  const shapeParams = Array.isArray(params)
    ? params.map((p: unknown) => {
        const q = p as Record<string, unknown>;
        if (q && typeof q === 'object' && typeof q.name === 'string' && 'value' in q && Object.keys(q).length === 2) {
          signals.push([q.name, q.value]);
          return { name: q.name, value: null };
        }
        return p;
      })
    : params;
  const shape = walk(rest) as ChartSpec;
  if (shapeParams !== undefined) shape.params = shapeParams;
  return { shape, datasets, title, signals };
}

/** Vega runtimes of shapes by canonical JSON, per process; least recently used dropped first. */
const runtimes = new Map<string, ReturnType<typeof vega.parse>>();
/** Shapes kept: a study has a handful (one per assay chart and forest-plot height). */
const MAX_SHAPES = 64;

/**
 * The vega runtime of a shape: compiled by vega-lite and parsed by vega once, with the title text
 * (if the spec has a title) drawn from the signal TITLE_SIGNAL, so that one runtime serves every
 * chart of that shape.
 */
function runtimeFor(shape: ChartSpec): ReturnType<typeof vega.parse> {
  const key = canonical(shape);
  const hit = runtimes.get(key);
  if (hit) {
    runtimes.delete(key);
    runtimes.set(key, hit);
    return hit;
  }
  const vg = compile(withFont(shape) as never).spec as Record<string, unknown>;
  if (shape.title !== undefined) {
    const t = vg.title as Record<string, unknown> | string;
    vg.title = typeof t === 'string' ? { text: { signal: TITLE_SIGNAL } } : { ...t, text: { signal: TITLE_SIGNAL } };
    vg.signals = [...((vg.signals as unknown[]) ?? []), { name: TITLE_SIGNAL, value: '' }];
  }
  const runtime = vega.parse(vg as never);
  runtimes.set(key, runtime);
  if (runtimes.size > MAX_SHAPES) runtimes.delete(runtimes.keys().next().value as string);
  return runtime;
}

/**
 * Vega's raw SVG for a spec: its shape's runtime (compiled and parsed once) in a new View, given
 * this chart's datasets, title and parameter values through the View's public API (data, signal),
 * then finalised. Compiling and parsing is most of a chart's time, and charts of a study share a
 * handful of shapes. Tests draw charts this way and compiled on their own (drawRawDirect): same bytes.
 */
export async function drawRaw(spec: ChartSpec): Promise<string> {
  const { shape, datasets, title, signals } = splitSpec(spec);
  // The title's text travels as a signal value; its other parameters (if any) stay in the shape.
  const params = title && typeof title === 'object' && !Array.isArray(title) ? (title as Record<string, unknown>) : undefined;
  const titleText = params ? params.text : title;
  // An empty title draws nothing whichever way it is compiled: leave it out of the shape.
  const hasTitle = titleText !== undefined && titleText !== null && titleText !== '';
  const runtime = runtimeFor(hasTitle ? { ...shape, title: params ? { ...params, text: 'T' } : 'T' } : shape);
  useChartFontMetrics();
  const view = new vega.View(runtime, { renderer: 'none' });
  try {
    datasets.forEach((values, i) => view.data(`${DATA_PREFIX}${i}`, values as never));
    if (hasTitle) view.signal(TITLE_SIGNAL, titleText);
    for (const [name, value] of signals) view.signal(name, value);
    await view.runAsync();
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}

/** Vega's raw SVG for a spec compiled and parsed on its own: the reference drawRaw must equal. */
export async function drawRawDirect(spec: ChartSpec): Promise<string> {
  useChartFontMetrics();
  const view = new vega.View(vega.parse(compile(withFont(spec) as never).spec), { renderer: 'none' });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}

/** Render a Vega-Lite spec to an SVG string with role="img", <title> and <desc>, and stable ids. */
export async function renderSvg(spec: ChartSpec, options: RenderOptions = {}): Promise<string> {
  const key = options.key ?? chartKey(spec);
  const title = options.title ?? specText(spec.title) ?? 'Chart';
  const description = options.description ?? specText(spec.description) ?? title;
  const raw = await drawRaw(spec);
  const prefix = idPrefix(key);
  // Inner ARIA roles from vega (graphics-symbol, …) would each need their own name; the root role="img" speaks for the chart.
  let svg = renumberIds(stripRedundant(roundSvgGeometry(raw.replace(/\s(?:role|aria-[a-z]+)="[^"]*"/g, ''))), prefix);
  const titleId = `${prefix}-title`;
  const descId = `${prefix}-desc`;
  svg = svg.replace(
    /^<svg\b([^>]*)>/,
    (_m, attrs: string) =>
      `<svg${attrs} role="img" aria-labelledby="${titleId} ${descId}" focusable="false">` +
      `<title id="${titleId}">${escapeXml(title)}</title><desc id="${descId}">${escapeXml(description)}</desc>`,
  );
  return svg;
}
