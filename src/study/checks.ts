/**
 * Checks across rows and files that a schema cannot express. Pure.
 */
import { MSG, issue } from './messages.js';
import type { Exclusion, InputKind, Issue, RowBase, Variant, WildTypeFacts } from './types.js';

/**
 * What the WT-per-batch check needs of one file's rows: per batch (in order of its first row
 * with a declared variant), the WT genes present and each non-WT variant with its first line.
 * Facts of the files of one kind, in file order, stand for that kind's rows.
 */
export function wildTypeFacts(rows: readonly RowBase[], variants: ReadonlyMap<string, Variant>): WildTypeFacts {
  const batches = new Map<string, { wt: Set<string>; variants: Map<string, number> }>();
  let lastRow: RowBase | undefined;
  for (const row of rows) {
    if (row.variant === '') continue; // actin-only background wells
    // Files are written unit by unit: a row like the previous one adds nothing.
    if (lastRow && row.variant === lastRow.variant && row.batch === lastRow.batch) continue;
    lastRow = row;
    const v = variants.get(row.variant);
    if (!v) continue;
    let b = batches.get(row.batch);
    if (!b) batches.set(row.batch, (b = { wt: new Set(), variants: new Map() }));
    if (v.isWT) b.wt.add(v.gene);
    else if (!b.variants.has(v.id)) b.variants.set(v.id, row.at.line ?? 0);
  }
  return [...batches].map(([batch, b]) => [batch, [...b.wt], [...b.variants]]);
}

/**
 * Every batch that holds a variant must also hold WT of the same gene, per input kind.
 * One error per (kind, batch), at the first line of that batch's variants without WT.
 * `kinds`: each kind with the wildTypeFacts of its files, in file order.
 */
export function checkWildTypeFacts(kinds: ReadonlyArray<[InputKind, ReadonlyArray<{ file: string; facts: WildTypeFacts }>]>, variants: readonly Variant[]): Issue[] {
  const issues: Issue[] = [];
  const byId = new Map(variants.map((v) => [v.id, v]));
  for (const [kind, files] of kinds) {
    const batches = new Map<string, { wtGenes: Set<string>; variants: Set<string> }>();
    for (const { facts } of files) {
      for (const [batch, wt, vs] of facts) {
        let b = batches.get(batch);
        if (!b) batches.set(batch, (b = { wtGenes: new Set(), variants: new Set() }));
        for (const g of wt) b.wtGenes.add(g);
        for (const [id] of vs) b.variants.add(id);
      }
    }
    for (const [batch, b] of batches) {
      const orphans = [...b.variants].map((id) => byId.get(id)!).filter((v) => !b.wtGenes.has(v.gene));
      if (orphans.length === 0) continue;
      const ids = new Set(orphans.map((v) => v.id));
      // The first line (file order, then line order) of any of the orphans in this batch.
      let at: { file: string; line: number } | undefined;
      for (const { file, facts } of files) {
        const lines = facts.find(([b2]) => b2 === batch)?.[2].filter(([id]) => ids.has(id)).map(([, line]) => line) ?? [];
        if (lines.length > 0) {
          at = { file, line: Math.min(...lines) };
          break;
        }
      }
      issues.push(issue(MSG.noWildTypeInBatch(kind, batch, orphans.map((v) => v.label)), { file: at!.file, line: at!.line, column: 'batch' }));
    }
  }
  return issues;
}

/** Declared variants that no file uses: one warning each, at the manifest entry. */
export function checkUnusedVariants(variants: readonly Variant[], idsSeen: ReadonlySet<string>): Issue[] {
  return variants.filter((v) => !idsSeen.has(v.id)).map((v) => issue(MSG.variantUnused(v.label), v.at));
}

/** Exclusions whose batch or unit occurs in no file: a warning (a typo would silently exclude nothing). */
export function checkExclusionsMatch(exclusions: readonly Exclusion[], batches: ReadonlySet<string>, units: ReadonlySet<string>): Issue[] {
  const issues: Issue[] = [];
  for (const x of exclusions) {
    if (x.batch !== undefined && !batches.has(x.batch)) issues.push(issue(MSG.exclusionNoMatch(`batch '${x.batch}'`), { ...x.at, jsonPath: `${x.at.jsonPath}/batch` }));
    if (x.unit !== undefined && !units.has(x.unit)) issues.push(issue(MSG.exclusionNoMatch(`preparation '${x.unit}'`), { ...x.at, jsonPath: `${x.at.jsonPath}/preparation` }));
  }
  return issues;
}
