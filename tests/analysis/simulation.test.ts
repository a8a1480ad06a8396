/**
 * Seeded simulation check of the whole comparison path (DESIGN.md §5): ATPase curves are
 * simulated per biological unit with known variant/WT kcat ratios, batch effects, unit-to-unit
 * variation and well noise; each unit is fitted (src/assays/atpase.ts), compared with WT of the
 * same batches (src/analysis/normalise.ts) and scored. Requirements from the design, not a
 * published source: 95% intervals cover the true ratio 93–97% of the time; abnormal calls on
 * WT-like variants (true ratio 1) at most 5%.
 */
import { describe, expect, it } from 'vitest';
import { atpase } from '../../src/assays/atpase.js';
import { normaliseAssay } from '../../src/analysis/normalise.js';
import { BANDS, STATS } from '../../src/defaults.js';
import { createRandom } from '../../src/stats/random.js';
import type { AtpaseRateRow, Study } from '../../src/study/types.js';

const ACTIN = [0, 2.5, 5, 10, 20, 40, 70, 100]; // µM; 8 concentrations × 3 wells (typical design, common practice)
const TRUE_RATIOS: Record<string, number> = { v1: 1.0, v2: 1.0, v3: 1.3, v4: 0.75 };

function simulateStudy(seed: number): Study {
  const rnd = createRandom(seed);
  const rows: AtpaseRateRow[] = [];
  const at = { file: 'sim.csv' };
  for (const batch of ['b1', 'b2', 'b3']) {
    const batchEffect = rnd.normal(0, 0.15); // log-scale shift shared by all units of the batch
    const units: Array<[string, number, string]> = [
      ['WT', 1, `${batch}-wt1`],
      ['WT', 1, `${batch}-wt2`],
      ...Object.entries(TRUE_RATIOS).map(([v, r]) => [v, r, `${batch}-${v}`] as [string, number, string]),
    ];
    for (const [variant, ratio, unit] of units) {
      const kcat = 5 * ratio * Math.exp(batchEffect + rnd.normal(0, 0.08));
      const km = 40 * Math.exp(rnd.normal(0, 0.1));
      const basal = 0.03;
      for (const a of ACTIN) {
        for (let w = 0; w < 3; w++) {
          const v = basal + (kcat * a) / (km + a);
          rows.push({ variant, unit, batch, actinUM: a, ratePerS: v * (1 + rnd.normal(0, 0.04)) + rnd.normal(0, 0.01), at });
        }
      }
    }
  }
  return {
    title: 'sim', lab: 'sim', dates: [], synthetic: true, genes: [], direction: 'hypercontractile',
    variants: [
      { id: 'WT', gene: 'X', isWT: true, hgvs: 'WT', short: 'WT', label: 'WT', at },
      ...Object.keys(TRUE_RATIOS).map((id) => ({ id, gene: 'X', isWT: false, hgvs: id, short: id, label: id, at })),
    ],
    thresholds: {}, exclusions: [], caveats: [], settings: {}, files: [], rows: { 'atpase-rates': rows },
    manifestRaw: {}, manifestSha256: '',
  };
}

describe('simulated studies with known effects', () => {
  it('95% intervals of the kcat ratio cover the truth 93–97% of the time; WT-like variants are rarely called abnormal', () => {
    const STUDIES = 1000;
    let covered = 0;
    let intervals = 0;
    let wtLike = 0;
    let falseCalls = 0;
    const kcat = atpase.metrics.filter((m) => m.id === 'kcat');
    for (let s = 0; s < STUDIES; s++) {
      const study = simulateStudy(1000 + s);
      const units = atpase.analyse(study);
      const comps = normaliseAssay('atpase', kcat, units, {
        confidenceLevel: STATS.confidenceLevel,
        qThreshold: STATS.qThreshold,
        bands: BANDS,
        variants: study.variants.map((v) => ({ id: v.id, isWT: v.isWT })),
      });
      for (const c of comps) {
        const truth = TRUE_RATIOS[c.variant];
        expect(c.ciLow).not.toBeNull();
        intervals++;
        if (c.ciLow! <= truth && truth <= c.ciHigh!) covered++;
        if (truth === 1) {
          wtLike++;
          if (c.call === 'increased' || c.call === 'decreased') falseCalls++;
        }
      }
    }
    const coverage = covered / intervals;
    console.info(`simulation: coverage ${coverage.toFixed(4)} over ${intervals} intervals; false calls ${falseCalls}/${wtLike}`);
    expect(intervals).toBe(STUDIES * 4);
    expect(coverage).toBeGreaterThanOrEqual(0.93);
    expect(coverage).toBeLessThanOrEqual(0.97);
    expect(falseCalls / wtLike).toBeLessThanOrEqual(0.05);
  });
});
