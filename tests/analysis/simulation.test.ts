/**
 * Seeded simulation suite: studies with known truth go through the unit fits, the
 * comparison with paired WT and the calls (tests/analysis/simulated-studies.ts). Each scenario prints
 * its figures. The bounds are the design's requirements, not a published source:
 * - 95% intervals cover the true effect 93–97% of the time in every scenario;
 * - abnormal calls at most 5% when the truth is on a band edge, at most 1% well inside the band;
 * - at most 5% abnormal overall calls for variants with no effect (and for variants with every
 *   primary metric on its band edge, the worst case of the overall rule);
 * - a variant with no slow phase called decreased (slow fraction) in at least 80% of studies.
 * Counts are sized so that a 95% coverage is estimated to about ±0.7% (two standard errors).
 */
import { describe, expect, it } from 'vitest';
import type { MetricComparison, StudyResults } from '../../src/results/types.js';
import { createRandom } from '../../src/stats/random.js';
import { DEMO_DESIGN, type AssayName, type Design, type Truth, simulateAndAnalyse } from './simulated-studies.js';

interface Tally {
  intervals: number;
  covered: number;
  studies: number;
  increased: number;
  decreased: number;
  within: number;
  notEstimable: number;
}

const tally = (): Tally => ({ intervals: 0, covered: 0, studies: 0, increased: 0, decreased: 0, within: 0, notEstimable: 0 });

/** The truth of a comparison on its own scale (ratio or difference). */
type TruthOf = (c: MetricComparison) => number;

function count(t: Tally, c: MetricComparison | undefined, truth: number): void {
  t.studies++;
  if (!c || c.effect === null) {
    t.notEstimable++;
    return;
  }
  if (c.ciLow !== null && c.ciHigh !== null) {
    t.intervals++;
    if (c.ciLow <= truth && truth <= c.ciHigh) t.covered++;
  }
  if (c.call === 'increased') t.increased++;
  if (c.call === 'decreased') t.decreased++;
  if (c.call === 'within WT range') t.within++;
}

const pct = (k: number, n: number) => (n === 0 ? '—' : `${((100 * k) / n).toFixed(1)}%`);

function line(name: string, t: Tally): string {
  return (
    `  ${name.padEnd(34)} coverage ${pct(t.covered, t.intervals).padStart(6)} of ${String(t.intervals).padStart(5)} intervals; ` +
    `increased ${pct(t.increased, t.studies).padStart(6)}, decreased ${pct(t.decreased, t.studies).padStart(6)}, within ${pct(t.within, t.studies).padStart(6)}, ` +
    `not estimable ${pct(t.notEstimable, t.studies)} (n = ${t.studies})`
  );
}

const coverage = (t: Tally) => t.covered / t.intervals;
const abnormal = (t: Tally) => (t.increased + t.decreased) / t.studies;

interface ClassSpec {
  /** Class name; variants of the class are `${name}-1`, `${name}-2`, … */
  name: string;
  truth: Truth;
  perStudy: number;
}

/** Run `studies` simulated studies and tally one metric per variant class. */
function run(
  studies: number,
  seed: number,
  design: Design,
  classes: readonly ClassSpec[],
  assays: readonly AssayName[],
  metric: { assay: string; metric: string; truth: (t: Truth) => number },
): Map<string, Tally> {
  const rnd = createRandom(seed);
  const tallies = new Map(classes.map((c) => [c.name, tally()]));
  const variants = classes.flatMap((c) => Array.from({ length: c.perStudy }, (_, i) => ({ id: `${c.name}-${i + 1}`, truth: c.truth, cls: c.name })));
  for (let s = 0; s < studies; s++) {
    const results = simulateAndAnalyse(rnd, design, variants, assays);
    for (const v of variants) {
      const c = results.comparisons.find((x) => x.variant === v.id && x.assay === metric.assay && x.metric === metric.metric);
      count(tallies.get(v.cls)!, c, metric.truth(v.truth));
    }
  }
  return tallies;
}

const kcatMetric = { assay: 'atpase', metric: 'kcat', truth: (t: Truth) => t.kcat ?? 1 };

