/**
 * Nonlinear least squares: fit a CurveModel to (x, y) data.
 *
 * Method: Levenberg–Marquardt on the weighted residuals r_i = √w_i·(f(x_i; p) − y_i).
 * Variant chosen:
 *  - Marquardt's scaled diagonal: the damping term is λ·diag(D) with D_j the largest
 *    squared Jacobian column norm seen so far (Moré 1978, LNM 630, as in MINPACK), so the
 *    method does not depend on the units of the parameters;
 *  - Nielsen's damping update: after an accepted step with gain ratio ρ,
 *    λ ← λ·max(1/3, 1 − (2ρ − 1)³), ν ← 2; after a rejected one λ ← λ·ν, ν ← 2ν
 *    (Nielsen 1999, IMM-REP-1999-05; Madsen, Nielsen & Tingleff 2004, "Methods for
 *    non-linear least squares problems", §3.2);
 *  - each step solved as the least-squares problem [J; √(λD)]·δ ≈ [−r; 0], never by
 *    forming JᵀJ: J (free columns) is factored by Householder QR once per iteration and
 *    each damping trial only rotates the rows √(λD) into R by Givens rotations (MINPACK's
 *    qrsolv; Moré 1978), src/numeric/linalg.ts; work arrays are allocated once per fit;
 *  - bounds by projection onto the box, with parameters held at a bound while the
 *    gradient pushes them outward (a simple active set; Kelley 1999, "Iterative
 *    methods for optimization", §5.5);
 *  - analytic Jacobian when model.gradient exists (computed in the same pass as the
 *    residuals of each trial point when the model has the `evaluate` fast path, so an
 *    accepted step needs no second pass), central finite differences otherwise (step
 *    ∛ε·|p_j|; one-sided at a bound).
 * Stopping: scaled gradient (MINPACK's gtol: max_j |J_jᵀr| / (‖J_j‖·‖r‖)), relative RSS
 * change (actual and predicted), or relative step, with the tolerances of FIT in
 * src/defaults.ts. A stop is reported as converged only if the Jacobian at the end is
 * well conditioned (scaled condition number below FIT_CONDITION_LIMIT) and the
 * parameters stayed finite and below the divergence limit; otherwise the result says
 * 'singular' or 'diverged'. This is what keeps NIST MGH09's spurious minimum at
 * infinity from being reported as a solution.
 *
 * Uncertainty: covariance s²·(JᵀWJ)⁻¹ at the optimum with s² = RSS/(n − p); 95% CI
 * estimate ± t(0.975, n − p)·SE, as R's nls/confint.default (Bates & Watts 1988, §2.3).
 *
 * Source of check values: NIST StRD nonlinear regression (tests/numeric/nist.test.ts).
 * @example
 * fitCurve(michaelisMenten, puromycinTreated.conc, puromycinTreated.rate)
 * // → Vm 212.6837 (SE 6.947), K 0.06412 (SE 0.008281), RSS 1195.449, converged
 */
import { FIT } from '../defaults.js';
import { tQuantile } from '../stats/distributions.js';
import { dampedSolveFromQr, entry, householderQrInPlace, inverseNormalMatrixColumns } from './linalg.js';
import type { CurveModel, FitOptions, FitResult, ParameterEstimate, StopReason } from './types.js';

/** Above this condition number of the column-scaled Jacobian a stop is reported as singular: (JᵀJ)⁻¹ then loses ~ 2·log10(1e10) = 20 of ~16 digits, i.e. the SEs are meaningless. NIST StRD problems here stay below 1e2. */
export const FIT_CONDITION_LIMIT = 1e10;
/** A parameter whose magnitude exceeds this multiple of max(1, |start|) counts as diverging to infinity. */
export const FIT_DIVERGENCE_FACTOR = 1e8;
/** At the iteration limit, a parameter whose magnitude exceeds this multiple of both its start and its halfway value is reported as diverging. */
export const RUNAWAY_GROWTH = 2;
/** Initial Levenberg–Marquardt damping λ relative to the scaled diagonal (Moré 1978 uses a comparable trust radius). */
const INITIAL_DAMPING = 1e-3;
/** Damping above which the solver gives up searching for a decrease (steps are then ~1e-16 relative). */
const MAX_DAMPING = 1e32;
const CBRT_EPS = Math.cbrt(Number.EPSILON);

/**
 * The points of a fit. Every array here has the same length n (the points kept), and every
 * work buffer of a fit is allocated from n and the parameter count k, so the `!` on indexed
 * reads in the loops below only records that each index is within those sizes.
 */
