/**
 * Tests of an effect against a WT-like band [low, high], on the analysis scale (log ratio or
 * difference), from an estimate, its standard error and degrees of freedom (t distribution).
 *
 * - `beyondBandP`, the minimum-effect test (Murphy & Myors 1999, J Appl Psychol 84:234; described
 *   beside equivalence tests by Lakens, Scheel & Isager 2018, Adv Methods Pract Psychol Sci 1:259):
 *   H0 "the effect lies in the band" against H1 "it lies beyond an edge". With m the band's centre
 *   and h its half-width, the p value is the chance, were the truth on an edge, of an estimate at
 *   least as far from the centre on either side:
 *       p = P(T ≥ (|δ̂ − m| − h)/se) + P(T ≥ (|δ̂ − m| + h)/se),   T ~ t(df).
 *   With h = 0 it is the two-sided t test of "no change"; the second term, tiny unless the band is
 *   narrow beside se, keeps the size at most α at either edge.
 * - `withinBandP`, two one-sided tests (TOST; Schuirmann 1987, J Pharmacokinet Biopharm 15:657):
 *   H0 "the effect lies at or beyond an edge" against H1 "it lies inside the band":
 *       p = max(P(T ≥ (δ̂ − low)/se), P(T ≥ (high − δ̂)/se));
 *   p < α exactly when the 100·(1 − 2α)% t interval lies inside the band.
 *
 * @example beyondBandP(0.5, 0.1, 10, -0.2, 0.2) // → 0.00669 (P(T10 ≥ 3) + P(T10 ≥ 7))
 * @example withinBandP(0, 0.05, 10, -0.2, 0.2) // → 0.00126 (P(T10 ≥ 4))
 */
import { tCdf } from './distributions.js';

/** Upper tail P(T ≥ x) of Student's t with df degrees of freedom. */
function upper(x: number, df: number): number {
  return tCdf(-x, df);
}

/** Minimum-effect p value that the effect lies beyond the band (see the file comment); null without se or df. */
export function beyondBandP(estimate: number, se: number | null, df: number | null, low: number, high: number): number | null {
  if (se === null || df === null || !(se > 0) || !(df > 0) || !Number.isFinite(estimate)) return null;
  const centre = (low + high) / 2;
  const half = (high - low) / 2;
  const distance = Math.abs(estimate - centre);
  return Math.min(1, upper((distance - half) / se, df) + upper((distance + half) / se, df));
}

/** Two one-sided tests p value that the effect lies inside the band (see the file comment); null without se or df. */
export function withinBandP(estimate: number, se: number | null, df: number | null, low: number, high: number): number | null {
  if (se === null || df === null || !(se > 0) || !(df > 0) || !Number.isFinite(estimate)) return null;
  return Math.max(upper((estimate - low) / se, df), upper((high - estimate) / se, df));
}
