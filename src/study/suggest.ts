/**
 * "Did you mean …?" for names a study uses but does not declare (variant labels in the CSV files,
 * gene symbols in the manifest). Pure.
 *
 * Method: optimal string alignment distance (Levenshtein distance with transposition of two
 * adjacent characters counted as one edit; Damerau 1964, Commun ACM 7:171, in the restricted
 * form of Boytsov 2011, J Exp Algorithmics 16:1.1), on upper-cased text, so that 'a212v' is one
 * step from nothing but its case and 'A21V2' one transposition from 'A212V'. A candidate is
 * offered when it lies within a quarter of the name's length (at least one edit); every candidate
 * at the best distance is offered, up to three. Texts that read as the same protein change
 * (HGVS or short form, src/study/hgvs.ts) are offered first.
 */
import { parseProteinChange } from './hgvs.js';

/**
 * Optimal string alignment distance between two texts (edits: insert, delete, substitute, swap
 * two neighbours), counted in UTF-16 code units.
 * @example editDistance('A212V', 'A21V2') // 1 (one transposition)
 * @example editDistance('R403Q', 'R403W') // 1
 */
export function editDistance(a: string, b: string, limit = Infinity): number {
  if (a === b) return 0;
  if (Math.abs(a.length - b.length) > limit) return Infinity;
  const n = a.length;
  const m = b.length;
  let prev2 = new Array<number>(m + 1).fill(0);
  let prev = Array.from({ length: m + 1 }, (_, j) => j);
  let cur = new Array<number>(m + 1).fill(0);
  for (let i = 1; i <= n; i++) {
    cur[0] = i;
    let rowMin = i;
    // Every index below is within 0…m, the length of the three rows less one.
    for (let j = 1; j <= m; j++) {
      const cost = a.charCodeAt(i - 1) === b.charCodeAt(j - 1) ? 0 : 1;
      let d = Math.min(prev[j]! + 1, cur[j - 1]! + 1, prev[j - 1]! + cost);
      if (i > 1 && j > 1 && a.charCodeAt(i - 1) === b.charCodeAt(j - 2) && a.charCodeAt(i - 2) === b.charCodeAt(j - 1)) d = Math.min(d, prev2[j - 2]! + 1);
      cur[j] = d;
      if (d < rowMin) rowMin = d;
    }
    if (rowMin > limit) return Infinity;
    [prev2, prev, cur] = [prev, cur, prev2];
  }
  return prev[m]!;
}

/** Longest name compared (a longer text is no near-miss of a label, and comparing it costs its length squared). */
const MAX_COMPARED = 64;

/**
 * The declared names closest to `name`, best first (at most three), or [] when none is close.
 * `candidates` are the declared names in declaration order (ties keep that order).
 * @example closestNames('A21V2', ['WT', 'A212V', 'R403Q']) // ['A212V']
 * @example closestNames('p.Ala212Val', ['WT', 'A212V']) // ['A212V'] (the same protein change)
 * @example closestNames('XYZ', ['WT', 'A212V']) // []
 */
export function closestNames(name: string, candidates: readonly string[]): string[] {
  const text = name.trim();
  if (text === '' || text.length > MAX_COMPARED) return [];
  // The same protein change written another way.
  const change = parseProteinChange(text);
  if (change.ok) {
    const same = candidates.filter((c) => {
      const p = parseProteinChange(c);
      return p.ok && p.change.hgvs === change.change.hgvs;
    });
    if (same.length > 0) return same.slice(0, 3);
  }
  const wanted = text.toUpperCase();
  const limit = Math.max(1, Math.floor(text.length / 4));
  let best = limit + 1;
  let found: string[] = [];
  for (const c of candidates) {
    if (c.length > MAX_COMPARED) continue;
    const d = editDistance(wanted, c.toUpperCase(), best);
    if (d < best) {
      best = d;
      found = [c];
    } else if (d === best && !found.includes(c)) found.push(c);
  }
  return best <= limit ? found.slice(0, 3) : [];
}

/** ' Did you mean 'A212V'?' (or '… 'A' or 'B'?'), '' when there is nothing to offer. */
export function didYouMean(names: readonly string[]): string {
  if (names.length === 0) return '';
  const quoted = names.map((n) => `'${n}'`);
  return ` Did you mean ${quoted.length === 1 ? quoted[0] : `${quoted.slice(0, -1).join(', ')} or ${quoted[quoted.length - 1]}`}?`;
}
