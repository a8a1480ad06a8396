/**
 * Every default of the tool, defined once. Each is documented beside its value;
 * the manifest may override those marked "(manifest: …)". The methods page and
 * the README read these values; tests/defaults.test.ts checks the docs agree.
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
   * Days a store entry (a file's reading, a batch's units, a chart) is kept without a build using
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

/**
 * WT-like bands per metric key `<assay>.<metric>` (manifest: thresholds.bands).
 * Ratio metrics: [low, high] of variant/WT. Difference metrics: [low, high] of variant − WT.
 * Common practice, no source: 0.8–1.25 (±20–25%, symmetric on the log scale) for rates, velocities
 * and force is a band many labs use informally. pCa50 ±0.1 is the same size on the calcium axis:
 * a shift of 0.1 pCa units is a 10^0.1 = 1.26-fold change in [Ca²⁺] at half activation. Fractions
 * (immobile filaments, slow turnover phase) use ±0.10 absolute. kcat/KM, a quotient of two fitted
 * values, takes the KM band. Basal rate and passive tension lie near zero and are compared as
 * differences in their own units: ±0.01 s⁻¹ (about a third of a typical WT basal rate of
 * 0.02–0.04 s⁻¹) and ±1 kPa (about half a typical passive tension); typical values from memory
 * (REFERENCES.md §6 [M]), bands common practice, no source. Both are reported only, never in calls.
 */
export const BANDS: Record<string, [number, number]> = {
  'atpase.kcat': [0.8, 1.25],
  'atpase.km': [0.67, 1.5],
  'atpase.kcatOverKm': [0.67, 1.5],
  'atpase.basal': [-0.01, 0.01],
  'motility.velocity': [0.8, 1.25],
  'motility.medianVelocity': [0.8, 1.25],
  'motility.p95Velocity': [0.8, 1.25],
  'motility.fractionImmobile': [-0.1, 0.1],
  'force.fmax': [0.8, 1.25],
  'force.pCa50': [-0.1, 0.1],
  'force.nH': [0.8, 1.25],
  'force.passive': [-1, 1],
  'turnover.slowFraction': [-0.1, 0.1],
  'turnover.kFast': [0.67, 1.5],
  'turnover.kSlow': [0.67, 1.5],
};

/** Assay settings (manifest: settings.<name>). */
export const ASSAY = {
  /** ATPase: fewer [actin] points than this per unit flags 'too few points'. */
  atpaseMinPoints: 5,
  /** NADH traces: initial-rate window from the first reading, in seconds. */
  nadhWindowS: 300,
  /** NADH extinction coefficient at 340 nm, M⁻¹cm⁻¹ (Horecker & Kornberg 1948). */
  nadhEpsilon340: 6220,
  /** Motility: a filament slower than this (µm/s) is immobile (from tracks: its net displacement rate). */
  motilityImmobileUmS: 0.05,
  /**
   * Motility tracks: the path is sampled about every this many seconds, so that each step is long
   * compared with centroid localisation noise (common practice, no source); 0 samples every frame.
   */
  motilityStrideS: 1,
  /** Motility tracks: minimum frames for a track to give a velocity. */
  motilityMinFrames: 5,
  /**
   * Motility: a unit with fewer analysable filaments than this is flagged 'too few filaments'.
   * Common practice, no source: labs typically score ≥ 20 filaments before trusting a mean velocity.
   */
  motilityMinFilaments: 20,
  /**
   * Motility: a unit whose immobile fraction exceeds this is flagged. Twice the upper end of the
   * 5–10% immobile filaments seen per preparation of human β-cardiac short S1 after dead-head
   * removal (Nag et al., Sci Adv 2015;1:e1500511).
   */
  motilityMaxImmobileFraction: 0.2,
  /** Force–pCa: fewer pCa points than this per preparation flags 'too few points'. */
  forceMinPoints: 6,
  /** Single turnover: phases whose rates differ by less than this factor are 'not separated'. */
  turnoverMinRateRatio: 3,
  /** Single turnover: the trace should last at least this many slow-phase time constants. */
  turnoverMinSlowTimeConstants: 1,
  /** Single turnover: p value of the extra-sum-of-squares F test below which the double exponential is kept. */
  turnoverFTestAlpha: 0.05,
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
 * Plausible values of fitted and summarised metrics (src/analysis/plausibility.ts), checked in
 * `check` and `build` as warnings: a WT mean or a preparation far outside the trade's typical
 * range points to a unit header that does not match the values (a rate headed 1/min with values in
 * 1/s gives kcat 60 times too low). Per metric key: the typical WT range in the metric's canonical
 * unit with its source, and the comparison scale (ratio: bounds are factors; difference: shifts).
 * `of` names what the typical range was measured on (shown in messages), `source` where it is from.
 * Ratio metrics: the study's WT mean is plausible within typical ÷ PLAUSIBLE_SPREAD.wildTypeFactor …
 * × that factor, one preparation within ÷/× preparationFactor; difference metrics (pCa50): within
 * typical ∓ wildTypeShift, ∓ preparationShift. The spreads are common practice, no source: ten and
 * forty times are wide enough for other sarcomeric myosins, temperatures and strong variants, and a
 * unit 60 (minutes for seconds) or 1000 times (a prefix) off lands beyond both.
 */
export const PLAUSIBLE: Record<string, { typical: [number, number]; scale: 'ratio' | 'difference'; of: string; source: string }> = {
  'atpase.kcat': { typical: [4, 7], scale: 'ratio', of: 'human β-cardiac myosin', source: 'from memory (REFERENCES.md §6 [M])' },
  'atpase.km': { typical: [10, 100], scale: 'ratio', of: 'human β-cardiac myosin', source: '"tens of µM", from memory (REFERENCES.md §6 [M])' },
  'motility.velocity': { typical: [0.7, 1.0], scale: 'ratio', of: 'human β-cardiac myosin', source: 'from memory (REFERENCES.md §6 [M])' },
  'force.fmax': { typical: [20, 40], scale: 'ratio', of: 'human cardiomyocytes', source: 'from memory (REFERENCES.md §6 [M])' },
  'force.pCa50': { typical: [5.5, 6.0], scale: 'difference', of: 'cardiac preparations', source: 'from memory (REFERENCES.md §6 [M])' },
  'turnover.kFast': { typical: [0.03, 0.03], scale: 'ratio', of: 'human β-cardiac two-headed myosin (Sarkar et al., Sci Adv 2020)', source: 'Sarkar et al., Sci Adv 2020 (REFERENCES.md §6 [V])' },
  'turnover.kSlow': { typical: [0.0034, 0.0034], scale: 'ratio', of: 'human β-cardiac two-headed myosin (Sarkar et al., Sci Adv 2020)', source: 'Sarkar et al., Sci Adv 2020 (REFERENCES.md §6 [V])' },
};

/** How far from the typical range (PLAUSIBLE) a WT mean and one preparation may lie. Common practice, no source (see PLAUSIBLE). */
export const PLAUSIBLE_SPREAD = {
  wildTypeFactor: 10,
  preparationFactor: 40,
  /** pCa units. */
  wildTypeShift: 1,
  preparationShift: 1.5,
} as const;
