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
  for (const m of svg.matchAll(/\sid="([^"]+)"/g)) if (!ids.includes(m[1])) ids.push(m[1]);
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

/**
 * Vega's raw SVG for a spec: compiled by vega-lite, parsed by vega and drawn by a View of its
 * own, with no renderer (SVG is made from the scenegraph), then finalised.
 */
export async function drawRaw(spec: ChartSpec): Promise<string> {
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
