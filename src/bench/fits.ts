/**
 * Benchmark: fits per second for the Michaelis–Menten (with basal term) and the double
 * exponential models on seeded synthetic data. Prints numbers only; no assertions (targets
 * live in the benchmark, not in tests). Run: `npx tsx src/bench/fits.ts`.
 */
import { fitCurve } from '../numeric/nls.js';
import { michaelisMentenBasal } from '../numeric/models/michaelis-menten-basal.js';
import { exponentialDouble } from '../numeric/models/exponential-double.js';
import type { CurveModel } from '../numeric/types.js';
import { createRandom } from '../stats/random.js';

function datasets(model: CurveModel, x: number[], truth: number[], sd: number, count: number, seed: number): number[][] {
  const random = createRandom(seed);
  return Array.from({ length: count }, () => x.map((v) => model.f(v, truth) + random.normal(0, sd)));
}

function bench(label: string, model: CurveModel, x: number[], ys: number[][]): void {
  // Warm-up so the JIT has compiled the hot paths.
  for (const y of ys.slice(0, 20)) fitCurve(model, x, y);
  let converged = 0;
  let iterations = 0;
  const started = performance.now();
  for (const y of ys) {
    const fit = fitCurve(model, x, y);
    if (fit.converged) converged++;
    iterations += fit.iterations;
  }
  const seconds = (performance.now() - started) / 1000;
  console.log(
    `${label}: ${(ys.length / seconds).toFixed(0)} fits/s ` +
      `(${ys.length} fits of ${x.length} points, ${(iterations / ys.length).toFixed(1)} iterations each, ${converged} converged)`,
  );
}

const actin = [0, 2.5, 5, 10, 20, 40, 60, 80, 100];
bench('Michaelis–Menten with basal', michaelisMentenBasal, actin, datasets(michaelisMentenBasal, actin, [0.03, 5, 20], 0.1, 2000, 1));

const time = Array.from({ length: 361 }, (_, i) => i * 5);
bench('double exponential', exponentialDouble, time, datasets(exponentialDouble, time, [0.7, 0.03, 0.3, 0.0034, 0.05], 0.01, 200, 2));
