/**
 * The loaded, validated study: the output of `loadStudy` and the input of analysis.
 *
 * Everything here is plain data in canonical units (see src/study/units.ts):
 * concentrations in µM, velocities in µm/s, time in s, tension in kPa (= mN/mm²),
 * pCa dimensionless, absorbance and fluorescence in arbitrary units.
 * Every row keeps where it came from so that warnings and provenance can point at it.
 */

export type { ControlClass, DiseaseDirection, Domain, Issue, Severity, SourceRef } from '../results/source.js';
export type { RowBase } from '../assays/types.js';
import type { ControlClass, DiseaseDirection, Domain, Issue, SourceRef } from '../results/source.js';
import type { RowBase } from '../assays/types.js';

/** Input kinds: each assay's inputs (src/assays/<assay>/inputs.ts), listed by src/assays/registry.ts. */
export type InputKind = string;

/** Rows of each input kind; each assay's inputs.ts declares the type of its rows. */
export type RowsByKind = Record<InputKind, RowBase[]>;

export interface Gene {
  symbol: string;
  /** Reference protein sequence, one-letter codes, when the manifest gives one. */
  sequence?: string;
  domains: Domain[];
}

export interface Variant {
  /** URL- and file-safe identifier, unique in the study (e.g. 'MYH7-p.Arg403Gln' → 'myh7-r403q'). */
  id: string;
  gene: string;
  /** True for the wild-type reference. */
  isWT: boolean;
  /** HGVS protein notation, e.g. 'p.Arg403Gln'; 'WT' for wild type. */
  hgvs: string;
  /** One-letter short form, e.g. 'R403Q'; 'WT' for wild type. */
  short: string;
  /** The label used in the CSV files (as given in the manifest). */
  label: string;
  residue?: number;
  /** Three-letter reference and alternate residues, when a missense/nonsense change. */
  refAA?: string;
  altAA?: string;
  /** Known class for calibration controls. */
  control?: { class: ControlClass; source: string };
  note?: string;
  at: SourceRef;
}

/** A measurement column of an input file and the unit its values were read in (for messages about units). */
export interface ColumnUnit {
  /** Column name as in the row schema, e.g. 'rate'. */
  name: string;
  /** The header cell as written, e.g. 'rate (1/min)'. */
  header: string;
  /** Unit symbol the values were read in (from the unit table; 'px' for pixels). */
  unit: string;
  /** Where the unit was given: in the header, or in the manifest file entry's `units`. */
  from: 'header' | 'manifest';
  /** Header line and 1-based column of the cell. */
  line: number;
  col: number;
}

/** Per-file settings from the manifest, already in canonical units. */
export interface InputFile {
  kind: InputKind;
  /** Path relative to the study folder. */
  path: string;
  sha256: string;
  /** Data rows read (excluding header and comment lines). */
  rows: number;
  /** Motility tracks: minimum frames a track needs; immobile threshold etc. live in settings. */
  settings: Record<string, number | string | boolean>;
  /**
   * SHA-256 of the variant labels the file's rows use, each with the variant it resolved to
   * (see variantFacts in src/study/load.ts): with `sha256` and `settings`, what the file's rows
   * depend on. Set by loadStudy; the store's unit entries key on it (src/pipeline/analyse-units.ts).
   */
  variantLabels?: string;
  /** The measurement columns of the file with their units as read (set by loadStudy). */
  columns?: ColumnUnit[];
}

export interface Exclusion {
  /** What is excluded: a whole batch, a unit, or a variant. */
  kind: 'batch' | 'unit' | 'variant';
  /** Assay id the exclusion applies to, or undefined for all assays. */
  assay?: string;
  batch?: string;
  unit?: string;
  variant?: string;
  reason: string;
  at: SourceRef;
}

/** Lab-set thresholds; each field overrides its default (src/defaults.ts; bands: each assay's metrics.ts) when present. */
export interface ThresholdOverrides {
  /** Per metric key `<assay>.<metric>`: WT-like band [low, high] on the metric's own scale (ratio or difference). */
  bands?: Record<string, [number, number]>;
  /** Derive bands from benign controls instead of defaults. */
  bandsFromBenignControls?: boolean;
  /** Level for the adjusted beyond-band q values (increased/decreased calls). */
  qThreshold?: number;
  /** Level of the two one-sided tests (within WT range calls). */
  equivalenceAlpha?: number;
  /** Cap on the functional evidence level (e.g. 'moderate'), set by expert-panel rules. */
  evidenceCap?: 'supporting' | 'moderate' | 'strong' | 'very strong';
  /** Lab-declared long-term WT mean and SD per metric key `<assay>.<metric>` (canonical units), for the Westgard charts. */
  wtBaselines?: Record<string, { mean: number; sd: number; source?: string }>;
}

export interface Study {
  title: string;
  lab: string;
  dates: string[];
  /** True when the data is invented (demo, tests); every page then says so. */
  synthetic: boolean;
  description?: string;
  genes: Gene[];
  variants: Variant[];
  direction: DiseaseDirection;
  thresholds: ThresholdOverrides;
  exclusions: Exclusion[];
  caveats: string[];
  /** Optional assay settings from the manifest (e.g. motility immobile threshold), keyed by setting name. */
  settings: Record<string, number | string | boolean>;
  files: InputFile[];
  /** Rows of every input file, by kind, in manifest file order. */
  rows: Partial<RowsByKind>;
  /** Manifest as given (parsed JSON), for the provenance page. */
  manifestRaw: unknown;
  manifestSha256: string;
}

/**
 * Per batch, in order of the first row with a declared variant: WT genes present, and each
 * non-WT variant with the first line it appears on.
 */
export type WildTypeFacts = Array<[batch: string, wtGenes: string[], variants: Array<[id: string, line: number]>]>;

/** What `loadStudy` returns: a study when there are no errors, and every issue found. */
export interface LoadOutcome {
  study?: Study;
  issues: Issue[];
}
