/**
 * Plausibility of fitted and summarised values: a unit header that does not match its values (a
 * rate headed 1/min with values in 1/s, tension headed Pa with values in kPa) passes every cell
 * check, since each cell alone looks possible, and shows only in what the cells give: WT kcat of
 * 0.08 s⁻¹, Fmax of 25 Pa. Pure: reads the fitted units (UnitResult), the metrics' units
 * (MetricDef) and how each file's columns were read (InputFile.columns); no I/O.
 *
 *   units ──per metric with a typical range (its assay's `plausible`, via PLAUSIBLE of
 *           src/assays/assembled.ts) and per input file──▶
 *     the study's WT mean (geometric for ratio metrics) outside typical ÷/× wildTypeFactor
 *       ──▶ one warning at the header cell of the column whose unit is the likely cause,
 *           with the unit that would bring the mean into the typical range, if one does
 *     each preparation outside typical ÷/× preparationFactor (not already explained by the
 *     WT mean of its file, on the same side) ──▶ one warning per metric and file, at the rows
 *
 * Which columns can cause which metric, and how (a value proportional to the column, or to its
 * inverse), each assay states beside the metric's typical range (PlausibleRange.causes); the
 * spreads around the typical range are PLAUSIBLE_SPREAD (src/defaults.ts).
 */
import { PLAUSIBLE } from '../assays/assembled.js';
import { PLAUSIBLE_SPREAD } from '../defaults.js';
import type { MetricDef, UnitResult } from '../results/types.js';
import { MSG, issue } from '../study/messages.js';
import type { ColumnUnit, InputFile, InputKind, Issue, SourceRef, Variant } from '../study/types.js';
import { lookupUnit, UNITS, type Quantity } from '../study/units.js';

/** Plausible bounds of a metric for the WT mean or for one preparation (see PLAUSIBLE_SPREAD in src/defaults.ts). */
export function plausibleBounds(key: string, level: 'wildType' | 'preparation'): [number, number] | undefined {
  const p = PLAUSIBLE[key];
  if (!p) return undefined;
  const [lo, hi] = p.typical;
  if (p.scale === 'difference') {
    const shift = level === 'wildType' ? PLAUSIBLE_SPREAD.wildTypeShift : PLAUSIBLE_SPREAD.preparationShift;
    return [lo - shift, hi + shift];
  }
  const f = level === 'wildType' ? PLAUSIBLE_SPREAD.wildTypeFactor : PLAUSIBLE_SPREAD.preparationFactor;
  return [lo / f, hi * f];
}

/** Numbers in messages: four significant digits, no exponent for ordinary sizes. */
const num = (x: number) => (Math.abs(x) >= 1e-4 && Math.abs(x) < 1e6 ? String(Number(x.toPrecision(4))) : x.toPrecision(3));
const range = ([lo, hi]: readonly [number, number], unit: string) => (lo === hi ? `${num(lo)}${unit ? ` ${unit}` : ''}` : `${num(lo)}–${num(hi)}${unit ? ` ${unit}` : ''}`);

/** The unit's first source file: where its rows (and their units) come from. */
const fileOf = (u: UnitResult) => u.source[0]?.file;

/** Values of a metric that enter comparisons: not excluded, estimated, not an extrapolation. */
function usable(u: UnitResult, def: MetricDef): number | undefined {
  if (u.excluded) return undefined;
  const v = u.metrics[def.id];
  if (v === null || v === undefined || !Number.isFinite(v)) return undefined;
  if (def.excludeFlagged?.some((code) => u.flags.some((f) => f.code === code))) return undefined;
  if (def.scale === 'ratio' && !(v > 0)) return undefined;
  return v;
}

interface Cause {
  column: ColumnUnit;
  power: 1 | -1 | 0;
  /** A unit of the column's quantity under which the value would lie in the typical range, and that value. */
  better?: { unit: string; value: number };
}

/** Quantity of a column of a kind, from the row schema's units (via the unit table). */
function quantityOf(column: ColumnUnit): Quantity | undefined {
  for (const q of Object.keys(UNITS) as Quantity[]) if (lookupUnit(q, column.unit)) return q;
  return undefined;
}

