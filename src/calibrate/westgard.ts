/**
 * WT control QC: Levey–Jennings chart values and Westgard rules.
 *
 * ```
 * WT values in run order ──▶ established mean, SD ──▶ z per value ──▶ rules ──▶ rejected / warning batches
 * ```
 * Sources: Levey S, Jennings ER, Am J Clin Pathol 1950;20:1059–1066 (chart of control values
 * in run order with lines at the mean and ±1, ±2, ±3 SD, the SD being the long-term sample SD);
 * Westgard JO, Barry PL, Hunt MR, Groth T, Clin Chem 1981;27:493–501 (the multirule
 * procedure).
 */
import { fmt } from '../results/format.js';
import type { ControlChart, WestgardPoint } from '../results/types.js';

/** One WT control value: its batch, an optional run (defaults to the batch) and the value. */
export interface ControlValue {
  batch: string;
  /** Run the value belongs to for the within-run rule R-4s; when absent the batch is the run. */
  run?: string;
  value: number;
}

/** Established mean and SD the values are judged against. */
export interface EstablishedBaseline {
  mean: number;
  sd: number;
}

/** Lab-declared baseline for {@link controlChart}, with where it comes from. */
export interface DeclaredBaseline extends EstablishedBaseline {
  /** Free text, e.g. "WT preparations 2023–2024, 40 batches". */
  source?: string;
}

export interface WestgardResult {
  points: WestgardPoint[];
  /** Batches with at least one rejection rule (1-3s, 2-2s, R-4s, 4-1s, 10-x), in first-appearance order. */
  rejectedBatches: string[];
  /** Batches with a 1-2s warning and no rejection, in first-appearance order. */
  warningBatches: string[];
}

/** Rule names in the order they are listed on a point. */
export const WESTGARD_RULES = ['1-2s', '1-3s', '2-2s', 'R-4s', '4-1s', '10-x'] as const;
/** Rules that reject a run; 1-2s is a warning only. */
export const REJECTION_RULES: ReadonlySet<string> = new Set(['1-3s', '2-2s', 'R-4s', '4-1s', '10-x']);

/**
 * Mean and sample standard deviation of WT control values, the baseline of a Levey–Jennings chart.
 *
 * Method: arithmetic mean; sample SD with n − 1 in the denominator (Bessel's correction),
 * by the corrected two-pass algorithm (sum of squared deviations from the mean minus
 * (sum of deviations)²/n; Chan, Golub & LeVeque, Am Stat 1983;37:242–247), which stays
 * accurate when the values share a large offset.
 * Returns null when there are fewer than two values or the SD is 0 (no spread: z cannot be
 * computed). Throws RangeError on a value that is not finite.
 *
 * @example establishedFromValues([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]) // → { mean: 5.5, sd: 3.0276504 } (sample variance n(n+1)/12 = 9.1667)
 */
export function establishedFromValues(values: number[]): EstablishedBaseline | null {
  for (const v of values) if (!Number.isFinite(v)) throw new RangeError(`establishedFromValues: value ${v} is not finite`);
  const n = values.length;
  if (n < 2) return null;
  let sum = 0;
  for (const v of values) sum += v;
  const mean = sum / n;
  let squares = 0;
  let deviations = 0;
  for (const v of values) {
    const d = v - mean;
    squares += d * d;
    deviations += d;
  }
  const variance = (squares - (deviations * deviations) / n) / (n - 1);
  const sd = Math.sqrt(Math.max(variance, 0));
  if (!(sd > 0)) return null;
  return { mean, sd };
}

function allOnSameSide(z: number[], from: number, to: number, limit: number): boolean {
  let above = true;
  let below = true;
  for (let k = from; k <= to; k++) {
    const zk = z[k]!; // from ≥ 0 and to < z.length at every call
    if (!(zk > limit)) above = false;
    if (!(zk < -limit)) below = false;
  }
  return above || below;
}

/**
 * Westgard multirule QC of control values in run order.
 *
 * Method (Westgard et al. 1981, Clin Chem 27:493), z = (value − mean)/SD with
 * the established mean and SD; "beyond" is strict (a value exactly at 2 SD is not beyond it):
 * - 1-2s: |z| > 2, warning only;
 * - 1-3s: |z| > 3, reject;
 * - 2-2s: this and the previous value beyond the same limit (both z > 2 or both z < −2), reject;
 * - R-4s: within one run, one value z > 2 and another z < −2, reject; every value of such a
 *   run beyond ±2 SD carries the rule. Within-run only: the run is `run` when given, else the
 *   batch (several WT units measured in one batch are one run);
 * - 4-1s: four consecutive values beyond the same ±1 SD limit, reject;
 * - 10-x: ten consecutive values on the same side of the mean (a value exactly at the mean
 *   breaks the series), reject.
 * 2-2s, 4-1s and 10-x look at consecutive values in the order given (run order), across
 * batches; the rule is put on the value that completes the pattern, and the batch of that
 * value is rejected (earlier batches are not rejected retroactively: in multirule QC each new
 * run is accepted or rejected as it comes). A value beyond 3 SD carries both 1-2s and 1-3s.
 * Throws RangeError when the mean or a value is not finite or the SD is not positive.
 *
 * @example
 * westgard([1.2, 1.5, 1.1, 1.3].map((value, i) => ({ batch: `b${i}`, value })), { mean: 0, sd: 1 }).points[3].rules
 * // → ['4-1s']; rejectedBatches → ['b3']
 */