interface Data {
  x: Float64Array;
  y: Float64Array;
  sqrtW: Float64Array;
  /** True when every weight is 1, so √w need not be applied. */
  unitWeights: boolean;
  /** The x values as a plain array, for model.start. */
  xList: number[];
  yList: number[];
}

/**
 * Weighted residuals f − y at p written into `out`; returns their sum of squares, or NaN
 * when any value is not finite. With `jac` and a model that has `evaluate`, the weighted
 * Jacobian at p is written into `jac` in the same pass (column by column) and
 * `state.jacobianFinite` says whether all of it is finite.
 */
function residuals(
  model: CurveModel,
  data: Data,
  p: readonly number[],
  out: Float64Array,
  jac?: Float64Array,
  state?: { jacobianFinite: boolean },
): number {
  const { x, y, sqrtW, unitWeights } = data;
  const n = x.length;
  let rss = 0;
  if (model.evaluate) {
    model.evaluate(x, p, out, jac);
    for (let i = 0; i < n; i++) {
      const difference = out[i]! - y[i]!;
      const v = unitWeights ? difference : sqrtW[i]! * difference;
      if (!Number.isFinite(v)) return NaN;
      out[i] = v;
      rss += v * v;
    }
    if (jac && state) state.jacobianFinite = weighJacobian(data, jac, p.length);
    return Number.isFinite(rss) ? rss : NaN;
  }
  for (let i = 0; i < n; i++) {
    const v = sqrtW[i]! * (model.f(x[i]!, p) - y[i]!);
    if (!Number.isFinite(v)) return NaN;
    out[i] = v;
    rss += v * v;
  }
  return Number.isFinite(rss) ? rss : NaN;
}

/** Multiply row i of a column-stored Jacobian by √w_i in place; false when a value is not finite. */
function weighJacobian(data: Data, jac: Float64Array, k: number): boolean {
  const n = data.x.length;
  let finite = true;
  if (data.unitWeights) {
    for (let i = 0; i < n * k; i++) if (!Number.isFinite(jac[i])) finite = false;
    return finite;
  }
  for (let j = 0; j < k; j++) {
    const o = j * n;
    for (let i = 0; i < n; i++) {
      const v = data.sqrtW[i]! * jac[o + i]!;
      if (!Number.isFinite(v)) finite = false;
      jac[o + i] = v;
    }
  }
  return finite;
}

/**
 * Weighted Jacobian ∂r_i/∂p_j written into `out`, stored column by column
 * (out[j·n + i]); returns false when a value is not finite.
 */
function jacobian(
  model: CurveModel,
  data: Data,
  p: readonly number[],
  lower: readonly number[],
  upper: readonly number[],
  out: Float64Array,
): boolean {
  const k = p.length;
  const n = data.x.length;
  if (model.evaluate) {
    model.evaluate(data.x, p, new Float64Array(n), out);
    return weighJacobian(data, out, k);
  }
  if (model.gradient) {
    for (let i = 0; i < n; i++) {
      const g = model.gradient(data.x[i]!, p);
      if (g.length !== k) throw new RangeError(`${model.id}: the gradient has ${g.length} values for ${k} parameters`);
      const w = data.sqrtW[i]!;
      for (let j = 0; j < k; j++) {
        const v = w * g[j]!;
        if (!Number.isFinite(v)) return false;
        out[j * n + i] = v;
      }
    }
    return true;
  }
  const trial = p.slice();
  for (let j = 0; j < k; j++) {
    const pj = p[j]!;
    const h = CBRT_EPS * (pj !== 0 ? Math.abs(pj) : 1);
    const up = pj + h <= upper[j]!;
    const down = pj - h >= lower[j]!;
    for (let i = 0; i < n; i++) {
      const xi = data.x[i]!;
      let plus = NaN;
      let minus = NaN;
      if (up) {
        trial[j] = pj + h;
        plus = model.f(xi, trial);
      }
      if (down) {
        trial[j] = pj - h;
        minus = model.f(xi, trial);
      }
      trial[j] = pj;
      let d: number;
      if (Number.isFinite(plus) && Number.isFinite(minus)) d = (plus - minus) / (2 * h);
      else {
        const centre = model.f(xi, p);
        if (Number.isFinite(plus)) d = (plus - centre) / h;
        else if (Number.isFinite(minus)) d = (centre - minus) / h;
        else return false;
      }
      const v = data.sqrtW[i]! * d;
      if (!Number.isFinite(v)) return false;
      out[j * n + i] = v;
    }
  }
  return true;
}

