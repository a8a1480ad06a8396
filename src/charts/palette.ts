/**
 * The site's one palette and legend. Each mark has a colour, a Vega point shape and a text glyph,
 * so a call is never carried by colour alone, and each means one thing everywhere:
 *
 *   ▲ vermilion   hypercontractile, or a metric change towards hypercontractile
 *   ▼ cobalt      hypocontractile, or a metric change towards hypocontractile
 *   △ ▽ teal      a metric higher or lower than WT that implies no disease direction
 *   ● slate       within WT range          ◆ plum    mixed (assays disagree)
 *   ■ ochre       indeterminate            ○ grey    not measured / not estimable
 *
 * A metric's change is marked by the direction it implies for the disease-relevant axis, not by
 * the sign of the change: a decreased slow-phase (super-relaxed) fraction frees heads and is
 * hypercontractile, so it is ▲ vermilion, never ▼ cobalt (see metricMark).
 * The hues (vermilion-brown, cobalt, teal, slate, plum, ochre, grey) differ in lightness as well
 * as hue, so they stay apart under deuteranopia and protanopia; hollow and filled shapes differ too.
 */
import type { ControlClass } from '../results/source.js';
import type { FunctionCall, HyperDirection, MetricCall } from '../results/types.js';

export interface CallStyle {
  colour: string;
  /** Vega point shape: a built-in name or an SVG path in the square −1…1 (vega's custom symbols). */
  shape: string;
  /** Text glyph printed beside the call word in tables and badges. */
  glyph: string;
}

/** Hollow shapes as SVG paths: an outer contour and an inner one wound the other way (nonzero fill). */
const HOLLOW_TRIANGLE_UP = 'M0,-1L1,0.8L-1,0.8ZM0,-0.42L-0.58,0.5L0.58,0.5Z';
const HOLLOW_TRIANGLE_DOWN = 'M0,1L-1,-0.8L1,-0.8ZM0,0.42L0.58,-0.5L-0.58,-0.5Z';
const RING = 'M0,-1A1,1,0,1,1,0,1A1,1,0,1,1,0,-1ZM0,-0.55A0.55,0.55,0,1,0,0,0.55A0.55,0.55,0,1,0,0,-0.55Z';

const HYPER: CallStyle = { colour: '#b3471d', shape: 'triangle-up', glyph: '▲' };
const HYPO: CallStyle = { colour: '#2456a6', shape: 'triangle-down', glyph: '▼' };
const WITHIN: CallStyle = { colour: '#55636f', shape: 'circle', glyph: '●' };
const INDETERMINATE: CallStyle = { colour: '#9a7412', shape: 'square', glyph: '■' };
const NONE: CallStyle = { colour: '#8f8f8f', shape: RING, glyph: '○' };
/** A change with no disease direction: teal, hollow, pointing the way the value moved. */
const NEUTRAL = '#1f7a72';

export const FUNCTION_CALL_STYLE: Record<FunctionCall, CallStyle> = {
  hypercontractile: HYPER,
  hypocontractile: HYPO,
  'within WT range': WITHIN,
  mixed: { colour: '#8b3d8f', shape: 'diamond', glyph: '◆' },
  indeterminate: INDETERMINATE,
  'not measured': NONE,
  reference: { colour: '#3b4a42', shape: 'circle', glyph: '◎' },
};

/** What a metric's call implies, the category its marks and legends show. */
export type MetricMark =
  | 'towards hypercontractile'
  | 'towards hypocontractile'
  | 'higher, no disease direction'
  | 'lower, no disease direction'
  | 'within WT range'
  | 'indeterminate'
  | 'not estimable';

/** Styles of metric marks, in legend order. */
export const METRIC_MARK_STYLE: Record<MetricMark, CallStyle> = {
  'towards hypercontractile': HYPER,
  'towards hypocontractile': HYPO,
  'higher, no disease direction': { colour: NEUTRAL, shape: HOLLOW_TRIANGLE_UP, glyph: '△' },
  'lower, no disease direction': { colour: NEUTRAL, shape: HOLLOW_TRIANGLE_DOWN, glyph: '▽' },
  'within WT range': WITHIN,
  indeterminate: INDETERMINATE,
  'not estimable': NONE,
};

/**
 * The mark of a metric call, by the direction the change implies for contractility: with
 * `hyper` 'up' an increase is towards hypercontractile, with 'down' a decrease is, with 'none' a
 * change implies no direction (hollow teal △/▽).
 * @example metricMark('decreased', 'down') // → 'towards hypercontractile' (e.g. slow-phase fraction)
 * @example metricMark('increased', 'none') // → 'higher, no disease direction'
 */
export function metricMark(call: MetricCall, hyper: HyperDirection): MetricMark {
  if (call === 'increased' || call === 'decreased') {
    if (hyper === 'none') return call === 'increased' ? 'higher, no disease direction' : 'lower, no disease direction';
    return (call === 'increased') === (hyper === 'up') ? 'towards hypercontractile' : 'towards hypocontractile';
  }
  return call;
}

