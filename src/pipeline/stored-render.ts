/**
 * Charts through the store.
 *
 * - storedRender: an SVG is kept under the hash of its spec and of the render options that reach
 *   it (id key, title, description). The spec is hashed as JSON.stringify writes it (key order as
 *   built): specs come from deterministic code, so equal charts give equal text, and an unequal
 *   text can only cost a drawing, never a wrong SVG.
 * - storedBlock: a variant's assay chart (SVG, description, numbers table) is kept under the hash
 *   of what it is drawn from (module, variant label, title and the unit results it shows), so that
 *   a rebuild does not even build the specs of the charts whose units are unchanged: building and
 *   hashing thousands of specs was most of a rebuild's time. A unit stands in the key as the
 *   SHA-256 of its JSON as analysed (kept with it in the store: src/pipeline/analyse-units.ts) and
 *   its exclusion (analyseStudy only marks exclusions), or else as the SHA-256 of its JSON now.
 * The store's fingerprint covers the code and the vega and vega-lite versions.
 */
import { createHash } from 'node:crypto';
import type { ChartSpec } from '../assays/types.js';
import { type RenderOptions, renderSvg } from '../charts/render.js';
import type { UnitResult } from '../results/types.js';
import type { BlockContent, BlockFn, RenderFn } from '../site/view-common.js';
import type { Store } from './store.js';

/** Charts drawn and charts served from the store. */
export interface ChartCounts {
  rendered: number;
  stored: number;
}

/** A render function for buildSite that asks the store first and keeps what `draw` draws. */
export function storedRender(store: Store, counts: ChartCounts, draw: RenderFn = renderSvg): RenderFn {
  return async (spec: ChartSpec, options: RenderOptions) => {
    const key = store.key('svg', [options.key ?? null, options.title ?? null, options.description ?? null, spec]);
    const hit = store.get('svg', key);
    if (hit) {
      counts.stored++;
      return hit.toString('utf8');
    }
    const svg = await draw(spec, options);
    store.put('svg', key, svg);
    counts.rendered++;
    return svg;
  };
}

/** `draw`, counting the charts it draws. */
export function countedDraw(draw: RenderFn, counts: ChartCounts): RenderFn {
  return (spec, options) => {
    counts.rendered++;
    return draw(spec, options);
  };
}

/** SHA-256 of each unit's JSON, once per unit object (units are not changed once analysed). */
const unitDigests = new WeakMap<object, string>();
const isUnit = (v: unknown): v is UnitResult => !!v && typeof v === 'object' && 'assay' in v && 'unit' in v && 'batch' in v && 'metrics' in v;
function unitDigest(u: UnitResult): string {
  let d = unitDigests.get(u);
  if (d === undefined) {
    d = createHash('sha256').update(JSON.stringify(u)).digest('hex');
    unitDigests.set(u, d);
  }
  return d;
}

/**
 * A block function for buildSite that finds assay chart blocks by their inputs, or makes and keeps
 * them. `digests`: SHA-256 of each unit's JSON as analysed, before exclusions were marked.
 */
export function storedBlock(store: Store, counts: ChartCounts, digests: ReadonlyMap<UnitResult, string> = new Map()): BlockFn {
  const unitKey = (u: UnitResult) => {
    const analysed = digests.get(u);
    return analysed === undefined ? `unit:${unitDigest(u)}` : `analysed:${JSON.stringify([analysed, u.excluded ?? null])}`;
  };
  return async (inputs, make) => {
    const parts = JSON.stringify(inputs, (_k, v: unknown) => (isUnit(v) ? unitKey(v) : v));
    const key = store.key('block', parts);
    const hit = store.get('block', key);
    if (hit) {
      try {
        const block = JSON.parse(hit.toString('utf8')) as BlockContent;
        if (typeof block.svg === 'string' && typeof block.description === 'string' && Array.isArray(block.table?.rows)) {
          counts.stored++;
          return block;
        }
      } catch {
        // made again below
      }
    }
    const block = await make();
    store.put('block', key, JSON.stringify({ svg: block.svg, description: block.description, table: block.table }));
    return block;
  };
}
