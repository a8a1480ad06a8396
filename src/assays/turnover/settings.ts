/** Settings of the single-turnover assay, each with its default (manifest: settings.<name>). */
export const TURNOVER_SETTINGS = {
  /** Phases whose rates differ by less than this factor are 'not separated'. */
  turnoverMinRateRatio: 3,
  /** The trace should last at least this many slow-phase time constants. */
  turnoverMinSlowTimeConstants: 1,
  /** p value of the extra-sum-of-squares F test below which the double exponential is kept. */
  turnoverFTestAlpha: 0.05,
} as const;
