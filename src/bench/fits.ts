/**
 * Benchmark: fits per second for the curve models on seeded synthetic data shaped like a
 * study's units: Michaelis–Menten with basal term (9 points, and 8 [actin] × 3 wells),
 * Hill force–pCa (10 pCa points), double exponential (361 and 400 points) and a whole
 * single-turnover trace (single + double fit and F test, 400 points); each the best of three
 * timed runs after a warm-up; then a study-scale pass (3,000 units per assay, as in a
 * 1,000-variant study) through the force and turnover unit analyses. Prints numbers only;
 * no assertions (targets live in the benchmark, not in tests). Run: `npx tsx src/bench/fits.ts`.
 */
import { fitCurve } from '../numeric/nls.js';
import { michaelisMentenBasal } from '../numeric/models/michaelis-menten-basal.js';
import { exponentialDouble } from '../numeric/models/exponential-double.js';
import { hillForcePca } from '../numeric/models/hill-force-pca.js';
import type { CurveModel } from '../numeric/types.js';
import { createRandom } from '../stats/random.js';
import { analyseTurnoverUnit, fitTurnoverTrace, turnoverSettings } from '../assays/turnover/module.js';
import { analyseForceUnit } from '../assays/force/module.js';

function datasets(model: CurveModel, x: number[], truth: number[], sd: number, count: number, seed: number): number[][] {
  const random = createRandom(seed);
  return Array.from({ length: count }, () => x.map((v) => model.f(v, truth) + random.normal(0, sd)));
}

const REPEATS = 3;

function timed(label: string, ys: number[][], points: number, one: (y: number[]) => { converged: boolean; iterations: number }): void {
  // Warm-up so the JIT has compiled the hot paths; then the best of REPEATS runs, so that
  // other load on the machine disturbs the figure less.
  for (const y of ys.slice(0, 20)) one(y);
  let converged = 0;
  let iterations = 0;
  let seconds = Infinity;
  for (let repeat = 0; repeat < REPEATS; repeat++) {
    converged = 0;
    iterations = 0;
    const started = performance.now();
    for (const y of ys) {
      const fit = one(y);
      if (fit.converged) converged++;
      iterations += fit.iterations;
    }
    seconds = Math.min(seconds, (performance.now() - started) / 1000);
  }
  console.log(
    `${label}: ${(ys.length / seconds).toFixed(0)} fits/s ` +
      `(${ys.length} fits of ${points} points, ${(iterations / ys.length).toFixed(1)} iterations each, ${converged} converged)`,
  );
}

function bench(label: string, model: CurveModel, x: number[], ys: number[][]): void {
  timed(label, ys, x.length, (y) => fitCurve(model, x, y));
}

const actin = [0, 2.5, 5, 10, 20, 40, 60, 80, 100];
bench('Michaelis–Menten with basal', michaelisMentenBasal, actin, datasets(michaelisMentenBasal, actin, [0.03, 5, 20], 0.1, 2000, 1));

const actinWells = [0, 5, 10, 20, 30, 45, 60, 90].flatMap((a) => [a, a, a]);
bench('Michaelis–Menten with basal, 8 × 3 wells', michaelisMentenBasal, actinWells, datasets(michaelisMentenBasal, actinWells, [0.03, 5, 20], 0.2, 2000, 3));

const pCa = [9, 6.4, 6.2, 6.0, 5.9, 5.8, 5.7, 5.6, 5.4, 4.5];
bench('Hill force–pCa', hillForcePca, pCa, datasets(hillForcePca, pCa, [2, 30, 5.8, 3], 0.8, 2000, 4));

const time = Array.from({ length: 361 }, (_, i) => i * 5);
bench('double exponential', exponentialDouble, time, datasets(exponentialDouble, time, [0.7, 0.03, 0.3, 0.0034, 0.05], 0.01, 200, 2));

const time400 = Array.from({ length: 400 }, (_, i) => i * 4.5);
const traces = datasets(exponentialDouble, time400, [0.7, 0.03, 0.3, 0.0034, 0.05], 0.01, 500, 5);
bench('double exponential, 400 points', exponentialDouble, time400, traces);

const settings = turnoverSettings();
timed('turnover trace (single + double + F test)', traces, time400.length, (y) => {
  const trace = fitTurnoverTrace(time400, y, settings);
  return { converged: trace.model === 'double', iterations: trace.double.iterations + trace.single.iterations };
});

// Study scale: a 1,000-variant study has ~3,000 units per assay (3 per variant). The
// per-unit analysis functions run once over seeded synthetic units, plot data included.
function studyScale(label: string, units: number, run: (unit: number) => void): void {
  const started = performance.now();
  for (let u = 0; u < units; u++) run(u);
  const seconds = (performance.now() - started) / 1000;
  console.log(`${label}: ${units} units in ${seconds.toFixed(2)} s (${(units / seconds).toFixed(0)} units/s)`);
}
// Each dataset below has `count` rows of one y per x, so the indexes used are all present.
const UNITS = 3000;
const at = { file: 'synthetic.csv', line: 1 };
const atpaseYs = datasets(michaelisMentenBasal, actinWells, [0.03, 5, 20], 0.2, UNITS, 6);
studyScale('study scale, ATPase fits (8 × 3 wells)', UNITS, (u) => fitCurve(michaelisMentenBasal, actinWells, atpaseYs[u]!));
const forceYs = datasets(hillForcePca, pCa, [2, 30, 5.8, 3], 0.8, UNITS, 7);
studyScale('study scale, force–pCa units (10 points)', UNITS, (u) =>
  analyseForceUnit(
    pCa.map((p, i) => ({ variant: 'v', unit: `u${u}`, batch: 'b', at, pCa: p, tensionKPa: forceYs[u]![i]! })),
    6,
  ),
);
const traceYs = datasets(exponentialDouble, time400, [0.7, 0.03, 0.3, 0.0034, 0.05], 0.01, 3 * UNITS, 8);
studyScale('study scale, turnover units (3 traces × 400 points)', UNITS, (u) =>
  analyseTurnoverUnit(
    [0, 1, 2].flatMap((trace) =>
      time400.map((timeS, i) => ({ variant: 'v', unit: `u${u}`, batch: 'b', at, trace: `t${trace}`, timeS, fluorescence: traceYs[3 * u + trace]![i]! })),
    ),
    settings,
  ),
);
