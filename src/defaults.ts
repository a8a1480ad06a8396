/**
 * Every default of the tool that belongs to no one assay, defined once. Each is documented
 * beside its value; the manifest may override those marked "(manifest: …)". An assay's own
 * defaults (its settings, the WT-like bands and typical ranges of its metrics) are defined once in its folder
 * (src/assays/<assay>/settings.ts and metrics.ts) and assembled by src/assays/assembled.ts.
 */

/** Reading a study folder (src/study/read-folder.ts). */
export const INPUT = {
  /**
   * Largest input file read, in bytes (64 MiB): larger files are refused before reading, with the fix
   * to split them into several files of the same kind. A 64 MiB CSV is ~1.5 million rows, beyond one
   * lab study; keeping whole files in memory stays well under the 1.5 GB budget on a 2-core machine.
   */
  maxFileBytes: 64 * 1024 * 1024,
} as const;

/** The store in the user's cache folder (src/pipeline/store.ts). */
export const CACHE = {
  /**
   * Days a store entry (a batch's units, a chart) is kept without a build using
   * it: a study rebuilt at least monthly keeps its rebuilds fast; entries of old code versions and
   * retired studies go after it.
   */
  keepDays: 30,
  /** Hours between two prunings of the store: each walks every entry. */
  pruneEveryHours: 24,
} as const;

/** Nonlinear least squares (src/numeric/nls.ts). */
export const FIT = {
  /** Maximum Levenberg–Marquardt iterations before stopping with 'max-iterations'. */
  maxIterations: 500,
  /** Stop when both the actual and the predicted relative decrease of the RSS in a step are below this (MINPACK ftol). */
  rssTolerance: 1e-14,
  /** Stop when every relative parameter step is below this. */
  stepTolerance: 1e-12,
  /** Stop when the scaled gradient is below this. */
  gradientTolerance: 1e-12,
  /** Confidence level of parameter intervals. */
  confidenceLevel: 0.95,
  /** A fitted parameter whose relative SE exceeds this is flagged as poorly determined. */
  maxRelativeSe: 0.5,
} as const;

/** Statistics of the variant-versus-WT comparison (src/analysis/normalise.ts). */
export const STATS = {
  /** Confidence level of effect intervals. */
  confidenceLevel: 0.95,
  /**
   * Adjusted p value (q) of the minimum-effect test below which an effect is called beyond its band,
   * increased or decreased (manifest: thresholds.qThreshold). Also bounds the chance that a variant
   * with no effect beyond any band is called abnormal overall (src/analysis/score.ts).
   */
  qThreshold: 0.05,
  /**
   * Level of the two one-sided tests below which an effect is called within WT range, i.e. its 90%
   * interval lies inside the band (manifest: thresholds.equivalenceAlpha). 0.05 is the usual level
   * of equivalence testing (Schuirmann 1987, J Pharmacokinet Biopharm 15:657).
   */
  equivalenceAlpha: 0.05,
} as const;

/** Calibration (src/calibrate). Brnich et al. 2020, Genome Med 12:3. */
export const CALIBRATION = {
  /** With this many classified controls or fewer, evidence is capped at supporting. */
  maxControlsForSupportingOnly: 10,
  /**
   * When the pseudo-count pair (one pathogenic control reading normal, one benign reading abnormal)
   * is added: 'always', so that moving a control to the correct readout never lowers the evidence
   * (see src/calibrate/oddspath.ts), or 'when-any-cell-zero'.
   */
  pseudoCountRule: 'always' as 'always' | 'when-any-cell-zero',
  /**
   * Fewest benign controls with an effect from which a WT-like band is derived (manifest:
   * thresholds.bandsFromBenignControls). Three give a sample SD with two degrees of freedom.
   * Common practice, no source.
   */
  minBenignControlsForBand: 3,
  /** Coverage of the prediction interval used as a band derived from benign controls. Common practice, no source. */
  benignBandLevel: 0.95,
} as const;

/**
 * How far from a metric's typical range a study's WT mean and one preparation may lie before
 * `check` and `build` warn (src/analysis/plausibility.ts). Each metric's typical range, with its
 * source and the columns whose units shape it, is defined in its assay's folder
 * (src/assays/<assay>/metrics.ts, `plausible`). Ratio metrics: the WT mean is plausible within
 * typical ÷ wildTypeFactor … × wildTypeFactor, one preparation within ÷/× preparationFactor;
 * difference metrics (pCa50): within typical ∓ wildTypeShift, ∓ preparationShift. Common practice,
 * no source: ten and forty times are wide enough for other sarcomeric myosins, temperatures and
 * strong variants, and a unit 60 (minutes for seconds) or 1000 times (a prefix) off lands beyond both.
 */
export const PLAUSIBLE_SPREAD = {
  wildTypeFactor: 10,
  preparationFactor: 40,
  /** pCa units. */
  wildTypeShift: 1,
  preparationShift: 1.5,
} as const;
