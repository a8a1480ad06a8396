/** Settings of the force–pCa assay, each with its default (manifest: settings.<name>). */
export const FORCE_SETTINGS = {
  /** Fewer pCa points than this per preparation flags 'too few points'. */
  forceMinPoints: 6,
} as const;
