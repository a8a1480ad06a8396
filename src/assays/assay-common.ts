/**
 * Helpers shared by the assay modules: reading assay settings with their defaults, grouping rows
 * into biological units with their source line ranges, flags every fitted assay uses, and plain
 * summary statistics. Pure: no I/O, no clock, no randomness.
 */
import type { FitResult } from '../numeric/types.js';
import type { SourceRef } from '../results/source.js';
import { FIT_MSG, type FitFlag } from './fit-flags.js';
import { mean } from '../stats/descriptive.js';
import type { AssayModule, AssayStudy, InputKindDef, RowBase, SettingsBag } from './types.js';

export type { SettingsBag } from './types.js';

/** Modules that have rows in the study, in registry order (the analysis and the units store take the same ones). */
export function activeModules(study: Pick<AssayStudy, 'rows'>, modules: readonly AssayModule[]): AssayModule[] {
  return modules.filter((a) => a.inputs.some((k) => (study.rows[k.kind]?.length ?? 0) > 0));
}

/**
 * The value of a numeric assay setting: the first finite number among the bags given
 * (later bags are more specific and win), else its default (the assay's settings.ts).
 * Numeric strings such as "0.1" are accepted.
 * @example assaySetting({ motilityImmobileUmS: 0.05 }, 'motilityImmobileUmS', { motilityImmobileUmS: 0.1 }) // → 0.1
 */
export function assaySetting<S extends Readonly<Record<string, number>>>(defaults: S, name: keyof S & string, ...bags: SettingsBag[]): number {
  for (let i = bags.length - 1; i >= 0; i--) {
    const raw = bags[i]?.[name];
    const value = typeof raw === 'string' && raw.trim() !== '' ? Number(raw) : raw;
    if (typeof value === 'number' && Number.isFinite(value)) return value;
  }
  return defaults[name] as number;
}

/**
 * The rows of one input kind of a study, typed as the kind declares them (the loader made each
 * row from the kind's row schema).
 */
export function rowsOf<R extends RowBase>(study: Pick<AssayStudy, 'rows'>, def: InputKindDef<R>): readonly R[] {
  return (study.rows[def.kind] ?? []) as readonly R[];
}

/** Settings of the input file a row came from (manifest file entry), for settings given per file. */
export function fileSettings(study: Pick<AssayStudy, 'files'>, file: string | undefined): SettingsBag {
  return study.files.find((f) => f.path === file)?.settings;
}

/**
 * Group items by a string key, keeping first-appearance order.
 * @example groupBy(['a1','b1','a2'], (s) => s[0]) // → Map { 'a' => ['a1','a2'], 'b' => ['b1'] }
 */
export function groupBy<T>(items: readonly T[], key: (item: T) => string): Map<string, T[]> {
  const out = new Map<string, T[]>();
  for (const item of items) {
    const k = key(item);
    const list = out.get(k);
    if (list) list.push(item);
    else out.set(k, [item]);
  }
  return out;
}

/**
 * Ordinary least-squares straight line y = intercept + slope·x (closed form, centred
 * sums for accuracy), with the slope's standard error when n > 2.
 * Method: textbook simple linear regression (e.g. Draper & Smith, Applied Regression
 * Analysis, 3rd ed., §1.2), the same as R's `lm(y ~ x)`.
 * @example straightLineFit([0, 1, 2, 3], [1, 3, 5, 7]) // → { slope: 2, intercept: 1, slopeSe: 0, n: 4 }
 */
export function straightLineFit(
  x: readonly number[],
  y: readonly number[],
): { slope: number; intercept: number; slopeSe: number; n: number } {
  const n = x.length;
  if (y.length !== n) throw new Error(`straightLineFit: ${n} x values but ${y.length} y values`);
  const mx = mean(x);
  const my = mean(y);
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    const dx = x[i]! - mx;
    sxx += dx * dx;
    sxy += dx * (y[i]! - my);
  }
  const slope = sxx > 0 ? sxy / sxx : NaN;
  const intercept = my - slope * mx;
  let rss = 0;
  for (let i = 0; i < n; i++) {
    const r = y[i]! - intercept - slope * x[i]!;
    rss += r * r;
  }
  const slopeSe = n > 2 && sxx > 0 ? Math.sqrt(rss / (n - 2) / sxx) : NaN;
  return { slope, intercept, slopeSe, n };
}

/** Exact powers of ten 1e0 … 1e22 (every one is a double exactly; number literals are correctly rounded). */
const POWERS_OF_TEN = [1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22];
/** Half-width of the band around a rounding tie in which the fast path defers to toPrecision (the scaled value carries an error below 1e12·2⁻⁵² ≈ 2e-4). */
const TIE_BAND = 1e-3;

/**
 * Round for plot data so chart specs stay small and deterministic (12 significant digits):
 * the same number as Number(value.toPrecision(12)), non-finite values unchanged, −0 → 0.
 *
 * Method: the 12-digit integer n = round(|v|·10^s) with s = 11 − floor(log10|v|) is formed
 * in floating point and n/10^s (or n·10^−s) is one correctly rounded operation with an exact
 * power of ten, so it is the double nearest to the decimal — what Number() of the string
 * gives. The product |v|·10^s is off by at most ~2e-4 from the exact value, so whenever it
 * lies within TIE_BAND of a rounding tie, or n does not have 12 digits, or |s| > 22, the
 * function falls back to toPrecision itself. Equality with toPrecision is tested on random values of every
 * magnitude and on constructed ties (tests/assays/round-for-plot.test.ts).
 * @example roundForPlot(0.1 + 0.2) // → 0.3
 */