/**
 * Styles of metric calls when the metric's direction is not at hand: an increase or decrease is
 * then shown as a neutral hollow △/▽, never with a disease colour that may be the wrong one.
 * Use METRIC_MARK_STYLE[metricMark(call, hyper)] wherever the metric is known.
 */
export const METRIC_CALL_STYLE: Record<MetricCall, CallStyle> = {
  increased: METRIC_MARK_STYLE['higher, no disease direction'],
  decreased: METRIC_MARK_STYLE['lower, no disease direction'],
  'within WT range': WITHIN,
  indeterminate: INDETERMINATE,
  'not estimable': NONE,
};

/**
 * Westgard status of a WT control value on Levey–Jennings charts: shapes no call uses, so a QC
 * mark is never read as a call (● in control, ◇ ochre warning, ✖ near-black rejection).
 */
export const QC_STATUS_STYLE = {
  'in control': { colour: WITHIN.colour, shape: 'circle', glyph: '●' },
  'warning (1-2s)': { colour: INDETERMINATE.colour, shape: 'M0,-1L1,0L0,1L-1,0ZM0,-0.5L-0.5,0L0,0.5L0.5,0Z', glyph: '◇' },
  rejected: { colour: '#1d1d1f', shape: 'M-1,-0.65L-0.65,-1L0,-0.35L0.65,-1L1,-0.65L0.35,0L1,0.65L0.65,1L0,0.35L-0.65,1L-1,0.65L-0.35,0Z', glyph: '✖' },
} as const satisfies Record<string, CallStyle>;

/**
 * Known calibration controls (the manifest's control classes) are ringed on every plot of all
 * variants (effects, cross-assay scatter, residue map), each chart with a legend entry for the
 * rings: a solid near-black ring for a pathogenic or likely pathogenic control, a dashed one for a
 * benign or likely benign control. The exact class is in each chart's table and description.
 */
export type ControlSide = 'pathogenic or likely pathogenic' | 'benign or likely benign';
export const CONTROL_RING = { colour: '#1d1d1f', strokeWidth: 1.3 } as const;
/** Dash pattern of each side's ring (vega strokeDash: [] draws a solid line). */
export const CONTROL_RING_DASH: Record<ControlSide, number[]> = { 'pathogenic or likely pathogenic': [1, 0], 'benign or likely benign': [3, 2] };
/** Title of the rings' legend. */
export const CONTROL_LEGEND_TITLE = 'Known control (ringed)';

/** Which ring a control class gets. @example controlSide('likely benign') // → 'benign or likely benign' */
export function controlSide(cls: ControlClass): ControlSide {
  return cls === 'pathogenic' || cls === 'likely pathogenic' ? 'pathogenic or likely pathogenic' : 'benign or likely benign';
}

/**
 * The layer that rings known controls: `values` are the controls' rows, each with a `ring` field
 * (its ControlSide); `position` the x and y encodings of their marks; `size` the ring's area (px²),
 * larger than the mark's. The rings' legend lists only the sides present.
 */
export function controlRingLayer(values: ReadonlyArray<{ ring: ControlSide }>, position: Record<string, unknown>, size: number, legend: Record<string, unknown> = {}): Record<string, unknown> {
  const domain = (Object.keys(CONTROL_RING_DASH) as ControlSide[]).filter((side) => values.some((v) => v.ring === side));
  return {
    data: { values },
    mark: { type: 'point', filled: false, size, color: CONTROL_RING.colour, strokeWidth: CONTROL_RING.strokeWidth, opacity: 1 },
    encoding: {
      ...position,
      strokeDash: {
        field: 'ring',
        type: 'nominal',
        title: CONTROL_LEGEND_TITLE,
        scale: { domain, range: domain.map((side) => CONTROL_RING_DASH[side]) },
        legend: { symbolSize: 200, symbolStrokeWidth: CONTROL_RING.strokeWidth, symbolStrokeColor: CONTROL_RING.colour, labelLimit: 300, ...legend },
      },
    },
  };
}

/** Fill of WT-like bands and the colour of reference lines. */
export const BAND_FILL = '#d9e7df';
export const REFERENCE = '#3b4a42';
export const CI_COLOUR = '#4a4a4a';

/** Colour of text labels on charts. */
export const LABEL_COLOUR = '#1f262b';
/** Colour of leader lines from a label to its mark. */
export const LEADER_COLOUR = '#8a949b';

/**
 * Group marks of the per-variant assay charts (WT and the variant), defined beside those charts
 * (assay modules cannot import src/charts/) and listed here with the rest of the palette.
 */
export { GROUP_STYLE } from '../assays/chart-common.js';

/** Vega-Lite scale for a colour or shape channel keyed by call, listing only calls present. */
export function callScale<K extends string>(styles: Record<K, CallStyle>, present: Iterable<K>, prop: 'colour' | 'shape') {
  const domain = (Object.keys(styles) as K[]).filter((k) => new Set(present).has(k));
  return { domain, range: domain.map((k) => styles[k][prop]) };
}