/** p projected into the box [lower, upper] (all three of the model's k entries). */
function project(p: readonly number[], lower: readonly number[], upper: readonly number[]): number[] {
  return p.map((v, j) => Math.min(upper[j]!, Math.max(lower[j]!, v)));
}

/** Fit `model` to the points (x_i, y_i); see the file comment for the method. Never throws on numerical trouble. */
export function fitCurve(
  model: CurveModel,
  x: readonly number[],
  y: readonly number[],
  options: FitOptions = {},
): FitResult {
  if (x.length !== y.length) throw new Error(`fitCurve: x has ${x.length} values but y has ${y.length}`);
  const weights = options.weights;
  if (weights && weights.length !== x.length) throw new Error(`fitCurve: ${weights.length} weights for ${x.length} points`);
  const k = model.params.length;
  if (options.start && options.start.length !== k) throw new Error(`fitCurve: ${options.start.length} start values for the ${k} parameters of ${model.id}`);

  // 1. Data: keep points with finite x, y and a finite positive weight (y and weights have x's length, checked above).
  const xList: number[] = [];
  const yList: number[] = [];
  const wList: number[] = [];
  for (let i = 0; i < x.length; i++) {
    const xi = x[i]!;
    const yi = y[i]!;
    const w = weights ? weights[i]! : 1;
    if (Number.isFinite(xi) && Number.isFinite(yi) && Number.isFinite(w) && w > 0) {
      xList.push(xi);
      yList.push(yi);
      wList.push(Math.sqrt(w));
    }
  }
  const data: Data = {
    x: Float64Array.from(xList),
    y: Float64Array.from(yList),
    sqrtW: Float64Array.from(wList),
    unitWeights: wList.every((w) => w === 1),
    xList,
    yList,
  };
  const n = xList.length;
  const lower = model.params.map((_, j) => options.lower?.[j] ?? model.lower?.[j] ?? -Infinity);
  const upper = model.params.map((_, j) => options.upper?.[j] ?? model.upper?.[j] ?? Infinity);
  const maxIterations = options.maxIterations ?? FIT.maxIterations;

  // 2. Start values, projected into the box.
  let start: number[];
  if (options.start) start = options.start.slice();
  else if (n >= 1) {
    try {
      start = model.start(xList, yList);
    } catch {
      start = new Array(k).fill(NaN);
    }
  } else start = new Array(k).fill(NaN);
  if (start.length !== k) throw new Error(`fitCurve: the start rule of ${model.id} gave ${start.length} values for its ${k} parameters`);
  let p = project(start, lower, upper);
  const finish = (stop: StopReason, converged: boolean, iterations: number) =>
    summarise(model, data, p, lower, upper, stop, converged, iterations);
  if (n < k + 1) return finish('too-few-points', false, 0);
  if (p.some((v) => !Number.isFinite(v))) return finish('non-finite', false, 0);
  const divergenceLimit = start.map((v) => FIT_DIVERGENCE_FACTOR * Math.max(1, Math.abs(v)));

  // Work buffers, allocated once per fit.
  let r = new Float64Array(n);
  let rTrial = new Float64Array(n);
  let jac: Float64Array = new Float64Array(n * k);
  // With model.evaluate, each trial point's Jacobian comes with its residuals; an accepted
  // trial's Jacobian is then ready for the next iteration.
  let jacTrial: Float64Array | undefined = model.evaluate ? new Float64Array(n * k) : undefined;
  const trialState = { jacobianFinite: false };
  let jacobianReady = false;
  const qr = new Float64Array(n * k);
  const qtr = new Float64Array(n);
  const linear = new Float64Array(n);
  const gradient = new Float64Array(k);
  const colNorm = new Float64Array(k);
  const damping = new Float64Array(k);
  const stepFree = new Float64Array(k);
  const step = new Float64Array(k);
  const solveWork = new Float64Array(k * k + 2 * k);
  const freeIdx: number[] = [];

  // 3. Levenberg–Marquardt iterations.
  let rss = residuals(model, data, p, r, jacTrial ? jac : undefined, trialState);
  if (Number.isNaN(rss)) return finish('non-finite', false, 0);
  jacobianReady = jacTrial !== undefined;
  let lambda = INITIAL_DAMPING;
  let nu = 2;
  const diag = new Float64Array(k);
  let iterations = 0;
  let stop: StopReason = 'max-iterations';
  let halfway: number[] = p;
  outer: while (iterations < maxIterations) {
    iterations++;
    if (iterations === Math.ceil(maxIterations / 2)) halfway = p;
    const jacobianOk = jacobianReady ? trialState.jacobianFinite : jacobian(model, data, p, lower, upper, jac);
    jacobianReady = false;
    if (!jacobianOk) {
      stop = 'non-finite';
      break;
    }
    if (rss === 0) {
      stop = 'converged-rss';
      break;
    }
    for (let j = 0; j < k; j++) {
      let g = 0;
      let c = 0;
      const o = j * n;
      for (let i = 0; i < n; i++) {
        const v = jac[o + i]!;
        g += v * r[i]!;
        c += v * v;
      }
      gradient[j] = g;
      colNorm[j] = c;
      if (c > diag[j]!) diag[j] = c;
    }
    // Active set: a parameter at a bound whose descent direction −g points outward stays fixed.
    freeIdx.length = 0;
    for (let j = 0; j < k; j++) {
      const pj = p[j]!;
      const gj = gradient[j]!;
      if (!((pj <= lower[j]! && gj > 0) || (pj >= upper[j]! && gj < 0))) freeIdx.push(j);
    }
    const rNorm = Math.sqrt(rss);
    let scaledGradient = 0;
    for (const j of freeIdx) {
      const c = colNorm[j]!;
      if (c > 0) scaledGradient = Math.max(scaledGradient, Math.abs(gradient[j]!) / (Math.sqrt(c) * rNorm));
    }
    if (scaledGradient <= FIT.gradientTolerance) {
      stop = 'converged-gradient';
      break;
    }
    // QR of the free columns of J once per iteration, applied to −r; each damping trial
    // then only rotates the damping rows into R (dampedSolveFromQr).
    const kf = freeIdx.length;
    for (let m = 0; m < kf; m++) {
      const j = freeIdx[m]!;
      qr.set(jac.subarray(j * n, (j + 1) * n), m * n);
    }
    for (let i = 0; i < n; i++) qtr[i] = -r[i]!;
    householderQrInPlace(qr, n, kf, qtr);
    // Inner loop: increase damping until a step decreases the RSS.
    for (;;) {
      for (let m = 0; m < kf; m++) damping[m] = Math.sqrt(lambda * Math.max(diag[freeIdx[m]!]!, Number.MIN_VALUE));
      if (!dampedSolveFromQr(qr, n, kf, qtr, damping, stepFree, solveWork)) {
        stop = 'singular';
        break outer;
      }
      const trial = p.slice();
      for (let m = 0; m < kf; m++) {
        const j = freeIdx[m]!;
        trial[j] = p[j]! + stepFree[m]!;
      }
      const next = project(trial, lower, upper);
      let smallStep = true;
      for (let j = 0; j < k; j++) {
        const pj = p[j]!;
        const sj = next[j]! - pj;
        step[j] = sj;
        if (!(Math.abs(sj) <= FIT.stepTolerance * (Math.abs(pj) + FIT.stepTolerance))) smallStep = false;
      }
      // Predicted RSS from the linear model: ‖r + J·step‖², accumulated column by column.
      linear.set(r);
      for (let j = 0; j < k; j++) {
        const sj = step[j]!;
        if (sj === 0) continue;
        const o = j * n;
        for (let i = 0; i < n; i++) linear[i]! += jac[o + i]! * sj;
      }
      let predictedRss = 0;
      for (let i = 0; i < n; i++) {
        const v = linear[i]!;
        predictedRss += v * v;
      }
      const predicted = rss - predictedRss;
      const trialRss = residuals(model, data, next, rTrial, jacTrial, trialState);
      const finite = !Number.isNaN(trialRss);
      const actual = finite ? rss - trialRss : -Infinity;
      const rho = predicted > 0 ? actual / predicted : -1;
      if (finite && rho > 0 && actual > 0) {
        p = next;
        rss = trialRss;
        const swap = r;
        r = rTrial;
        rTrial = swap;
        if (jacTrial) {
          const swapJ = jac;
          jac = jacTrial;
          jacTrial = swapJ;
          jacobianReady = true;
        }
        lambda *= Math.max(1 / 3, 1 - Math.pow(2 * rho - 1, 3));
        nu = 2;
        if (p.some((v, j) => Math.abs(v) > divergenceLimit[j]!)) {
          stop = 'diverged';
          break outer;
        }
        if (actual <= FIT.rssTolerance * (rss + actual) && predicted <= FIT.rssTolerance * (rss + actual)) {
          stop = 'converged-rss';
          break outer;
        }
        if (smallStep) {
          stop = 'converged-step';
          break outer;
        }
        break;
      }
      if (smallStep) {
        stop = 'converged-step';
        break outer;
      }
      lambda *= nu;
      nu *= 2;
      if (lambda > MAX_DAMPING) {
        stop = 'converged-step';
        break outer;
      }
    }
  }
  // A run that ends at the iteration limit with a parameter still growing fast is on its
  // way to infinity (e.g. a saturating curve fitted to straight-line data): say so.
  if (stop === 'max-iterations' && p.some((v, j) => Math.abs(v) > RUNAWAY_GROWTH * Math.max(Math.abs(start[j]!), Math.abs(halfway[j]!)))) {
    stop = 'diverged';
  }
  const converged = stop === 'converged-rss' || stop === 'converged-step' || stop === 'converged-gradient';
  return finish(stop, converged, iterations);
}

