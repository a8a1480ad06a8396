/**
 * Percentile bootstrap confidence interval of a statistic of one sample.
 *
 * Method: nonparametric bootstrap, resampling the values with replacement `replicates`
 * times; the interval is the type 7 quantiles at (1 − level)/2 and (1 + level)/2 of the
 * replicate statistics (percentile interval; Efron & Tibshirani 1993, "An Introduction to
 * the Bootstrap", ch. 13). Resampling uses the seeded generator of src/stats/random.ts, so
 * equal seeds give equal intervals. Replicates whose statistic is not finite are dropped
 * and counted.
 * @example
 * percentileBootstrap([1, 2, 3, 4, 5], mean, { seed: 1, replicates: 2000 })
 * // → estimate 3, interval roughly 1.8 to 4.2
 */
import { quantileSorted } from './descriptive.js';
import { createRandom } from './random.js';

export interface BootstrapOptions {
  seed: number;
  /** Number of resamples; default 2000 (Efron & Tibshirani 1993 suggest ≥ 1000 for percentile intervals). */
  replicates?: number;
  /** Confidence level; default 0.95. */
  level?: number;
}

export interface BootstrapInterval {
  /** The statistic on the original sample. */
  estimate: number;
  low: number;
  high: number;
  /** Replicates with a finite statistic. */
  replicates: number;
  /** Replicates dropped because the statistic was not finite. */
  dropped: number;
}

/** Percentile bootstrap; see the file comment. */
export function percentileBootstrap(
  values: readonly number[],
  statistic: (sample: readonly number[]) => number,
  options: BootstrapOptions,
): BootstrapInterval {
  const replicates = options.replicates ?? 2000;
  const level = options.level ?? 0.95;
  const random = createRandom(options.seed);
  const n = values.length;
  const stats: number[] = [];
  const sample = new Array<number>(n);
  let dropped = 0;
  for (let r = 0; r < replicates; r++) {
    for (let i = 0; i < n; i++) sample[i] = values[random.integer(n)];
    const s = statistic(sample);
    if (Number.isFinite(s)) stats.push(s);
    else dropped++;
  }
  stats.sort((a, b) => a - b);
  return {
    estimate: statistic(values),
    low: quantileSorted(stats, (1 - level) / 2),
    high: quantileSorted(stats, (1 + level) / 2),
    replicates: stats.length,
    dropped,
  };
}
