/**
 * The site's own call palette. Each call has a colour, a Vega shape and a text glyph, so a call
 * is never carried by colour alone. The hues (vermilion-brown, cobalt, slate, plum, ochre, grey)
 * differ in lightness as well as hue, so they stay apart under deuteranopia and protanopia.
 */
import type { FunctionCall, MetricCall } from '../results/types.js';

export interface CallStyle {
  colour: string;
  /** Vega point shape. */
  shape: string;
  /** Text glyph printed beside the call word in tables and badges. */
  glyph: string;
}

export const FUNCTION_CALL_STYLE: Record<FunctionCall, CallStyle> = {
  hypercontractile: { colour: '#b3471d', shape: 'triangle-up', glyph: '▲' },
  hypocontractile: { colour: '#2456a6', shape: 'triangle-down', glyph: '▼' },
  'within WT range': { colour: '#55636f', shape: 'circle', glyph: '●' },
  mixed: { colour: '#8b3d8f', shape: 'diamond', glyph: '◆' },
  indeterminate: { colour: '#9a7412', shape: 'square', glyph: '■' },
  'not measured': { colour: '#8f8f8f', shape: 'cross', glyph: '○' },
  reference: { colour: '#3b4a42', shape: 'circle', glyph: '◎' },
};

/**
 * Metric calls where the metric's disease direction is not at hand: an increase or a decrease is
 * shown in a neutral teal, never in the hyper or hypo colour, which may be the wrong one (a
 * decreased slow-phase fraction is hypercontractile). Pages mark metric calls by the direction
 * they imply (src/site/view-common.ts, metricCall).
 */
export const METRIC_CALL_STYLE: Record<MetricCall, CallStyle> = {
  increased: { colour: '#1f7a72', shape: 'triangle-up', glyph: '△' },
  decreased: { colour: '#1f7a72', shape: 'triangle-down', glyph: '▽' },
  'within WT range': { colour: '#55636f', shape: 'circle', glyph: '●' },
  indeterminate: { colour: '#9a7412', shape: 'square', glyph: '■' },
  'not estimable': { colour: '#8f8f8f', shape: 'cross', glyph: '○' },
};

/** Fill of WT-like bands and the colour of reference lines. */
export const BAND_FILL = '#d9e7df';
export const REFERENCE = '#3b4a42';
export const CI_COLOUR = '#4a4a4a';

/** Vega-Lite scale for a colour or shape channel keyed by call, listing only calls present. */
export function callScale<K extends string>(styles: Record<K, CallStyle>, present: Iterable<K>, prop: 'colour' | 'shape') {
  const domain = (Object.keys(styles) as K[]).filter((k) => new Set(present).has(k));
  return { domain, range: domain.map((k) => styles[k][prop]) };
}
