/**
 * Which variant is which across studies and releases. A variant is the same in two studies when
 * its gene symbol and its normalised HGVS protein change are the same (StudyResults.variants[].gene
 * and .hgvs are normalised by src/study/hgvs.ts: 'R403Q', 'p.R403Q' and 'p.Arg403Gln' are all
 * 'p.Arg403Gln'). Labels and ids are the lab's names in one study and are not compared. The wild
 * type is the reference of every comparison and is never matched as a variant. Pure.
 */
import type { StudyResults, VariantResult } from '../results/types.js';

/**
 * The identity of a variant across studies: '<gene>:<hgvs>'.
 * @example variantKey({ gene: 'MYH7', hgvs: 'p.Arg403Gln' }) // 'MYH7:p.Arg403Gln'
 */
export function variantKey(v: Pick<VariantResult, 'gene' | 'hgvs'>): string {
  return `${v.gene}:${v.hgvs}`;
}

/** Are these two variants (of any two studies) the same variant? The wild type never is. */
export function sameVariant(a: Pick<VariantResult, 'gene' | 'hgvs' | 'isWT'>, b: Pick<VariantResult, 'gene' | 'hgvs' | 'isWT'>): boolean {
  return !a.isWT && !b.isWT && a.gene === b.gene && a.hgvs === b.hgvs;
}

/** The study's variants other than the wild type, by identity key (first of a key wins; the manifest check forbids repeats). */
export function variantsByKey(results: Pick<StudyResults, 'variants'>): Map<string, VariantResult> {
  const out = new Map<string, VariantResult>();
  for (const v of results.variants) {
    if (v.isWT) continue;
    const key = variantKey(v);
    if (!out.has(key)) out.set(key, v);
  }
  return out;
}

/** Order of variants on a page: gene, then residue (unknown last), then HGVS text. */
export function compareVariants(
  a: { gene: string; residue?: number; hgvs: string },
  b: { gene: string; residue?: number; hgvs: string },
): number {
  if (a.gene !== b.gene) return a.gene < b.gene ? -1 : 1;
  const ra = a.residue ?? Number.POSITIVE_INFINITY;
  const rb = b.residue ?? Number.POSITIVE_INFINITY;
  if (ra !== rb) return ra - rb;
  return a.hgvs < b.hgvs ? -1 : a.hgvs > b.hgvs ? 1 : 0;
}
