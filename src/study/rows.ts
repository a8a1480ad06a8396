/**
 * CSV table → typed rows of one input kind, in canonical units. Pure.
 *
 * Order of work for one file: resolve the header (column names, units from the header
 * or the manifest, duplicates, required columns) → per row: missing-value tokens,
 * strict number parsing, unit conversion, row-schema validation (ajv), variant lookup,
 * plausibility warnings → duplicate observations.
 */
import type { ErrorObject } from 'ajv';
import type { CsvTable } from './csv.js';
import { parseNumberCell } from './csv.js';
import type { FileSpec } from './manifest.js';
import { MSG, issue } from './messages.js';
import { CATALOGUE, validators, type ColumnDef } from './schemas.js';
import type { InputKind, Issue, RowsByKind, SourceRef, Variant } from './types.js';
import { conversionFactor, lookupUnit, normaliseUnitText, UNITS, unitChoices } from './units.js';

/** A header column after resolution. */
export interface ResolvedColumn {
  index: number;
  header: string;
  def: ColumnDef;
  /** Multiply a parsed value by this to get canonical units (1 for unitless columns). */
  factor: number;
  /** Unit symbol in the file, for messages. */
  unit?: string;
}

export interface FileRows<K extends InputKind = InputKind> {
  kind: K;
  rows: RowsByKind[K];
  /** Ids of the variants met in the file. */
  variantsSeen: Set<string>;
  batches: Set<string>;
  units: Set<string>;
  /** Data rows read (excluding header and comments), whether or not they were usable. */
  rowCount: number;
}

const HEADER_UNIT = /^(.*?)\s*[([]\s*(.*?)\s*[)\]]$/;

/**
 * Split a header cell into a column name and the unit it states, if any.
 * Accepted forms: `actin`, `actin (uM)`, `actin [µM]`, `actin_uM`, `velocity_nm_s`
 * (underscore form: '_' inside the unit stands for '/').
 */
export function splitHeader(header: string, columns: readonly ColumnDef[]): { def?: ColumnDef; name: string; unit?: string } {
  const text = header.trim();
  const find = (name: string) => columns.find((c) => c.name.toLowerCase() === name.trim().toLowerCase());
  const exact = find(text);
  if (exact) return { def: exact, name: exact.name };
  const m = HEADER_UNIT.exec(text);
  if (m) {
    const def = find(m[1]);
    if (def) return { def, name: def.name, unit: m[2] };
  }
  for (let i = text.indexOf('_'); i > 0; i = text.indexOf('_', i + 1)) {
    const def = find(text.slice(0, i));
    if (def?.quantity) {
      const raw = text.slice(i + 1);
      const asSlash = raw.replace(/_/g, '/');
      const unit = lookupUnit(def.quantity, raw) ? raw : lookupUnit(def.quantity, asSlash) ? asSlash : raw;
      return { def, name: def.name, unit };
    }
  }
  return { name: text };
}

function ruleText(err: ErrorObject): string {
  const p = err.params as { comparison?: string; limit?: number };
  return `${p.comparison} ${p.limit}`;
}

