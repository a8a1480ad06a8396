/**
 * Charts drawn on a kept View (the previous chart of the same shape's, given new data: see drawRaw
 * in src/charts/render.ts) are byte for byte what vega draws for each chart compiled on its own.
 * The specs are every chart a site build asks for (variant reports and study pages) for the
 * benchmark generator's study (synthetic, invented values), drawn in the build's order and in
 * reverse, so each chart follows others of its shape with different data, axes and legends.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { analyseStudy } from '../../src/analysis/analyse-study.js';
import type { ChartSpec } from '../../src/assays/types.js';
import { ASSAYS } from '../../src/assays/registry.js';
import { syntheticStudy } from '../../src/bench/synthetic.js';
import { chartsFromModules, drawnSpec } from '../../src/charts/assay-charts.js';
import type { ChartRenderer } from '../../src/charts/pool.js';
import { drawRawDirect, drawRawShared, renumberIds, shapeStats } from '../../src/charts/render.js';
import { buildSite } from '../../src/site/build-site.js';
import { loadStudy } from '../../src/study/load.js';

const dir = mkdtempSync(join(tmpdir(), 'myofolio-kept-views-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Every spec a site build hands to its renderer, in the order it does. */
async function siteSpecs(): Promise<ChartSpec[]> {
  const s = syntheticStudy({ variants: 16, perBatch: 3, filaments: 40, turnoverPoints: 60, maxRowsPerFile: 5000 });
  const study = loadStudy({ manifest: JSON.stringify(s.manifest), files: s.files }).study!;
  const results = analyseStudy(study, { toolVersion: 'test', builtAt: '2025-01-01T00:00:00Z' });
  const specs: ChartSpec[] = [];
  const record = async (spec: ChartSpec) => {
    specs.push(drawnSpec(spec));
    return '<svg></svg>';
  };
  const recorder: ChartRenderer = {
    render: record,
    block: (_parts, make) => make(record),
    start: () => undefined,
    stats: () => ({ rendered: specs.length, cached: 0 }),
    close: async () => undefined,
  };
  await buildSite(results, join(dir, 'site'), { renderer: recorder, chartsFor: chartsFromModules(results, ASSAYS), sourceDateEpoch: 1_700_000_000 });
  return specs;
}

// Vega numbers clip paths from a global counter: compare with ids renumbered the same way.
const same = (svg: string) => renumberIds(svg, 'z');

describe('charts drawn on kept Views', () => {
  it('equal each chart drawn on a new View, in the build\'s order and in reverse', async () => {
    const specs = await siteSpecs();
    expect(specs.length).toBeGreaterThan(40);
    const direct = [];
    for (const spec of specs) direct.push(same(await drawRawDirect(spec)));
    const reusedBefore = shapeStats.reused;
    for (const order of [specs.map((_, i) => i), specs.map((_, i) => specs.length - 1 - i)]) {
      for (const i of order) expect(same(await drawRawShared(specs[i])), `chart ${i}`).toBe(direct[i]);
    }
    // Most charts were drawn on a kept View (all but the first of each shape, and large ones).
    expect(shapeStats.reused - reusedBefore).toBeGreaterThan(specs.length);
  }, 180_000);
});
