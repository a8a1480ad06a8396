/** Settings of the in vitro motility assay, each with its default (manifest: settings.<name>). */
export const MOTILITY_SETTINGS = {
  /** A filament slower than this (µm/s) is immobile (from tracks: its net displacement rate). */
  motilityImmobileUmS: 0.05,
  /**
   * Tracks: the path is sampled about every this many seconds, so that each step is long
   * compared with centroid localisation noise (common practice, no source); 0 samples every frame.
   */
  motilityStrideS: 1,
  /** Tracks: minimum frames for a track to give a velocity. */
  motilityMinFrames: 5,
  /**
   * A unit with fewer analysable filaments than this is flagged 'too few filaments'.
   * Common practice, no source: labs typically score ≥ 20 filaments before trusting a mean velocity.
   */
  motilityMinFilaments: 20,
  /**
   * A unit whose immobile fraction exceeds this is flagged. Twice the upper end of the
   * 5–10% immobile filaments seen per preparation of human β-cardiac short S1 after dead-head
   * removal (Nag et al., Sci Adv 2015;1:e1500511).
   */
  motilityMaxImmobileFraction: 0.2,
} as const;
