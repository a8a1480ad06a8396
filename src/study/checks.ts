/**
 * Checks across rows and files that a schema cannot express. Pure.
 */
import { MSG, issue } from './messages.js';
import type { Exclusion, InputKind, Issue, RowBase, RowsByKind, Variant } from './types.js';

/**
 * Every batch that holds a variant must also hold WT of the same gene, per input kind.
 * One error per (kind, batch), at the first line of that batch.
 */
export function checkWildTypePerBatch(rows: Partial<RowsByKind>, variants: readonly Variant[]): Issue[] {
  const issues: Issue[] = [];
  const byId = new Map(variants.map((v) => [v.id, v]));
  for (const [kind, list] of Object.entries(rows) as [InputKind, RowBase[]][]) {
    const batches = new Map<string, { first: RowBase; wtGenes: Set<string>; variants: Map<string, Variant> }>();
    for (const row of list) {
      if (row.variant === '') continue; // actin-only background wells
      const v = byId.get(row.variant);
      if (!v) continue;
      let b = batches.get(row.batch);
      if (!b) batches.set(row.batch, (b = { first: row, wtGenes: new Set(), variants: new Map() }));
      if (v.isWT) b.wtGenes.add(v.gene);
      else if (!b.variants.has(v.id)) {
        b.variants.set(v.id, v);
        if (row.at.file < b.first.at.file || (row.at.file === b.first.at.file && (row.at.line ?? 0) < (b.first.at.line ?? 0))) b.first = row;
      }
    }
    for (const [batch, b] of batches) {
      const orphans = [...b.variants.values()].filter((v) => !b.wtGenes.has(v.gene));
      if (orphans.length === 0) continue;
      const first = list.find((r) => r.batch === batch && orphans.some((v) => v.id === r.variant))!;
      issues.push(issue(MSG.noWildTypeInBatch(kind, batch, orphans.map((v) => v.label)), { file: first.at.file, line: first.at.line, column: 'batch' }));
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
    if (x.unit !== undefined && !units.has(x.unit)) issues.push(issue(MSG.exclusionNoMatch(`unit '${x.unit}'`), { ...x.at, jsonPath: `${x.at.jsonPath}/unit` }));
  }
  return issues;
}
