/**
 * Every flag code myofolio writes on a unit, a comparison or a variant, in plain words: a short
 * label for tables (the index, a report's metric rows) and a sentence for the glossary page and a
 * report's flag list. The glossary is assembled, never written here: the unit flags' words come
 * from the assay registry (each assay's messages.ts, through src/assays/assembled.ts), the
 * comparison and variant flags' from the analysis (messages.ts). tests/analysis/flag-words.test.ts
 * collects every code emitted in src/ and fails when one has no words.
 *
 * A flag's own message (Flag.message) says what happened to one record, with its numbers; the
 * words here say what the code means wherever it appears.
 */
import { UNIT_FLAG_WORDS } from '../assays/assembled.js';
import type { FlagWords } from '../assays/types.js';
import { ANALYSIS_FLAG_WORDS } from './messages.js';

export type { FlagLevel, FlagWords } from '../assays/types.js';

/**
 * The glossary of the unit flags' words and the analysis's own: unit flags first (in registry
 * order), then comparisons and variants. Throws when the analysis words a code an assay raises
 * (a comparison passes a unit flag on under the unit's words).
 */
export function glossary(unitWords: Readonly<Record<string, FlagWords>>, analysisWords: Readonly<Record<string, FlagWords>>): Record<string, FlagWords> {
  for (const code of Object.keys(analysisWords)) {
    if (Object.prototype.hasOwnProperty.call(unitWords, code)) throw new Error(`flag words: '${code}' is worded both by an assay and by the analysis`);
  }
  return { ...unitWords, ...analysisWords };
}

/** Every flag code with its words. */
export const FLAG_WORDS: Readonly<Record<string, FlagWords>> = glossary(UNIT_FLAG_WORDS, ANALYSIS_FLAG_WORDS);

/** The words of a flag code, or undefined for a code this version does not know (e.g. from another tool version's results). */
export function flagWords(code: string): FlagWords | undefined {
  return Object.prototype.hasOwnProperty.call(FLAG_WORDS, code) ? FLAG_WORDS[code] : undefined;
}

/** Anchor id of a code's entry on the glossary page. Example: flagAnchor('km-above-range') → 'flag-km-above-range'. */
export function flagAnchor(code: string): string {
  return `flag-${code.replace(/[^A-Za-z0-9_-]/g, '-')}`;
}