/** Read the rows of one file. Issues are appended to `issues`. */
export function readRows<K extends InputKind>(
  kind: K,
  table: CsvTable,
  spec: FileSpec,
  file: string,
  byLabel: Map<string, Variant>,
  issues: Issue[],
): FileRows<K> {
  const cat = CATALOGUE[kind];
  const out: FileRows<K> = { kind, rows: [] as unknown as RowsByKind[K], variantsSeen: new Set(), batches: new Set(), units: new Set(), rowCount: table.rows.length };
  if (!table.header) {
    issues.push(issue(MSG.noHeader(), { file }));
    return out;
  }
  const headerLine = table.header.line;
  if (spec.decimal === ',' && table.delimiter === ',') {
    issues.push(issue(MSG.decimalWithCommaDelimiter(), { file, line: headerLine }));
    return out;
  }

  // 1. Header.
  let headerOk = true;
  const columns: ResolvedColumn[] = [];
  const seen = new Map<string, number>();
  table.header.cells.forEach((cell, index) => {
    const at: SourceRef = { file, line: headerLine, column: cell.trim(), col: index + 1 };
    const split = splitHeader(cell, cat.columns);
    const key = (split.def?.name ?? split.name).toLowerCase();
    if (seen.has(key)) {
      issues.push(issue(MSG.duplicateHeader(split.def?.name ?? split.name), at));
      headerOk = false;
      return;
    }
    seen.set(key, index);
    if (!split.def) {
      if (split.name !== '') issues.push(issue(MSG.unknownColumn(split.name, kind), at));
      return;
    }
    const def = split.def;
    let factor = 1;
    let unit: string | undefined;
    if (!def.quantity) {
      if (split.unit !== undefined) {
        issues.push(issue(MSG.unitNotExpected(def.name, split.unit), at));
        headerOk = false;
      }
    } else {
      const manifestUnit = spec.units[def.name];
      const choices = [...unitChoices(def.quantity), ...(def.pixels ? ['px'] : [])];
      const resolve = (text: string) => (def.pixels && normaliseUnitText(text) === 'px' ? 'px' : lookupUnit(def.quantity!, text)?.symbol);
      const fromHeader = split.unit !== undefined ? resolve(split.unit) : undefined;
      if (split.unit !== undefined && !fromHeader) {
        issues.push(issue(MSG.unitUnknown(split.unit, UNITS[def.quantity].label, choices), at));
        headerOk = false;
        return;
      }
      const fromManifest = manifestUnit !== undefined ? resolve(manifestUnit) : undefined;
      if (fromHeader && fromManifest && fromHeader !== fromManifest) {
        issues.push(issue(MSG.unitConflict(def.name, fromHeader, fromManifest), at));
        headerOk = false;
        return;
      }
      unit = fromHeader ?? fromManifest;
      if (!unit) {
        issues.push(issue(MSG.noUnit(def.name, choices), at));
        headerOk = false;
        return;
      }
      if (unit === 'px') {
        if (spec.pixelSizeUm === undefined) {
          issues.push(issue(MSG.needsPixelSize(def.name), at));
          headerOk = false;
          return;
        }
        factor = spec.pixelSizeUm;
      } else {
        factor = conversionFactor(def.quantity, unit)!;
      }
    }
    columns.push({ index, header: cell.trim(), def, factor, unit });
  });
  const has = (name: string) => columns.some((c) => c.def.name === name);
  const headerAt: SourceRef = { file, line: headerLine };
  for (const def of cat.columns) {
    if (def.required && !seen.has(def.name.toLowerCase())) {
      issues.push(issue(MSG.missingColumn(def.name, kind), headerAt));
      headerOk = false;
    }
  }
  for (const group of cat.alternatives) {
    if (!group.some((name) => seen.has(name.toLowerCase()))) {
      issues.push(issue(MSG.missingAlternative(group, kind), headerAt));
      headerOk = false;
    }
  }
  if (kind === 'motility-tracks' && has('frame') && !has('time') && spec.frameIntervalS === undefined) {
    issues.push(issue(MSG.needsFrameInterval(), headerAt));
    headerOk = false;
  }
  if (kind === 'atpase-nadh' && !has('path') && spec.pathLengthCm === undefined) {
    issues.push(issue(MSG.needsPathLength(), headerAt));
    headerOk = false;
  }
  if (!headerOk) return out;
  if (table.rows.length === 0) {
    issues.push(issue(MSG.noRows(), headerAt));
    return out;
  }

  // 2. Rows.
  const validate = validators().rows[kind];
  const byName = new Map(columns.map((c) => [c.def.name, c]));
  const keyColumns = cat.rowKey.filter((k) => byName.has(k));
  const keyComplete = cat.rowKey.every((k) => byName.has(k) || (k === 'frame' && byName.has('time')) || (k === 'time' && byName.has('frame')));
  const firstByKey = new Map<string, number>();
  const firstByRow = new Map<string, number>();
  const crossSectionWarned = new Set<string>();
  const width = table.header.cells.length;
  const rows = out.rows as unknown as Record<string, unknown>[];

  for (const row of table.rows) {
    const line = row.line;
    const cellAt = (c: ResolvedColumn): SourceRef => ({ file, line, column: c.def.name, col: c.index + 1 });
    if (row.cells.length !== width) {
      // Column: the first extra field, or the first missing one.
      issues.push(issue(MSG.fieldCount(width, row.cells.length), { file, line, col: Math.min(width, row.cells.length) + 1 }));
      continue;
    }
    const obj: Record<string, string | number> = {};
    let bad = false;
    let skipped = false;
    const failed = new Set<string>();
    for (const c of columns) {
      const text = row.cells[c.index].trim();
      const token = spec.missing.find((m) => m === text);
      if (token !== undefined) {
        if (c.def.required || cat.alternatives.some((g) => g.includes(c.def.name))) {
          if (!skipped) issues.push(issue(MSG.missingSkipped(c.def.name, token), cellAt(c)));
          skipped = true;
        }
        continue;
      }
      if (text === '') continue;
      if (c.def.type === 'string') {
        obj[c.def.name] = text;
        continue;
      }
      const parsed = parseNumberCell(text, spec.decimal, c.def.type === 'integer');
      if (!parsed.ok) {
        const msg =
          parsed.reason === 'decimal-comma' ? MSG.decimalCommaUndeclared(c.def.name, text)
          : parsed.reason === 'decimal-point' ? MSG.decimalPointWithComma(c.def.name, text)
          : parsed.reason === 'not-an-integer' ? MSG.notAnInteger(c.def.name, text)
          : MSG.notANumber(c.def.name, text);
        issues.push(issue(msg, cellAt(c)));
        failed.add(c.def.name);
        bad = true;
        continue;
      }
      obj[c.def.name] = parsed.value * c.factor;
    }
    if (skipped) continue;
    if (!validate(obj)) {
      for (const err of validate.errors ?? []) {
        if (err.keyword === 'if') continue;
        const name = err.keyword === 'required' ? (err.params as { missingProperty: string }).missingProperty : err.instancePath.slice(1);
        if (failed.has(name)) continue; // already reported as a bad number
        const c = byName.get(name);
        const at = c ? cellAt(c) : { file, line, column: name };
        if (err.keyword === 'required') {
          const group = cat.alternatives.find((g) => g.includes(name));
          if (group) issues.push(issue(MSG.neitherAlternative(group), { file, line }));
          else if (kind === 'atpase-nadh' && (name === 'variant' || name === 'unit')) issues.push(issue(MSG.needsVariantUnit(name), at));
          else issues.push(issue(MSG.emptyCell(name), at));
        } else if (['minimum', 'maximum', 'exclusiveMinimum', 'exclusiveMaximum'].includes(err.keyword)) {
          const shown = c ? Number((Number(obj[name]) / c.factor).toPrecision(12)) : Number(obj[name]);
          issues.push(issue(MSG.belowMinimum(name, shown, ruleText(err)), at));
        } else if (err.keyword === 'enum') {
          issues.push(issue(MSG.notAllowed(name, String(obj[name]), (err.params as { allowedValues: unknown[] }).allowedValues), at));
        } else {
          issues.push(issue(MSG.schemaOtherCell(name, err.message ?? err.keyword), at));
        }
      }
      bad = true;
    }
    if (bad) continue;

    // Variant lookup (actin-only NADH wells have none).
    const label = obj.variant as string | undefined;
    let variantId = '';
    if (label !== undefined) {
      const variant = byLabel.get(label);
      if (!variant) {
        issues.push(issue(MSG.unknownVariant(label), cellAt(byName.get('variant')!)));
        continue;
      }
      out.variantsSeen.add(variant.id);
      variantId = variant.id;
    }

    // Typed row.
    const typed: Record<string, unknown> = { variant: variantId, unit: (obj.unit as string | undefined) ?? '', batch: obj.batch, at: { file, line } };
    for (const c of columns) {
      if (c.def.name === 'variant' || c.def.name === 'unit' || c.def.name === 'batch') continue;
      if (obj[c.def.name] !== undefined) typed[c.def.field] = obj[c.def.name];
    }
    if (kind === 'motility-tracks') {
      if (typed.timeS === undefined) typed.timeS = (typed.frame as number) * spec.frameIntervalS!;
      delete typed.frame;
    }
    if (kind === 'atpase-nadh' && typed.pathCm === undefined) typed.pathCm = spec.pathLengthCm;
    if (kind === 'force-pca' && typed.tensionKPa === undefined) {
      const area = (typed.areaMm2 as number | undefined) ?? spec.crossSectionByUnitMm2?.[typed.unit as string] ?? spec.crossSectionMm2;
      if (area === undefined) {
        if (!crossSectionWarned.has(typed.unit as string)) issues.push(issue(MSG.needsCrossSection(typed.unit as string), cellAt(byName.get('force')!)));
        crossSectionWarned.add(typed.unit as string);
        continue;
      }
      typed.tensionKPa = (typed.forceMN as number) / area;
    }
    delete typed.forceMN;
    delete typed.areaMm2;

    // Plausibility (canonical units).
    for (const c of columns) {
      const p = c.def.plausible;
      const v = obj[c.def.name];
      if (!p || typeof v !== 'number') continue;
      if ((p.max !== undefined && v > p.max) || (p.min !== undefined && v < p.min)) {
        const unit = c.def.quantity ? UNITS[c.def.quantity].canonical : '';
        issues.push(issue(MSG.implausible(c.def.name, Number(v.toPrecision(6)), unit, p.reason), cellAt(c)));
      }
    }
    if (kind === 'force-pca' && !byName.has('tension')) {
      const p = CATALOGUE['force-pca'].columns.find((c) => c.name === 'tension')!.plausible!;
      const v = typed.tensionKPa as number;
      if ((p.max !== undefined && v > p.max) || (p.min !== undefined && v < p.min)) {
        issues.push(issue(MSG.implausible('tension', Number(v.toPrecision(6)), 'kPa', `${p.reason} (computed from force and area)`), cellAt(byName.get('force')!)));
      }
    }

    // Duplicates.
    if (keyComplete) {
      const key = JSON.stringify(keyColumns.map((k) => obj[k] ?? ''));
      const first = firstByKey.get(key);
      if (first !== undefined) {
        issues.push(issue(MSG.duplicateKey(first, keyColumns.map((k) => `${k} ${obj[k] ?? ''}`).join(', ')), { file, line }));
        continue;
      }
      firstByKey.set(key, line);
    } else {
      const key = JSON.stringify(row.cells.map((c) => c.trim()));
      const first = firstByRow.get(key);
      if (first !== undefined) issues.push(issue(MSG.duplicateRow(first), { file, line }));
      else firstByRow.set(key, line);
    }

    out.batches.add(typed.batch as string);
    if (typed.unit) out.units.add(typed.unit as string);
    rows.push(typed);
  }
  return out;
}
