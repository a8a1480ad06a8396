/**
 * groupUnits (src/assays/assay-common.ts): one group per (variant, unit, batch), in order of
 * first appearance, rows in input order, source as runs of consecutive lines per file. Constructed rows
 * (common practice, no source).
 */
import { describe, expect, it } from 'vitest';
import { groupUnits } from '../../src/assays/assay-common.js';
import type { RowBase } from '../../src/study/types.js';

const row = (variant: string, unit: string, batch: string, file: string, line: number, id: number) => ({ variant, unit, batch, at: { file, line }, id });

describe('groupUnits', () => {
  it('groups interleaved rows by (variant, unit, batch) in order of first appearance', () => {
    const rows = [
      row('wt', 'u1', 'B1', 'a.csv', 2, 0),
      row('wt', 'u1', 'B1', 'a.csv', 3, 1),
      row('v1', 'u1', 'B1', 'a.csv', 4, 2),
      row('wt', 'u1', 'B2', 'a.csv', 5, 3),
      row('wt', 'u1', 'B1', 'b.csv', 9, 4),
      row('v1', 'u1', 'B1', 'a.csv', 7, 5),
    ];
    const groups = groupUnits(rows);
    expect(groups.map((g) => [g.variant, g.unit, g.batch, g.rows.map((r) => r.id)])).toEqual([
      ['wt', 'u1', 'B1', [0, 1, 4]],
      ['v1', 'u1', 'B1', [2, 5]],
      ['wt', 'u1', 'B2', [3]],
    ]);
    expect(groups[0]!.source).toEqual([
      { file: 'a.csv', line: 2, lineEnd: 3 },
      { file: 'b.csv', line: 9 },
    ]);
    // Lines 4 and 7 are not contiguous: two runs, so the unit counts 2 rows, not 4.
    expect(groups[1]!.source).toEqual([
      { file: 'a.csv', line: 4 },
      { file: 'a.csv', line: 7 },
    ]);
  });

  it('never merges units whose fields differ only in where a separator character falls', () => {
    const rows: RowBase[] = [row('a\u0000b', 'c', 'B', 'f', 1, 0), row('a', 'b\u0000c', 'B', 'f', 2, 1), row('a', 'b', '\u0000cB', 'f', 3, 2), row('', '', '', 'f', 4, 3)];
    expect(groupUnits(rows).map((g) => g.rows.length)).toEqual([1, 1, 1, 1]);
  });

  it('gives no groups for no rows', () => {
    expect(groupUnits([])).toEqual([]);
  });
});
