/**
 * HGVS protein notation (HGVS Nomenclature, varnomen.hgvs.org, "Protein: substitution"
 * and "deletion"). Accepted forms for a variant in the manifest:
 *   p.Arg403Gln   p.(Arg403Gln)   p.R403Q   R403Q     missense
 *   p.Arg403Ter   p.Arg403*       R403*     R403X     nonsense (X is legacy, normalised to Ter)
 *   p.Arg403=     R403=                              synonymous
 *   p.Lys847del   K847del                            single-residue deletion
 * and 'WT' for wild type. Everything is normalised to the three-letter HGVS form and the
 * one-letter short form (p.Arg403Gln / R403Q).
 */

/** Three-letter codes of the 20 standard amino acids plus Sec/Pyl, and Ter (stop). IUPAC-IUBMB. */
export const AMINO_ACIDS: Record<string, string> = {
  A: 'Ala', R: 'Arg', N: 'Asn', D: 'Asp', C: 'Cys', Q: 'Gln', E: 'Glu', G: 'Gly', H: 'His', I: 'Ile',
  L: 'Leu', K: 'Lys', M: 'Met', F: 'Phe', P: 'Pro', S: 'Ser', T: 'Thr', W: 'Trp', Y: 'Tyr', V: 'Val',
  U: 'Sec', O: 'Pyl', '*': 'Ter',
};

const ONE_LETTER: Record<string, string> = Object.fromEntries(
  Object.entries(AMINO_ACIDS).map(([one, three]) => [three.toLowerCase(), one]),
);

export type ChangeType = 'missense' | 'nonsense' | 'synonymous' | 'deletion';

export interface ProteinChange {
  /** 'p.Arg403Gln' */
  hgvs: string;
  /** 'R403Q' */
  short: string;
  residue: number;
  /** Three-letter reference residue, e.g. 'Arg'. */
  refAA: string;
  /** Three-letter alternate residue ('Ter' for stop); absent for deletions and synonymous changes. */
  altAA?: string;
  type: ChangeType;
}

export type HgvsParse = { ok: true; change: ProteinChange } | { ok: false; reason: string };

/** Is this the wild-type label ('WT', 'wt', 'wild type', 'wild-type')? */
export function isWildTypeText(text: string): boolean {
  return /^(wt|wild[ -]?type)$/i.test(text.trim());
}

function residueCode(token: string): { one: string; three: string } | undefined {
  if (token.length === 1) {
    const up = token === 'X' ? '*' : token.toUpperCase() === token ? token : '';
    const three = AMINO_ACIDS[up];
    return three ? { one: up, three } : undefined;
  }
  if (token === '*') return { one: '*', three: 'Ter' };
  if (token.length === 3) {
    const one = ONE_LETTER[token.toLowerCase()];
    // Three-letter codes are written with a capital first letter (Arg, not ARG or arg).
    const three = one === undefined ? undefined : AMINO_ACIDS[one];
    if (one && three && token.slice(0, 1) === token.slice(0, 1).toUpperCase() && token.slice(1) === token.slice(1).toLowerCase()) {
      return { one, three };
    }
  }
  return undefined;
}

/**
 * Parse and normalise a protein change.
 * @example parseProteinChange('R403Q') // { ok: true, change: { hgvs: 'p.Arg403Gln', short: 'R403Q', residue: 403, ... } }
 * @example parseProteinChange('p.Xyz12Gln') // { ok: false, reason: ... }
 */
export function parseProteinChange(input: string): HgvsParse {
  let text = input.trim();
  if (text.startsWith('p.')) text = text.slice(2);
  if (text.startsWith('(') && text.endsWith(')')) text = text.slice(1, -1);
  const m = /^([A-Z][a-z]{2}|[A-Z*])(\d+)([A-Z][a-z]{2}|[A-Z*]|=|del)$/.exec(text);
  if (!m) {
    return {
      ok: false,
      reason: 'expected a protein substitution such as p.Arg403Gln, p.R403Q or R403Q (or p.Lys847del, p.Arg403Ter, p.Arg403=)',
    };
  }
  const [, refToken = '', posText = '', altToken = ''] = m; // every group of the pattern takes part in a match
  const ref = residueCode(refToken);
  if (!ref || ref.one === '*') return { ok: false, reason: `'${refToken}' is not an amino-acid code` };
  const residue = Number(posText);
  if (!Number.isSafeInteger(residue) || residue < 1) return { ok: false, reason: 'the residue number must be 1 or more' };
  if (altToken === '=') {
    return { ok: true, change: { hgvs: `p.${ref.three}${residue}=`, short: `${ref.one}${residue}=`, residue, refAA: ref.three, type: 'synonymous' } };
  }
  if (altToken === 'del') {
    return { ok: true, change: { hgvs: `p.${ref.three}${residue}del`, short: `${ref.one}${residue}del`, residue, refAA: ref.three, type: 'deletion' } };
  }
  const alt = residueCode(altToken);
  if (!alt) return { ok: false, reason: `'${altToken}' is not an amino-acid code` };
  if (alt.one === ref.one) {
    return { ok: true, change: { hgvs: `p.${ref.three}${residue}=`, short: `${ref.one}${residue}=`, residue, refAA: ref.three, type: 'synonymous' } };
  }
  const type: ChangeType = alt.one === '*' ? 'nonsense' : 'missense';
  return {
    ok: true,
    change: { hgvs: `p.${ref.three}${residue}${alt.three}`, short: `${ref.one}${residue}${alt.one}`, residue, refAA: ref.three, altAA: alt.three, type },
  };
}

/**
 * Check the reference residue against a one-letter protein sequence (residue 1 = first letter).
 * Returns undefined when it matches, else what the sequence holds there.
 */
export function checkReferenceResidue(change: ProteinChange, sequence: string): { found?: string; beyondEnd: boolean } | undefined {
  if (change.residue > sequence.length) return { beyondEnd: true };
  const found = sequence.charAt(change.residue - 1).toUpperCase(); // 1 ≤ residue ≤ length
  const expected = ONE_LETTER[change.refAA.toLowerCase()];
  return found === expected ? undefined : { found: AMINO_ACIDS[found] ?? found, beyondEnd: false };
}

/** File- and URL-safe id: gene and short form, lower case, '*' → 'ter', '=' → 'syn'. */
export function variantId(gene: string, short: string): string {
  const safe = (s: string) =>
    s.toLowerCase().replace(/\*/g, 'ter').replace(/=/g, 'syn').replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '');
  return `${safe(gene)}-${safe(short)}`;
}