/** Variant classes of the ATPase layouts: edges, inside, clear changes and no change (kcat band 0.8–1.25). */
const KCAT_CLASSES: ClassSpec[] = [
  { name: 'null (ratio 1)', truth: { kcat: 1 }, perStudy: 1 },
  { name: 'upper edge (1.25)', truth: { kcat: 1.25 }, perStudy: 1 },
  { name: 'lower edge (0.8)', truth: { kcat: 0.8 }, perStudy: 1 },
  { name: 'inside (1.118, half-way)', truth: { kcat: Math.sqrt(1.25) }, perStudy: 1 },
  { name: 'near edge (1.22)', truth: { kcat: 1.22 }, perStudy: 1 },
  { name: 'increased (1.5)', truth: { kcat: 1.5 }, perStudy: 1 },
  { name: 'decreased (0.6)', truth: { kcat: 0.6 }, perStudy: 1 },
];

function checkKcatScenario(name: string, tallies: Map<string, Tally>): void {
  const all = [...tallies.values()].reduce((a, t) => ({ ...a, intervals: a.intervals + t.intervals, covered: a.covered + t.covered }), tally());
  console.log(`${name}: kcat 95% intervals cover the truth ${pct(all.covered, all.intervals)} of ${all.intervals}`);
  for (const [cls, t] of tallies) console.log(line(cls, t));
  expect(coverage(all)).toBeGreaterThanOrEqual(0.93);
  expect(coverage(all)).toBeLessThanOrEqual(0.97);
  // Each class has 600 intervals (SE of a 95% coverage 0.9%): checked to ±3 percentage points.
  for (const [, t] of tallies) {
    expect(coverage(t)).toBeGreaterThanOrEqual(0.92);
    expect(coverage(t)).toBeLessThanOrEqual(0.98);
  }
  expect(abnormal(tallies.get('upper edge (1.25)')!)).toBeLessThanOrEqual(0.05);
  expect(abnormal(tallies.get('lower edge (0.8)')!)).toBeLessThanOrEqual(0.05);
  expect(abnormal(tallies.get('near edge (1.22)')!)).toBeLessThanOrEqual(0.05);
  expect(abnormal(tallies.get('inside (1.118, half-way)')!)).toBeLessThanOrEqual(0.01);
  expect(abnormal(tallies.get('null (ratio 1)')!)).toBeLessThanOrEqual(0.01);
}

const STUDIES = 600;

describe('simulation suite: kcat (actin-activated ATPase, fitted per preparation)', () => {
  it('balanced: the demo design (3 WT per batch; 2 + 2 variant preparations over two batches)', () => {
    const t = run(STUDIES, 101, DEMO_DESIGN, KCAT_CLASSES, ['atpase'], kcatMetric);
    checkKcatScenario('balanced', t);
    const power = t.get('increased (1.5)')!;
    console.log(`  power for a 1.5× kcat change at the demo design: ${pct(power.increased, power.studies)} called increased`);
    // Stated in README and on the methods page; a guard against losing power, not a requirement.
    expect(power.increased / power.studies).toBeGreaterThanOrEqual(0.7);
  });

  it('unbalanced: WT 2, 4 and 3 per batch; 1 + 3 variant preparations', () => {
    const design: Design = { ...DEMO_DESIGN, wtPerBatch: [2, 4, 3], variantUnits: [1, 3] };
    checkKcatScenario('unbalanced', run(STUDIES, 202, design, KCAT_CLASSES, ['atpase'], kcatMetric));
  });

  it('variant preparations scatter 2.5× more than WT’s, unbalanced', () => {
    const design: Design = { ...DEMO_DESIGN, wtPerBatch: [2, 4, 3], variantUnits: [1, 3], variantSdFactor: 2.5 };
    checkKcatScenario('variant SD 2.5× WT', run(STUDIES, 303, design, KCAT_CLASSES, ['atpase'], kcatMetric));
  });
});

