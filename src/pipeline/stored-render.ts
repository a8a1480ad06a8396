/**
 * Chart drawing through the store: an SVG is kept under the hash of its spec and of the render
 * options that reach it (id key, title, description); the store's fingerprint covers the code and
 * the vega and vega-lite versions. The spec is hashed as JSON.stringify writes it (key order as
 * built): specs come from deterministic code, so equal charts give equal text, and an unequal text
 * can only cost a drawing, never a wrong SVG.
 */
import type { ChartSpec } from '../assays/types.js';
import { type RenderOptions, renderSvg } from '../charts/render.js';
import type { RenderFn } from '../site/view-common.js';
import type { Store } from './store.js';

/** Charts drawn and charts served from the store. */
export interface ChartCounts {
  rendered: number;
  stored: number;
}

/** A render function for buildSite that asks the store first and keeps what it draws. */
export function storedRender(store: Store, counts: ChartCounts): RenderFn {
  return async (spec: ChartSpec, options: RenderOptions) => {
    const key = store.key('svg', [options.key ?? null, options.title ?? null, options.description ?? null, spec]);
    const hit = store.get('svg', key);
    if (hit) {
      counts.stored++;
      return hit.toString('utf8');
    }
    const svg = await renderSvg(spec, options);
    store.put('svg', key, svg);
    counts.rendered++;
    return svg;
  };
}
