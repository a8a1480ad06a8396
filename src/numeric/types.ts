/**
 * Contracts of the numerical core: curve models and the result every fit returns.
 *
 * A fit never throws for numerical trouble: it returns `converged: false` with a
 * stop reason, so that callers can show a flagged fit instead of dropping it.
 */

/** A parametric curve y = f(x; p) with its own starting-value rule. */
export interface CurveModel {
  /** Stable identifier, e.g. 'michaelis-menten-basal'. */
  id: string;
  /** Formula in plain text, shown on the methods page. */
  formula: string;
  /** Parameter names in the order of the parameter vector. */
  params: readonly string[];
  /** Model value at x for parameters p (one value per entry of `params`; the built-in models throw a RangeError otherwise). */
  f(x: number, p: readonly number[]): number;
  /** Optional analytic partial derivatives ∂f/∂p_j at x (same order as params). */
  gradient?(x: number, p: readonly number[]): number[];
  /**
   * Optional fast path for the solver: the model value at every x written into `values`
   * and, when `jacobian` is given, the partial derivatives ∂f/∂p_j stored column by column
   * (jacobian[j·n + i] at x[i], n = x.length). Must give the same numbers as `f` and
   * `gradient`; it lets a model share work between them (e.g. each exponential computed
   * once per point) and saves one allocation per point.
   */
  evaluate?(x: Float64Array, p: readonly number[], values: Float64Array, jacobian?: Float64Array): void;
  /** Starting values computed from the data, so no user has to guess. */
  start(x: readonly number[], y: readonly number[]): number[];
  /** Optional bounds per parameter (inclusive); undefined means unbounded. */
  lower?: readonly (number | undefined)[];
  upper?: readonly (number | undefined)[];
  /**
   * Optional canonical form of a solution, applied once after the fit and before the
   * standard errors are computed: e.g. the double exponential swaps its two phases so
   * that kFast > kSlow. Must return an equivalent parameter vector (same curve).
   */
  canonical?(p: readonly number[]): number[];
  /** Optional plain-language meaning of each parameter (same order as params), for the methods page. */
  meanings?: readonly string[];
  /** Optional literature source of the model, for the methods page. */
  source?: string;
}

export type StopReason =
  | 'converged-rss' // relative change in RSS below tolerance
  | 'converged-step' // relative parameter step below tolerance
  | 'converged-gradient' // gradient below tolerance
  | 'max-iterations'
  | 'singular' // Jacobian rank-deficient at the optimum: SEs undefined
  | 'non-finite' // model produced NaN/Infinity
  | 'diverged' // parameters ran away (e.g. towards a limit at infinity)
  | 'too-few-points'; // fewer points than parameters + 1

export interface ParameterEstimate {
  name: string;
  estimate: number;
  /** Standard error from the covariance s²(JᵀWJ)⁻¹ at the optimum; NaN when undefined. */
  se: number;
  /** 95% confidence interval, estimate ± t(0.975, df)·se; NaN when undefined. */
  ciLow: number;
  ciHigh: number;
  /** True when the estimate sits on one of its bounds (its SE then ignores the bound). */
  atBound?: boolean;
}

export interface FitResult {
  modelId: string;
  parameters: ParameterEstimate[];
  /** Residual (weighted) sum of squares. */
  rss: number;
  /** Residual standard deviation sqrt(rss / df). */
  residualSd: number;
  /** Degrees of freedom: points used − parameters. */
  df: number;
  /** Coefficient of determination 1 − RSS/TSS (unweighted TSS about the mean). */
  r2: number;
  /** Points used in the fit. */
  n: number;
  iterations: number;
  converged: boolean;
  stopReason: StopReason;
  /** Parameter correlation matrix (rows/cols in parameter order); NaN entries when undefined. */
  correlation: number[][];
  /** Condition number estimate of the column-scaled weighted Jacobian at the estimate (NaN when undefined). */
  conditionNumber?: number;
}

export interface FitOptions {
  /** Weights per point (1/variance); default all 1. */
  weights?: readonly number[];
  /** Starting values, one per parameter (another length throws); default model.start(x, y). */
  start?: readonly number[];
  /** Maximum iterations; default in src/defaults.ts. */
  maxIterations?: number;
  /** Override bounds of the model. */
  lower?: readonly (number | undefined)[];
  upper?: readonly (number | undefined)[];
}
