/**
 * Rows of one kind in several files: the same observation in two files is an error naming both
 * places (a corrected file listed beside the old one would otherwise mix both versions into one
 * fit, and a file listed under two names would count every filament twice). Rows of one preparation
 * split over several files without repeats are fine: that is how a file too large to read is split
 * (src/study/read-folder.ts). Pure.
 *
 * Method: rows are first placed in groups that two files can share — a preparation (variant,
 * preparation, batch), or for NADH readings a batch (their key is batch, well, time) — and only the
 * groups found in more than one file are compared row by row, by the kind's observation key
 * (`x-rowKey` of its row schema) on the typed values in canonical units (so 5 µM in one file meets
 * 5000 nM in another). Within one file the row reader checks the key itself (src/study/rows.ts).
 */
import { MSG, issue } from './messages.js';
import { catalogueOf } from './schemas.js';
import type { InputKind, Issue, RowBase, Variant } from './types.js';
import { UNITS } from './units.js';

/** The group of a row that two files can share (see the module comment). */
export function sharedGroupKey(kind: InputKind, row: RowBase): string {
  return kind === 'atpase-nadh' ? row.batch : `${row.variant}\0${row.unit}\0${row.batch}`;
}

/** Do two rows belong to the same group (see sharedGroupKey)? */
const sameGroup = (kind: InputKind, a: RowBase, b: RowBase) => a.batch === b.batch && (kind === 'atpase-nadh' || (a.variant === b.variant && a.unit === b.unit));

/** The groups of a file's rows, with the first and last line of each. */
export function groupsOfRows(kind: InputKind, rows: readonly RowBase[]): Map<string, { first: number; last: number }> {
  const out = new Map<string, { first: number; last: number }>();
  let lastRow: RowBase | undefined;
  let last: { first: number; last: number } | undefined;
  for (const r of rows) {
    if (!lastRow || !sameGroup(kind, r, lastRow)) {
      const key = sharedGroupKey(kind, r);
      last = out.get(key);
      if (!last) out.set(key, (last = { first: r.at.line ?? 0, last: r.at.line ?? 0 }));
    }
    lastRow = r;
    const line = r.at.line ?? 0;
    if (line < last!.first) last!.first = line;
    if (line > last!.last) last!.last = line;
  }
  return out;
}

/** Per kind, each group held by more than one file, with those files in manifest order. */
export function sharedGroups(files: ReadonlyArray<{ path: string; kind: InputKind; groups: Iterable<string> }>): Map<InputKind, Map<string, string[]>> {
  const byKind = new Map<InputKind, Map<string, string[]>>();
  for (const f of files) {
    let groups = byKind.get(f.kind);
    if (!groups) byKind.set(f.kind, (groups = new Map()));
    for (const g of f.groups) {
      const list = groups.get(g);
      if (list) list.push(f.path);
      else groups.set(g, [f.path]);
    }
  }
  for (const [kind, groups] of byKind) {
    for (const [g, paths] of groups) if (paths.length < 2) groups.delete(g);
    if (groups.size === 0) byKind.delete(kind);
  }
  return byKind;
}

/** Typed-row fields of a kind's observation key, in key order ('frame' is read as time). */
function keyFields(kind: InputKind): Array<{ name: string; field: string; unit: string }> {
  const cat = catalogueOf(kind);
  const out: Array<{ name: string; field: string; unit: string }> = [];
  for (const name of cat.rowKey) {
    const def = cat.columns.find((c) => c.name === (name === 'frame' ? 'time' : name));
    if (!def) continue;
    if (out.some((k) => k.field === def.field)) continue;
    out.push({ name: def.name, field: def.field, unit: def.quantity ? UNITS[def.quantity].canonical : '' });
  }
  return out;
}

/** The observation key of a row of this kind, as text: equal texts exactly when the keys are equal. */
export function observationKey(kind: InputKind): (row: RowBase) => string {
  const fields = keyFields(kind).map((k) => k.field);
  return (row) => {
    const r = row as unknown as Record<string, unknown>;
    let out = '';
    for (const f of fields) {
      const v = r[f];
      out += v === undefined ? '\u0001-' : typeof v === 'number' ? `\u0001n${Number.isFinite(v) ? (v === 0 ? 0 : v) : 'null'}` : `\u0001s${String(v)}`;
    }
    return out;
  };
}

/**
 * Compare the shared groups of one kind across files: an error on every row that repeats an
 * observation of an earlier file. `rowsOf(path)` gives a file's rows (all files named in `shared`
 * must have been read).
 */
export function checkAcrossFiles(
  kind: InputKind,
  shared: ReadonlyMap<string, readonly string[]>,
  filesInOrder: readonly string[],
  rowsOf: (path: string) => readonly RowBase[],
  variants: ReadonlyMap<string, Variant>,
): Issue[] {
  if (shared.size === 0) return [];
  const issues: Issue[] = [];
  const fields = keyFields(kind);
  const rowKey = observationKey(kind);
  const involved = new Set([...shared.values()].flat());
  // Rows of the shared groups, file by file in manifest order.
  const order = filesInOrder.filter((p) => involved.has(p));
  const seen = new Map<string, { file: string; line: number }>();
  const label = (id: string) => variants.get(id)?.label ?? id;
  const show = (r: RowBase) =>
    fields
      .flatMap((k) => {
        const v = (r as unknown as Record<string, unknown>)[k.field];
        if (v === undefined || v === '') return [];
        const text = k.field === 'variant' ? label(String(v)) : String(v);
        return [`${k.name} ${text}${k.unit ? ` ${k.unit}` : ''}`];
      })
      .join(', ');
  for (const path of order) {
    let lastRow: RowBase | undefined;
    let inShared = false;
    for (const r of rowsOf(path)) {
      if (!lastRow || !sameGroup(kind, r, lastRow)) inShared = shared.has(sharedGroupKey(kind, r));
      lastRow = r;
      if (!inShared) continue;
      const line = r.at.line ?? 0;
      const key = rowKey(r);
      const first = seen.get(key);
      if (first === undefined) seen.set(key, { file: path, line });
      else if (first.file !== path) {
        issues.push(issue(MSG.duplicateAcrossFiles(first.file, first.line, show(r)), { file: path, line }, { group: first.file, ...(r.variant ? { variants: [r.variant] } : {}) }));
      }
    }
  }
  return issues;
}