describe('simulation suite: pCa50 (force–pCa, a difference metric; band ±0.1)', () => {
  it('truth on the band edge and inside it, demo design', () => {
    const classes: ClassSpec[] = [
      { name: 'null (0)', truth: { pCa50: 0 }, perStudy: 1 },
      { name: 'upper edge (+0.1)', truth: { pCa50: 0.1 }, perStudy: 1 },
      { name: 'inside (+0.08)', truth: { pCa50: 0.08 }, perStudy: 1 },
      { name: 'inside (+0.05, half-way)', truth: { pCa50: 0.05 }, perStudy: 1 },
      { name: 'increased (+0.2)', truth: { pCa50: 0.2 }, perStudy: 1 },
    ];
    const t = run(400, 404, DEMO_DESIGN, classes, ['force'], { assay: 'force', metric: 'pCa50', truth: (x) => x.pCa50 ?? 0 });
    const all = [...t.values()].reduce((a, x) => ({ ...a, intervals: a.intervals + x.intervals, covered: a.covered + x.covered }), tally());
    console.log(`pCa50, demo design: 95% intervals cover the truth ${pct(all.covered, all.intervals)} of ${all.intervals}`);
    for (const [cls, x] of t) console.log(line(cls, x));
    expect(coverage(all)).toBeGreaterThanOrEqual(0.93);
    expect(coverage(all)).toBeLessThanOrEqual(0.97);
    for (const [, x] of t) {
      expect(coverage(x)).toBeGreaterThanOrEqual(0.915);
      expect(coverage(x)).toBeLessThanOrEqual(0.985);
    }
    expect(abnormal(t.get('upper edge (+0.1)')!)).toBeLessThanOrEqual(0.05);
    expect(abnormal(t.get('inside (+0.08)')!)).toBeLessThanOrEqual(0.05);
    expect(abnormal(t.get('inside (+0.05, half-way)')!)).toBeLessThanOrEqual(0.01);
    expect(abnormal(t.get('null (0)')!)).toBeLessThanOrEqual(0.01);
  });
});

describe('simulation suite: KM five times the top actin concentration', () => {
  it('kcat and KM are not compared when a variant preparation extrapolates; kcat/KM is, and covers its truth', () => {
    const classes: ClassSpec[] = [
      { name: 'KM 5× top, kcat 1', truth: { kcat: 1, km: 500 / 45 }, perStudy: 2 },
      { name: 'KM 5× top, kcat 1.5', truth: { kcat: 1.5, km: 500 / 45 }, perStudy: 1 },
      { name: 'null', truth: {}, perStudy: 2 },
    ];
    const kcat = run(300, 505, DEMO_DESIGN, classes, ['atpase'], kcatMetric);
    const slope = run(300, 505, DEMO_DESIGN, classes, ['atpase'], {
      assay: 'atpase',
      metric: 'kcatOverKm',
      truth: (t) => (t.kcat ?? 1) / (t.km ?? 1),
    });
    console.log('KM 5× the top actin concentration (500 µM against 100 µM), demo design: kcat');
    for (const [cls, x] of kcat) console.log(line(cls, x));
    console.log('  kcat/KM (initial slope):');
    for (const [cls, x] of slope) console.log(line(cls, x));
    const all = [...slope.values()].reduce((a, x) => ({ ...a, intervals: a.intervals + x.intervals, covered: a.covered + x.covered }), tally());
    console.log(`  kcat/KM 95% intervals cover the truth ${pct(all.covered, all.intervals)} of ${all.intervals}`);
    expect(coverage(all)).toBeGreaterThanOrEqual(0.93);
    expect(coverage(all)).toBeLessThanOrEqual(0.97);
    // kcat of the extrapolating variants: never called abnormal, and no interval claimed.
    const extrapolated = kcat.get('KM 5× top, kcat 1')!;
    expect(abnormal(extrapolated)).toBeLessThanOrEqual(0.01);
    expect(extrapolated.notEstimable / extrapolated.studies).toBeGreaterThanOrEqual(0.95);
    // Where kcat is still compared (no preparation extrapolated), its intervals hold.
    const nullKcat = kcat.get('null')!;
    expect(coverage(nullKcat)).toBeGreaterThanOrEqual(0.92);
    expect(coverage(nullKcat)).toBeLessThanOrEqual(0.98);
  });
});