/** t(0.5 + level/2, df) for the parameter intervals. */
function tCritical(df: number): number {
  return tQuantile(0.5 + FIT.confidenceLevel / 2, df);
}

/**
 * Final statistics at p: canonical parameter order, covariance, SEs, CIs, R², correlation.
 * Downgrades a 'converged' stop to 'singular' when the Jacobian is rank-deficient or badly conditioned.
 */
function summarise(
  model: CurveModel,
  data: Data,
  pIn: readonly number[],
  lower: readonly number[],
  upper: readonly number[],
  stopIn: StopReason,
  convergedIn: boolean,
  iterations: number,
): FitResult {
  const k = model.params.length;
  const n = data.x.length;
  const p = model.canonical ? model.canonical(pIn) : pIn.slice();
  if (p.length !== k) throw new RangeError(`${model.id}: the canonical form has ${p.length} values for ${k} parameters`);
  let stop = stopIn;
  let converged = convergedIn;
  const df = n - k;
  const resid = new Float64Array(n);
  const jac = new Float64Array(n * k);
  // With model.evaluate the Jacobian comes in the same pass as the residuals.
  const state = { jacobianFinite: false };
  const rss = p.every(Number.isFinite) ? residuals(model, data, p, resid, model.evaluate ? jac : undefined, state) : NaN;
  const res = !Number.isNaN(rss);
  let covariance: number[][] | null = null;
  let condition = NaN;
  if (res && n >= k) {
    const jacobianOk = model.evaluate ? state.jacobianFinite : jacobian(model, data, p, lower, upper, jac);
    const inv = jacobianOk ? inverseNormalMatrixColumns(jac, n, k) : null;
    if (inv) {
      condition = inv.condition;
      if (df > 0) {
        const s2 = rss / df;
        covariance = inv.inverse.map((row) => row.map((v) => v * s2));
      }
    }
    if (converged && (!inv || !(inv.condition < FIT_CONDITION_LIMIT))) {
      converged = false;
      stop = 'singular';
    }
  }
  const t = df > 0 ? tCritical(df) : NaN;
  const parameters: ParameterEstimate[] = model.params.map((name, j) => {
    const value = p[j]!;
    const variance = covariance ? entry(covariance, j, j) : NaN;
    const se = variance >= 0 ? Math.sqrt(variance) : NaN;
    const estimate: ParameterEstimate = { name, estimate: value, se, ciLow: value - t * se, ciHigh: value + t * se };
    if (value <= lower[j]! || value >= upper[j]!) estimate.atBound = true;
    return estimate;
  });
  const correlation = model.params.map((_, i) =>
    model.params.map((__, j) =>
      covariance ? entry(covariance, i, j) / Math.sqrt(entry(covariance, i, i) * entry(covariance, j, j)) : NaN,
    ),
  );
  // R²: unweighted, 1 − Σ(y − f)² / Σ(y − ȳ)².
  let r2 = NaN;
  if (res && n > 0) {
    const mean = data.y.reduce((s, v) => s + v, 0) / n;
    let tss = 0;
    let sse = 0;
    for (let i = 0; i < n; i++) {
      tss += (data.y[i]! - mean) ** 2;
      // f − y from the weighted residual √w·(f − y).
      sse += (resid[i]! / data.sqrtW[i]!) ** 2;
    }
    r2 = tss > 0 ? 1 - sse / tss : NaN;
  }
  return {
    modelId: model.id,
    parameters,
    rss,
    residualSd: df > 0 ? Math.sqrt(rss / df) : NaN,
    df,
    r2,
    n,
    iterations,
    converged,
    stopReason: stop,
    correlation,
    conditionNumber: condition,
  };
}
