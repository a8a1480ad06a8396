/** Settings of the ATPase assay, each with its default (manifest: settings.<name>). */
export const ATPASE_SETTINGS = {
  /** Fewer [actin] points than this per unit flags 'too few points'. */
  atpaseMinPoints: 5,
  /** NADH traces: initial-rate window from the first reading, in seconds. */
  nadhWindowS: 300,
  /** NADH extinction coefficient at 340 nm, M⁻¹cm⁻¹ (Horecker & Kornberg 1948). */
  nadhEpsilon340: 6220,
} as const;