describe('simulation suite: no slow phase (single turnover)', () => {
  it('a variant whose traces have no slow phase is called decreased (slow fraction), demo design', () => {
    const classes: ClassSpec[] = [
      { name: 'no slow phase (−0.35)', truth: { slowFraction: -0.35 }, perStudy: 2 },
      { name: 'null (0)', truth: { slowFraction: 0 }, perStudy: 1 },
      { name: 'lower edge (−0.1)', truth: { slowFraction: -0.1 }, perStudy: 3 },
    ];
    const t = run(300, 606, DEMO_DESIGN, classes, ['turnover'], { assay: 'turnover', metric: 'slowFraction', truth: (x) => x.slowFraction ?? 0 });
    const all = [...t.values()].reduce((a, x) => ({ ...a, intervals: a.intervals + x.intervals, covered: a.covered + x.covered }), tally());
    console.log(`no slow phase, demo design: slow-fraction 95% intervals cover the truth ${pct(all.covered, all.intervals)} of ${all.intervals}`);
    for (const [cls, x] of t) console.log(line(cls, x));
    expect(coverage(all)).toBeGreaterThanOrEqual(0.93);
    expect(coverage(all)).toBeLessThanOrEqual(0.97);
    const none = t.get('no slow phase (−0.35)')!;
    expect(none.decreased / none.studies).toBeGreaterThanOrEqual(0.8);
    expect(abnormal(t.get('lower edge (−0.1)')!)).toBeLessThanOrEqual(0.05);
    expect(abnormal(t.get('null (0)')!)).toBeLessThanOrEqual(0.01);
  });
});

describe('simulation suite: the overall call across four assays', () => {
  it('variants with no effect, and with every primary metric on its band edge, are rarely called abnormal overall', () => {
    const rnd = createRandom(707);
    const variants = [
      ...Array.from({ length: 4 }, (_, i) => ({ id: `null-${i + 1}`, truth: {} as Truth })),
      // The worst case for the overall rule: each of the five primary metrics on the hypercontractile edge of its band.
      ...Array.from({ length: 2 }, (_, i) => ({ id: `edges-${i + 1}`, truth: { kcat: 1.25, velocity: 1.25, fmax: 1.25, pCa50: 0.1, slowFraction: -0.1 } })),
      { id: 'hyper', truth: { kcat: 1.6, pCa50: 0.25 } as Truth },
    ];
    const studies = 150;
    const overall = { null: tally(), edges: tally() };
    const primary = tally();
    const truthOf = (v: (typeof variants)[number], c: MetricComparison): number | null => {
      const t = v.truth;
      switch (`${c.assay}.${c.metric}`) {
        case 'atpase.kcat': return t.kcat ?? 1;
        case 'motility.velocity': return t.velocity ?? 1;
        case 'force.fmax': return t.fmax ?? 1;
        case 'force.pCa50': return t.pCa50 ?? 0;
        case 'turnover.slowFraction': return t.slowFraction ?? 0;
        default: return null;
      }
    };
    let results: StudyResults | undefined;
    for (let s = 0; s < studies; s++) {
      results = simulateAndAnalyse(rnd, DEMO_DESIGN, variants, ['atpase', 'motility', 'force', 'turnover']);
      for (const v of variants) {
        const call = results.variants.find((x) => x.id === v.id)!.overall.call;
        const group = v.id.startsWith('null') ? overall.null : v.id.startsWith('edges') ? overall.edges : undefined;
        if (group) {
          group.studies++;
          if (call === 'hypercontractile') group.increased++;
          if (call === 'hypocontractile' || call === 'mixed') group.decreased++;
          if (call === 'within WT range') group.within++;
        }
        for (const c of results.comparisons.filter((x) => x.variant === v.id)) {
          const truth = truthOf(v, c);
          if (truth !== null && c.ciLow !== null && c.ciHigh !== null) {
            primary.intervals++;
            if (c.ciLow <= truth && truth <= c.ciHigh) primary.covered++;
          }
        }
      }
    }
    const rate = (t: Tally) => `${pct(t.increased + t.decreased, t.studies)} abnormal overall (hyper ${pct(t.increased, t.studies)}, hypo or mixed ${pct(t.decreased, t.studies)}), within WT range ${pct(t.within, t.studies)}, n = ${t.studies}`;
    console.log('overall call, four assays, demo design:');
    console.log(`  no effect:                      ${rate(overall.null)}`);
    console.log(`  every primary metric on an edge: ${rate(overall.edges)}`);
    console.log(`  primary-metric 95% intervals cover the truth ${pct(primary.covered, primary.intervals)} of ${primary.intervals}`);
    console.log(`  rule: ${results!.settings.combiningRule}`);
    expect(abnormal(overall.null)).toBeLessThanOrEqual(0.05);
    expect(abnormal(overall.edges)).toBeLessThanOrEqual(0.05);
    expect(coverage(primary)).toBeGreaterThanOrEqual(0.93);
    expect(coverage(primary)).toBeLessThanOrEqual(0.97);
  });
});
