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

/** Longest text from the input shown whole in a message (in characters); longer texts are cut. */
export const SHOWN_MAX = 40;

/**
 * Text from the input (a cell, a label, a header) as a message shows it: control characters
 * written as escapes (\r, \t, \u0007), and a text longer than SHOWN_MAX characters cut, with
 * its length, so that a 10 MB cell cannot flood the terminal.
 * @example shown('1,5') // '1,5'
 * @example shown('9'.repeat(100)) // the first 39 nines, then '… (100 characters)'
 */
export function shown(text: string, max = SHOWN_MAX): string {
  let cut = text.length > max ? text.slice(0, max - 1) : text;
  // Never end on the first half of a surrogate pair.
  if (cut.length < text.length && /[\uD800-\uDBFF]$/.test(cut)) cut = cut.slice(0, -1);
  const visible = cut.replace(/[\u0000-\u001f\u007f]/g, (c) => (c === '\r' ? '\\r' : c === '\n' ? '\\n' : c === '\t' ? '\\t' : `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`));
  return cut.length < text.length ? `${visible}… (${text.length.toLocaleString('en-GB')} characters)` : visible;
}
