/**
 * Where a value came from and what is wrong with it: the types shared by the input (src/study),
 * the assays (src/assays) and results.json (src/results/types.ts).
 */

/** Where a value came from: a CSV line (1-based, header is line 1) or a manifest JSON path. */
export interface SourceRef {
  /** Path relative to the study folder, with forward slashes. */
  file: string;
  /** 1-based line in the file (CSV); absent for manifest entries. */
  line?: number;
  /** Last line of a range of lines (provenance of a unit); absent for a single line. */
  lineEnd?: number;
  /** Column name (CSV) when the message is about one cell. */
  column?: string;
  /** 1-based column number (CSV) matching `column`, for `file:line:col` output. */
  col?: number;
  /** JSON Pointer into the manifest, e.g. /variants/3/hgvs. */
  jsonPath?: string;
}

export type Severity = 'error' | 'warning';

/** One problem with the input, reported with its location and the fix. */
export interface Issue {
  severity: Severity;
  /** Stable machine code, e.g. 'csv.unknown-unit'. */
  code: string;
  /** What is wrong, in one sentence. */
  message: string;
  /** How to fix it, in one sentence. */
  fix: string;
  at: SourceRef;
  /** Ids of the variants the issue is about; a warning with variants is shown on their reports. */
  variants?: string[];
  /** Findings merged into this issue (src/study/group-issues.ts); absent for one. */
  count?: number;
  /** Grouping key within one code, file and column (e.g. the unknown label); removed by groupIssues. */
  group?: string;
}

export type ControlClass = 'pathogenic' | 'likely pathogenic' | 'benign' | 'likely benign';

/** Disease-mechanism direction that counts as an abnormal readout. */
export type DiseaseDirection = 'hypercontractile' | 'hypocontractile' | 'either';

export interface Domain {
  name: string;
  start: number;
  end: number;
}

/** A problem without its location, as a message catalogue gives it (src/study/messages.ts); `issue` adds the location. */
export interface MessageText {
  severity: Severity;
  code: string;
  message: string;
  fix: string;
}