export function roundForPlot(value: number): number {
  if (!Number.isFinite(value)) return value;
  if (value === 0) return 0;
  const magnitude = Math.abs(value);
  const s = 11 - Math.floor(Math.log10(magnitude));
  if (s > 22 || s < -22) return Number(value.toPrecision(12));
  // |s| ≤ 22: within POWERS_OF_TEN.
  const scaled = s >= 0 ? magnitude * POWERS_OF_TEN[s]! : magnitude / POWERS_OF_TEN[-s]!;
  const n = Math.round(scaled);
  if (Math.abs(scaled - Math.floor(scaled) - 0.5) < TIE_BAND || n < 1e11 || n >= 1e12) return Number(value.toPrecision(12));
  const rounded = s >= 0 ? n / POWERS_OF_TEN[s]! : n * POWERS_OF_TEN[-s]!;
  return value < 0 ? -rounded : rounded;
}

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
  // Nested maps variant → unit → batch (no key string per row), and the previous row's group
  // reused while the three fields repeat, as they do in files written unit by unit.
  const byVariant = new Map<string, Map<string, Map<string, UnitGroup<T>>>>();
  const groups: UnitGroup<T>[] = [];
  let last: UnitGroup<T> | undefined;
  for (const row of rows) {
    let g = last;
    if (!g || g.variant !== row.variant || g.unit !== row.unit || g.batch !== row.batch) {
      let byUnit = byVariant.get(row.variant);
      if (!byUnit) byVariant.set(row.variant, (byUnit = new Map()));
      let byBatch = byUnit.get(row.unit);
      if (!byBatch) byUnit.set(row.unit, (byBatch = new Map()));
      g = byBatch.get(row.batch);
      if (!g) {
        g = { variant: row.variant, unit: row.unit, batch: row.batch, rows: [], source: [] };
        byBatch.set(row.batch, g);
        groups.push(g);
      }
      last = g;
    }
    g.rows.push(row);
  }
  for (const g of groups) g.source = sourceRanges(g.rows);
  return groups;
}

/**
 * Summarise row locations as runs of consecutive lines per file (one SourceRef per run), so that a
 * unit's provenance counts exactly the rows it was made from, even when they are not contiguous. A
 * derived row counts the input rows it was computed from (`from`), not only its own first line.
 * @example sourceRanges([{ at: { file: 'a.csv', line: 2 } }, { at: { file: 'a.csv', line: 3 } }, { at: { file: 'a.csv', line: 9 } }])
 * // → [{ file: 'a.csv', line: 2, lineEnd: 3 }, { file: 'a.csv', line: 9 }]
 */
export function sourceRanges(rows: readonly { at: SourceRef; from?: readonly SourceRef[] }[]): SourceRef[] {
  const byFile = new Map<string, number[]>();
  for (const row of rows) {
    for (const at of row.from ?? [row.at]) {
      const list = byFile.get(at.file);
      if (list) list.push(at.line ?? 0);
      else byFile.set(at.file, [at.line ?? 0]);
    }
  }
  const out: SourceRef[] = [];
  for (const [file, lines] of byFile) {
    const sorted = [...new Set(lines)].sort((a, b) => a - b);
    for (let i = 0; i < sorted.length; ) {
      let j = i;
      while (j + 1 < sorted.length && sorted[j + 1] === sorted[j]! + 1) j++;
      out.push(i === j ? { file, line: sorted[i]! } : { file, line: sorted[i]!, lineEnd: sorted[j]! });
      i = j + 1;
    }
  }
  return out;
}

/** Flag parameters whose standard error exceeds `limit` × |estimate| (messages: src/assays/fit-flags.ts). */
export function relativeSeFlags(fit: FitResult, limit: number, labels: Record<string, string>, which: string[]): FitFlag[] {
  const flags: FitFlag[] = [];
  for (const p of fit.parameters) {
    if (!which.includes(p.name)) continue;
    const rel = Math.abs(p.se / p.estimate);
    if (!Number.isFinite(rel) || rel > limit) {
      const label = labels[p.name] ?? p.name;
      flags.push(Number.isFinite(rel) ? FIT_MSG.poorlyDetermined(label, rel, limit) : FIT_MSG.noStandardError(label));
    }
  }
  return flags;
}

/**
 * Each unit (variant, unit, batch) of the rows in order of first appearance; NADH actin-only
 * wells (no variant, no unit) belong to no unit and are left out.
 * @example unitsInOrder([{ variant: 'a', unit: 'u1', batch: 'B1' }, { variant: 'a', unit: 'u1', batch: 'B1' }] as RowBase[]) // → [['a', 'u1', 'B1']]
 */
export function unitsInOrder(rows: readonly RowBase[]): Array<[variant: string, unit: string, batch: string]> {
  const seen = new Map<string, Map<string, Set<string>>>();
  const out: Array<[string, string, string]> = [];
  let last: RowBase | undefined;
  for (const r of rows) {
    if (r.variant === '' && r.unit === '') continue;
    // Files are written unit by unit: a row of the previous row's unit adds nothing.
    if (last && r.variant === last.variant && r.unit === last.unit && r.batch === last.batch) continue;
    last = r;
    let byUnit = seen.get(r.variant);
    if (!byUnit) seen.set(r.variant, (byUnit = new Map()));
    let batches = byUnit.get(r.unit);
    if (!batches) byUnit.set(r.unit, (batches = new Set()));
    if (!batches.has(r.batch)) {
      batches.add(r.batch);
      out.push([r.variant, r.unit, r.batch]);
    }
  }
  return out;
}