/** The likely causes of an implausible value in a file: its columns that shape the metric, each with a better unit if one exists. */
function causesIn(key: string, file: InputFile, value: number): Cause[] {
  const p = PLAUSIBLE[key];
  const out: Cause[] = [];
  if (!p) return out;
  for (const c of p.causes) {
    if (c.kind !== file.kind) continue;
    const column = (file.columns ?? []).find((x) => x.name === c.column);
    if (!column && c.power !== 0) continue;
    const cause: Cause = { column: column ?? { name: c.column, header: c.column, unit: '', from: 'header', line: 0, col: 0 }, power: c.power };
    const q = column ? quantityOf(column) : undefined;
    if (q && c.power !== 0 && p.scale === 'ratio') {
      const now = lookupUnit(q, column!.unit)!;
      // Among the quantity's other units, the one that brings the value nearest the typical range (on the log scale), if into it.
      let best: { unit: string; value: number; miss: number } | undefined;
      for (const alt of UNITS[q].units) {
        if (alt.symbol === now.symbol) continue;
        const v = value * (alt.si / now.si) ** c.power;
        const miss = v < p.typical[0] ? Math.log(p.typical[0] / v) : v > p.typical[1] ? Math.log(v / p.typical[1]) : 0;
        if (!best || miss < best.miss) best = { unit: alt.symbol, value: v, miss };
      }
      // Inside the WT bounds counts: the typical range is one lab's WT, other myosins differ.
      const wt = plausibleBounds(key, 'wildType')!;
      if (best && best.value >= wt[0] && best.value <= wt[1]) cause.better = { unit: best.unit, value: best.value };
    }
    out.push(cause);
  }
  // A cause with a unit that explains the value first.
  return out.sort((a, b) => (a.better ? 0 : 1) - (b.better ? 0 : 1));
}

/** "the unit of 'rate' in 'rates.csv' (header 'rate (1/min)')…": how the message names the likely cause. */
function causeText(cause: Cause | undefined, file: string, metricUnit: string): string {
  if (!cause) return `Check the units of the columns of '${file}' that this value is computed from.`;
  const c = cause.column;
  if (cause.power === 0) return `Check the column '${c.name}' of '${file}' (pCa is −log10 of the free Ca²⁺ concentration in M).`;
  const where = c.from === 'header' ? `its header '${c.header}' reads it as ${c.unit}` : `the manifest's "units" give ${c.unit}`;
  const better = cause.better ? `; read as ${cause.better.unit}, the values would give ${num(cause.better.value)} ${metricUnit}` : '';
  return `The unit of '${c.name}' in '${file}' is the likely cause: ${where}${better}.`;
}

/** Where a message about a cause stands: the header cell of its column (or the file when it has none). */
function causeAt(cause: Cause | undefined, file: string): SourceRef {
  if (!cause || cause.column.line === 0) return { file, line: 1, ...(cause ? { column: cause.column.name } : {}) };
  return { file, line: cause.column.line, column: cause.column.name, col: cause.column.col };
}

/** One implausible value: a metric's WT mean in a file, or a preparation's value. */
interface Finding {
  metric: string;
  value: string;
  side: 'low' | 'high';
  bounds: string;
  typical: string;
}

/**
 * Warnings about implausible fitted and summarised values (see the module comment), for the metrics
 * with a typical range. `assays`: each assay's id and metric definitions (StudyResults.assays).
 * WT means of one file with the same likely cause (a time column behind both turnover rates) are
 * one warning.
 */
