/**
 * Helpers shared by assay modules: grouping rows into biological units, reading
 * settings with their defaults, and flags every fitted assay uses.
 */
import type { FitResult } from '../numeric/types.js';
import type { Flag } from '../results/types.js';
import type { RowBase, SourceRef, Study } from '../study/types.js';

export interface UnitGroup<T extends RowBase> {
  variant: string;
  unit: string;
  batch: string;
  rows: T[];
  /** One entry per input file: the first and last line that fed the unit. */
  source: SourceRef[];
}

/**
 * Group rows by (variant, unit, batch), in order of first appearance, so that output order
 * follows the input files and is deterministic.
 */
export function groupUnits<T extends RowBase>(rows: readonly T[]): UnitGroup<T>[] {
  const groups = new Map<string, UnitGroup<T>>();
  for (const row of rows) {
    const key = JSON.stringify([row.variant, row.unit, row.batch]);
    let g = groups.get(key);
    if (!g) {
      g = { variant: row.variant, unit: row.unit, batch: row.batch, rows: [], source: [] };
      groups.set(key, g);
    }
    g.rows.push(row);
  }
  for (const g of groups.values()) g.source = sourceRanges(g.rows);
  return [...groups.values()];
}

/** Summarise row locations as one line range per file. */
export function sourceRanges(rows: readonly { at: SourceRef }[]): SourceRef[] {
  const byFile = new Map<string, { min: number; max: number }>();
  for (const { at } of rows) {
    const line = at.line ?? 0;
    const r = byFile.get(at.file);
    if (!r) byFile.set(at.file, { min: line, max: line });
    else {
      r.min = Math.min(r.min, line);
      r.max = Math.max(r.max, line);
    }
  }
  return [...byFile.entries()].map(([file, r]) => (r.min === r.max ? { file, line: r.min } : { file, line: r.min, lineEnd: r.max }));
}

/** A numeric setting from the manifest's settings, or its default. */
export function numberSetting(study: Pick<Study, 'settings'>, name: string, fallback: number): number {
  const v = study.settings?.[name];
  return typeof v === 'number' && Number.isFinite(v) ? v : fallback;
}

/** Flag parameters whose standard error exceeds `limit` × |estimate|. */
export function relativeSeFlags(fit: FitResult, limit: number, labels: Record<string, string>, which: string[]): Flag[] {
  const flags: Flag[] = [];
  for (const p of fit.parameters) {
    if (!which.includes(p.name)) continue;
    const rel = Math.abs(p.se / p.estimate);
    if (!Number.isFinite(rel) || rel > limit) {
      flags.push({
        code: 'poorly-determined',
        severity: 'warning',
        message: Number.isFinite(rel)
          ? `${labels[p.name] ?? p.name} is poorly determined (standard error ${(rel * 100).toFixed(0)}% of the value; limit ${(limit * 100).toFixed(0)}%).`
          : `${labels[p.name] ?? p.name} has no standard error (the fit's Jacobian is singular at the optimum).`,
      });
    }
  }
  return flags;
}