export function westgard(points: ControlValue[], established: EstablishedBaseline): WestgardResult {
  const { mean, sd } = established;
  if (!Number.isFinite(mean)) throw new RangeError(`westgard: mean ${mean} is not finite`);
  if (!(Number.isFinite(sd) && sd > 0)) throw new RangeError(`westgard: SD ${sd} must be finite and positive`);
  for (const p of points) {
    if (!Number.isFinite(p.value)) throw new RangeError(`westgard: value ${p.value} of batch ${p.batch} is not finite`);
  }

  const z = points.map((p) => (p.value - mean) / sd);
  const rules: Array<Set<string>> = points.map(() => new Set<string>());

  // R-4s: runs that hold values beyond both +2 SD and −2 SD.
  const runKey = (p: ControlValue) => p.run ?? p.batch;
  const runHigh = new Set<string>();
  const runLow = new Set<string>();
  points.forEach((p, i) => {
    const zi = z[i]!; // z has one value per point
    if (zi > 2) runHigh.add(runKey(p));
    if (zi < -2) runLow.add(runKey(p));
  });

  points.forEach((p, i) => {
    const zi = z[i]!;
    const ruled = rules[i]!; // one set per point
    if (Math.abs(zi) > 2) ruled.add('1-2s');
    if (Math.abs(zi) > 3) ruled.add('1-3s');
    if (i >= 1 && allOnSameSide(z, i - 1, i, 2)) ruled.add('2-2s');
    const run = runKey(p);
    if (Math.abs(zi) > 2 && runHigh.has(run) && runLow.has(run)) ruled.add('R-4s');
    if (i >= 3 && allOnSameSide(z, i - 3, i, 1)) ruled.add('4-1s');
    if (i >= 9 && allOnSameSide(z, i - 9, i, 0)) ruled.add('10-x');
  });

  const rejected: string[] = [];
  const warned: string[] = [];
  const out: WestgardPoint[] = points.map((p, i) => {
    const list = WESTGARD_RULES.filter((r) => rules[i]!.has(r));
    if (list.some((r) => REJECTION_RULES.has(r))) {
      if (!rejected.includes(p.batch)) rejected.push(p.batch);
    } else if (list.length > 0 && !warned.includes(p.batch)) warned.push(p.batch);
    return { batch: p.batch, value: p.value, z: z[i]!, rules: list };
  });
  return { points: out, rejectedBatches: rejected, warningBatches: warned.filter((b) => !rejected.includes(b)) };
}


/**
 * Levey–Jennings chart of one metric's WT values with Westgard rules.
 *
 * Method: values in the order given (run order); mean and SD from the lab-declared baseline
 * when given, otherwise {@link establishedFromValues} of all the values (mean and sample SD);
 * rules by {@link westgard}. `baseline` states in words how mean and SD were established.
 * With no declared baseline and fewer than two values (or no spread), mean and SD are null,
 * no point is judged and `points` is empty; the baseline text says why.
 * A declared SD that is not positive throws RangeError (from {@link westgard}).
 * Sources: Levey & Jennings 1950; Westgard et al. 1981.
 *
 * @example
 * controlChart('atpase', 'kcat', [{ batch: 'B1', value: 5 }, { batch: 'B2', value: 7 }]).sd // → 1.4142 (sample SD of 5 and 7)
 */
export function controlChart(
  assay: string,
  metric: string,
  batchValues: ControlValue[],
  baseline?: DeclaredBaseline,
): ControlChart {
  let established: EstablishedBaseline | null;
  let text: string;
  if (baseline) {
    established = { mean: baseline.mean, sd: baseline.sd };
    text =
      `Mean ${fmt(baseline.mean)} and SD ${fmt(baseline.sd)} declared by the lab` +
      (baseline.source ? `, from: ${baseline.source.trim().replace(/[.;]+$/, '')}` : '') +
      '. The values of this study are judged against this long-term baseline.';
  } else {
    established = establishedFromValues(batchValues.map((p) => p.value));
    text = established
      ? `Mean ${fmt(established.mean)} and sample SD ${fmt(established.sd)} (n − 1 denominator) of all ${batchValues.length} WT values ` +
        'of this study (no lab-declared baseline). The limits come from the same values they judge, so the rules ' +
        'are less sensitive than against a long-term baseline.'
      : `Too few WT values (${batchValues.length}) or no spread between them: mean and SD could not be established ` +
        'and no Westgard rule was checked (no lab-declared baseline).';
  }
  if (!established) {
    return { assay, metric, mean: null, sd: null, baseline: text, points: [], rejectedBatches: [], warningBatches: [] };
  }
  const result = westgard(batchValues, established);
  return {
    assay,
    metric,
    mean: established.mean,
    sd: established.sd,
    baseline: text,
    points: result.points,
    rejectedBatches: result.rejectedBatches,
    warningBatches: result.warningBatches,
  };
}