export function plausibilityIssues(units: readonly UnitResult[], assays: ReadonlyArray<{ id: string; metrics: readonly MetricDef[] }>, files: readonly InputFile[], variants: readonly Variant[]): Issue[] {
  const issues: Issue[] = [];
  const fileByPath = new Map(files.map((f) => [f.path, f]));
  const byId = new Map(variants.map((v) => [v.id, v]));
  const label = (id: string) => byId.get(id)?.label ?? id;
  const withUnit = (x: number, unit: string) => `${num(x)}${unit ? ` ${unit}` : ''}`;
  for (const a of assays) {
    const mine = units.filter((u) => u.assay === a.id);
    // Per input file: its units of this assay.
    const byFile = new Map<string, UnitResult[]>();
    for (const u of mine) {
      const f = fileOf(u);
      if (f === undefined) continue;
      const list = byFile.get(f);
      if (list) list.push(u);
      else byFile.set(f, [u]);
    }
    for (const [path, list] of byFile) {
      const file = fileByPath.get(path);
      if (!file) continue;
      const touched = [...new Set(list.map((u) => u.variant))];
      /** WT findings of this file by the column that likely causes them. */
      const wtByCause = new Map<string, { cause: Cause | undefined; findings: Array<Finding & { n: number; geometric: boolean; of: string }> }>();
      for (const def of a.metrics) {
        const key = `${a.id}.${def.id}`;
        const plausible = PLAUSIBLE[key];
        if (!plausible) continue;
        const ratio = plausible.scale === 'ratio';
        const wtBounds = plausibleBounds(key, 'wildType')!;
        const prepBounds = plausibleBounds(key, 'preparation')!;
        const typical = range(plausible.typical, def.unit);
        // The study's WT mean in this file.
        const wt = list.filter((u) => byId.get(u.variant)?.isWT).map((u) => usable(u, def)).filter((v): v is number => v !== undefined);
        let wtSide: 'low' | 'high' | undefined;
        if (wt.length > 0) {
          const mean = ratio ? Math.exp(wt.reduce((t, v) => t + Math.log(v), 0) / wt.length) : wt.reduce((t, v) => t + v, 0) / wt.length;
          wtSide = mean < wtBounds[0] ? 'low' : mean > wtBounds[1] ? 'high' : undefined;
          if (wtSide) {
            const [cause] = causesIn(key, file, mean);
            const k = cause?.column.name ?? '';
            let entry = wtByCause.get(k);
            if (!entry) wtByCause.set(k, (entry = { cause, findings: [] }));
            entry.findings.push({ metric: def.label, value: withUnit(mean, def.unit), side: wtSide, bounds: range(wtBounds, def.unit), typical, n: wt.length, geometric: ratio, of: plausible.of });
          }
        }
        // Each preparation, unless its file's WT mean already explains it (the same side).
        const odd: Array<{ u: UnitResult; value: number; side: 'low' | 'high' }> = [];
        for (const u of list) {
          const v = usable(u, def);
          if (v === undefined) continue;
          const side = v < prepBounds[0] ? 'low' : v > prepBounds[1] ? 'high' : undefined;
          if (side && side !== wtSide) odd.push({ u, value: v, side });
        }
        if (odd.length === 0) continue;
        // One warning per metric and file, naming the preparations, at their rows.
        const [cause] = causesIn(key, file, odd[0]!.value);
        const spans = odd.map((o) => o.u.source.find((x) => x.file === path)).filter((x): x is SourceRef => x !== undefined);
        const first = spans[0] ?? { file: path };
        const lastLine = Math.max(...spans.map((x) => x.lineEnd ?? x.line ?? 0));
        const items = odd.map((o) => ({ preparation: o.u.unit, variant: label(o.u.variant), batch: o.u.batch, value: withUnit(o.value, def.unit), side: o.side }));
        issues.push({
          ...issue(
            MSG.implausiblePreparations(def.label, items, range(prepBounds, def.unit), `${typical} for ${plausible.of}`, causeText(cause, path, def.unit)),
            { file: path, ...(first.line !== undefined ? { line: first.line } : {}), ...(lastLine > (first.line ?? 0) ? { lineEnd: lastLine } : {}), ...(cause ? { column: cause.column.name } : {}) },
            { variants: [...new Set(odd.map((o) => o.u.variant))], group: key },
          ),
          ...(odd.length > 1 ? { count: odd.length } : {}),
        });
      }
      for (const [column, { cause, findings }] of wtByCause) {
        const unit = a.metrics.find((d) => d.label === findings[0]?.metric)?.unit ?? '';
        const text = findings.map((f) => ({ ...f, typical: `${f.typical} for ${f.of}`, basis: `${f.geometric ? 'geometric ' : ''}mean of ${f.n} preparation${f.n === 1 ? '' : 's'}` }));
        issues.push(issue(MSG.implausibleWildType(text, causeText(cause, path, unit)), causeAt(cause, path), { variants: touched, group: `${a.id}\0${column}` }));
      }
    }
  }
  return issues;
}
