/**
 * CSV table → typed rows of one input kind, in canonical units. Pure.
 *
 * Order of work for one file: resolve the header (column names, units from the header
 * or the manifest, duplicates, required columns) → per row: missing-value tokens,
 * strict number parsing, unit conversion, row-schema validation, variant lookup,
 * plausibility warnings → duplicate observations.
 *
 * A study of 100+ MB is read row by row while it is parsed (see createRowReader): everything
 * that depends only on the header (unit factors, column slots, the compiled row-schema pre-check
 * of row-check.ts) is resolved once per file; per row, values live in one reused array; ajv runs
 * only on rows the pre-check rejects, to word their errors; repeated texts share one string.
 */
import type { ErrorObject } from 'ajv';
import type { CsvTable } from './csv.js';
import { numberCellValue, parseNumberCell } from './csv.js';
import type { FileSpec } from './manifest.js';
import { shown } from '../results/source.js';
import { MSG, issue } from './messages.js';
import { compileRowCheck } from './row-check.js';
import type { KindReading, RowReport } from '../assays/types.js';
import { catalogueOf, KIND_DEFS, RENAMED_COLUMNS, ROW_SCHEMAS, validators, type ColumnDef } from './schemas.js';
import { closestNames } from './suggest.js';
import type { ColumnUnit, InputKind, Issue, RowsByKind, SourceRef, Variant } from './types.js';
import { conversionFactor, lookupUnit, normaliseUnitText, UNITS, unitChoices } from './units.js';

/** The labels of the declared variants (not their aliases), in declaration order, for suggestions. */
const labelLists = new WeakMap<ReadonlyMap<string, Variant>, string[]>();
function declaredLabels(byLabel: ReadonlyMap<string, Variant>): string[] {
  let got = labelLists.get(byLabel);
  if (!got) labelLists.set(byLabel, (got = [...new Set([...byLabel.values()].map((v) => v.label))]));
  return got;
}

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
  /** Each variant label met in the file (as written in it), with the variant it resolved to. */
  labels: Map<string, Variant>;
  batches: Set<string>;
  units: Set<string>;
  /** Data rows read (excluding header and comments), whether or not they were usable. */
  rowCount: number;
  /** Measurement columns with the unit each was read in (from a header that resolved). */
  columns: ColumnUnit[];
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
    const def = find(m[1] ?? '');
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

/** Flat copy of a string, so a kept cell does not hold on to the text of its whole file. */
function detach(s: string): string {
  // Strings of 13+ characters cut from a larger string keep a reference to it (V8 sliced strings);
  // slicing a fresh concatenation makes a new flat string.
  return s.length < 13 ? s : (s + ' ').slice(0, s.length);
}

/**
 * Strings kept in typed rows (batch, unit, well, …) repeat on thousands of rows: one shared
 * instance per distinct text, with a small-integer id (used for duplicate keys). Pass the same
 * pool to every file of a study.
 */
export class StringPool {
  private readonly ids = new Map<string, number>();
  readonly strings: string[] = [];
  /** Id of a text, adding it when new. */
  id(s: string): number {
    const got = this.ids.get(s);
    if (got !== undefined) return got;
    const kept = detach(s);
    const id = this.strings.length;
    this.strings.push(kept);
    this.ids.set(kept, id);
    return id;
  }
}

/**
 * Key of a list of cell values for duplicate detection: equal keys exactly when the lists are
 * equal (as JSON.stringify would compare them, given one type per column). Cells are joined with
 * NUL, which decoded files cannot contain; lists that do contain NUL use JSON, which writes NUL
 * as an escape, so the two forms never meet.
 */
function joinKey(parts: Array<string | number>): string {
  if (parts.length === 1) return String(parts[0]);
  const joined = parts.join('\0');
  let nuls = 0;
  for (let i = joined.indexOf('\0'); i >= 0; i = joined.indexOf('\0', i + 1)) nuls++;
  return nuls === parts.length - 1 ? joined : JSON.stringify(parts);
}

/** Feeds one file's CSV rows, header first, and collects the typed rows. */
export interface RowReader<K extends InputKind = InputKind> {
  /** The first CSV row. */
  header(cells: string[], line: number): void;
  /** Every later CSV row, in file order. */
  row(cells: string[], line: number): void;
  /** After the last row: end-of-file checks, then the rows read. */
  finish(): FileRows<K>;
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
  const reader = createRowReader(kind, table.delimiter, spec, file, byLabel, issues);
  if (table.header) reader.header(table.header.cells, table.header.line);
  for (const row of table.rows) reader.row(row.cells, row.line);
  return reader.finish();
}

function noKind(kind: string): never {
  throw new Error(`no input kind '${kind}' in the registry`);
}

/**
 * Row by row form of `readRows`, for reading a file while it is parsed (no table of rows kept).
 * Issues are appended to `issues` in the same order as `readRows` gives them. Strings kept in the
 * typed rows are shared through `pool` (one per study); the pool's duplicate index serves one
 * file at a time, so finish one reader before giving the pool's next reader its header.
 */
export function createRowReader<K extends InputKind>(
  kind: K,
  delimiter: ',' | ';',
  spec: FileSpec,
  file: string,
  byLabel: Map<string, Variant>,
  issues: Issue[],
  pool: StringPool = new StringPool(),
  unresolved: ReadonlySet<string> = new Set(),
): RowReader<K> {
  // Kinds come from the registry (the manifest schema allows no other): a miss is a mistake in the code.
  const cat = catalogueOf(kind);
  const out: FileRows<K> = { kind, rows: [] as unknown as RowsByKind[K], variantsSeen: new Set(), labels: new Map(), batches: new Set(), units: new Set(), rowCount: 0, columns: [] };
  let state: 'no-header' | 'skip' | 'read' = 'no-header';
  let headerLine = 0;
  let width = 0;
  let readRow: (cells: string[], line: number) => void = () => {};

  function header(headerCells: string[], line: number): void {
    headerLine = line;
    state = 'skip';
    if (spec.decimal === ',' && delimiter === ',') {
      issues.push(issue(MSG.decimalWithCommaDelimiter(), { file, line: headerLine }));
      return;
    }
    // 1. Header.
    let headerOk = true;
    const columns: ResolvedColumn[] = [];
    const units: ColumnUnit[] = [];
    /** New names of columns given under a former name (reported once, not also as missing). */
    const renamedTo = new Set<string>();
    const seen = new Map<string, number>();
    headerCells.forEach((cell, index) => {
      const at: SourceRef = { file, line: headerLine, column: shown(cell.trim()), col: index + 1 };
      const split = splitHeader(cell, cat.columns);
      const key = (split.def?.name ?? split.name).toLowerCase();
      if (seen.has(key)) {
        issues.push(issue(MSG.duplicateHeader(split.def?.name ?? split.name), at));
        headerOk = false;
        return;
      }
      seen.set(key, index);
      if (!split.def) {
        const renamed = RENAMED_COLUMNS[split.name.toLowerCase()];
        if (renamed && cat.columns.some((c) => c.name === renamed)) {
          // The former name: refused, so that the column cannot be mistaken for physical units.
          issues.push(issue(MSG.renamedColumn(split.name, renamed), at));
          renamedTo.add(renamed);
          headerOk = false;
        } else if (split.name !== '') issues.push(issue(MSG.unknownColumn(split.name, kind), at));
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
          const pixelSizeUm = spec.options.pixelSize as number | undefined;
          if (pixelSizeUm === undefined) {
            issues.push(issue(MSG.needsPixelSize(def.name), at));
            headerOk = false;
            return;
          }
          factor = pixelSizeUm;
        } else {
          factor = conversionFactor(def.quantity, unit)!;
        }
      }
      columns.push({ index, header: cell.trim(), def, factor, unit });
      if (unit !== undefined) units.push({ name: def.name, header: shown(cell.trim()), unit, from: split.unit !== undefined ? 'header' : 'manifest', line: headerLine, col: index + 1 });
    });
    const has = (name: string) => columns.some((c) => c.def.name === name);
    const headerAt: SourceRef = { file, line: headerLine };
    for (const def of cat.columns) {
      if (def.required && !seen.has(def.name.toLowerCase()) && !renamedTo.has(def.name)) {
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
    // The kind's own reading rules (src/assays/<assay>/inputs.ts), given this file's options and columns.
    const reading = KIND_DEFS[kind]?.reading?.({ options: spec.options, has }) ?? {};
    for (const problem of reading.headerProblems ?? []) {
      issues.push(issue(problem, headerAt));
      if (problem.severity === 'error') headerOk = false;
    }
    if (!headerOk) return;
    out.columns = units;
    state = 'read';
    width = headerCells.length;
    readRow = rowReader(columns, reading);
  }

  /** Compile the per-row work for the resolved columns: everything looked up once here. */
  function rowReader(columns: ResolvedColumn[], reading: KindReading): (cells: string[], line: number) => void {
    const validate = validators().rows[kind];
    const rowSchema = ROW_SCHEMAS[kind];
    if (!validate || !rowSchema) noKind(kind);
    const n = columns.length;
    const byName = new Map(columns.map((c) => [c.def.name, c]));
    const slotByName = new Map(columns.map((c, j) => [c.def.name, j]));
    const slotOf = (name: string) => slotByName.get(name);
    const fastValid = compileRowCheck(rowSchema, slotOf);
    const keyColumns = cat.rowKey.filter((k) => byName.has(k));
    const keySlots = keyColumns.map((k) => slotOf(k)!);
    // A key column stands in for the others of its alternative group (e.g. frame for time).
    const keyComplete = cat.rowKey.every((k) => byName.has(k) || cat.alternatives.some((g) => g.includes(k) && g.some((n) => byName.has(n))));
    /** First line of each observation key (see observationKey), when the file has every key column. */
    const firstByKey = keyComplete ? new Map<string, number>() : undefined;
    const keyParts: string[] = new Array(keySlots.length).fill('');
    const firstByRow = new Map<string, number>();
    const rows = out.rows as unknown as Record<string, unknown>[];

    // Per column, by slot.
    const cellIndex = columns.map((c) => c.index);
    const kindOf = columns.map((c) => (c.def.type === 'string' ? 0 : c.def.type === 'integer' ? 2 : 1));
    const factor = columns.map((c) => c.factor);
    const skipsRow = columns.map((c) => c.def.required || cat.alternatives.some((g) => g.includes(c.def.name)));
    const missing = new Set(spec.missing);
    const anyMissing = spec.missing.length > 0;
    const decimal = spec.decimal;
    // Typed-row fields (variant, unit and batch come first; the kind's transient fields are only
    // read by its reading rules), in column order.
    const dropped = new Set(['variant', 'unit', 'batch', ...(KIND_DEFS[kind]?.transientFields ?? [])]);
    const fieldSlots: number[] = [];
    const fieldNames: string[] = [];
    columns.forEach((c, j) => {
      if (!dropped.has(c.def.name) && !dropped.has(c.def.field)) {
        fieldSlots.push(j);
        fieldNames.push(c.def.field);
      }
    });
    const plausibleSlots = columns.flatMap((c, j) => (c.def.plausible ? [j] : []));
    const variantSlot = slotOf('variant');
    // The preparation column: the one whose typed-row field is `unit` (named 'preparation' by convention).
    const unitSlot = ((j) => (j < 0 ? undefined : j))(columns.findIndex((c) => c.def.field === 'unit'));
    const batchSlot = slotOf('batch');
    const cellAt = (c: ResolvedColumn, line: number): SourceRef => ({ file, line, column: c.def.name, col: c.index + 1 });
    const complete = reading.complete;
    /** The row's value of a column (canonical units), for the kind's reading rules. */
    const cell = (name: string) => {
      const j = slotByName.get(name);
      return j === undefined ? undefined : vals[j];
    };
    let rowLine = 0;
    /** Checks of values the reading rules computed, made after the columns' own plausibility checks. */
    const computed: Array<{ column: string; value: number; reportedIn: string; note: string }> = [];
    const report: RowReport = {
      problem(text, column) {
        const c = column === undefined ? undefined : byName.get(column);
        issues.push(issue(text, c ? cellAt(c, rowLine) : { file, line: rowLine }));
      },
      plausible(column, value, reportedIn, note) {
        computed.push({ column, value, reportedIn, note });
      },
    };
    const vals: Array<string | number | undefined> = new Array(n).fill(undefined);
    const ids = new Int32Array(n);
    const lastText: Array<string | undefined> = new Array(n).fill(undefined);
    const lastId = new Int32Array(n);
    const strings = pool.strings;
    let lastBatch: string | undefined;
    let lastUnit: string | undefined;
    let lastVariant: string | undefined;
    let lastLabel: string | undefined;
    let lastLabelVariant: Variant | undefined;
    /** Declared labels near an undeclared one, computed once per label. */
    const near = new Map<string, string[]>();
    const nearLabels = (label: string): string[] => {
      let got = near.get(label);
      if (!got) near.set(label, (got = closestNames(label, declaredLabels(byLabel))));
      return got;
    };

    return (cells: string[], line: number): void => {
      if (cells.length !== width) {
        // Column: the first extra field, or the first missing one.
        issues.push(issue(MSG.fieldCount(width, cells.length), { file, line, col: Math.min(width, cells.length) + 1 }));
        return;
      }
      let bad = false;
      let skipped = false;
      let failed: Set<string> | undefined;
      for (let j = 0; j < n; j++) {
        vals[j] = undefined;
        // j < n = columns.length, and every header index is below width = cells.length.
        const text = cells[cellIndex[j]!]!.trim();
        if (anyMissing && missing.has(text)) {
          if (skipsRow[j]) {
            if (!skipped) {
              const label = variantSlot === undefined ? undefined : cells[cellIndex[variantSlot]!]!.trim();
              const v = label ? byLabel.get(label) : undefined;
              issues.push(issue(MSG.missingSkipped(columns[j]!.def.name, text), cellAt(columns[j]!, line), { variants: v ? [v.id] : [] }));
            }
            skipped = true;
          }
          continue;
        }
        if (text === '') continue;
        const type = kindOf[j];
        if (type === 0) {
          // Neighbouring rows mostly repeat a text (same unit, batch, trace): skip the lookup then.
          if (text !== lastText[j]) {
            lastText[j] = text;
            lastId[j] = pool.id(text);
          }
          ids[j] = lastId[j]!;
          vals[j] = strings[lastId[j]!];
          continue;
        }
        let value = numberCellValue(text, decimal, type === 2);
        if (value !== value) {
          // Rejected by the fast scan: the full rules say why (or accept, should they differ).
          const parsed = parseNumberCell(text, decimal, type === 2);
          if (parsed.ok) value = parsed.value;
          else {
            const c = columns[j]!;
            const msg =
              parsed.reason === 'decimal-comma' ? MSG.decimalCommaUndeclared(c.def.name, text)
              : parsed.reason === 'decimal-point' ? MSG.decimalPointWithComma(c.def.name, text)
              : parsed.reason === 'not-an-integer' ? MSG.notAnInteger(c.def.name, text)
              : MSG.notANumber(c.def.name, text);
            issues.push(issue(msg, cellAt(c, line)));
            (failed ??= new Set()).add(c.def.name);
            bad = true;
            continue;
          }
        }
        vals[j] = value * factor[j]!;
      }
      if (skipped) return;
      if (bad || !fastValid || !fastValid(vals)) {
        // The row object as the row schema sees it (column order), validated by ajv for the errors.
        const obj: Record<string, string | number> = {};
        for (let j = 0; j < n; j++) if (vals[j] !== undefined) obj[columns[j]!.def.name] = vals[j]!;
        if (!validate(obj)) {
          for (const err of validate.errors ?? []) {
            if (err.keyword === 'if') continue;
            const name = err.keyword === 'required' ? (err.params as { missingProperty: string }).missingProperty : err.instancePath.slice(1);
            if (failed?.has(name)) continue; // already reported as a bad number
            const c = byName.get(name);
            const at = c ? cellAt(c, line) : { file, line, column: name };
            if (err.keyword === 'required') {
              const group = cat.alternatives.find((g) => g.includes(name));
              if (group) issues.push(issue(MSG.neitherAlternative(group), { file, line }));
              else issues.push(issue(reading.emptyCell?.(name) ?? MSG.emptyCell(name), at));
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
      }
      if (bad) return;

      // Variant lookup (actin-only NADH wells have none).
      const label = variantSlot === undefined ? undefined : (vals[variantSlot] as string | undefined);
      let variantId = '';
      if (label !== undefined) {
        let variant = lastLabelVariant;
        if (label !== lastLabel) {
          variant = byLabel.get(label);
          lastLabel = label;
          lastLabelVariant = variant;
          if (variant && !out.labels.has(label)) out.labels.set(label, variant);
        }
        if (!variant) {
          // A variant entry the manifest could not read (already reported): its rows are left out quietly.
          if (unresolved.has(label)) return;
          issues.push(issue(MSG.unknownVariant(label, nearLabels(label)), cellAt(byName.get('variant')!, line), { group: label }));
          return;
        }
        if (variant.id !== lastVariant) out.variantsSeen.add((lastVariant = variant.id));
        variantId = variant.id;
      }

      // Typed row: fields in column order, each set once (no deletes, so rows keep one shape).
      const unit = (unitSlot === undefined ? undefined : (vals[unitSlot] as string | undefined)) ?? '';
      const batch = vals[batchSlot!] as string;
      const typed: Record<string, unknown> = { variant: variantId, unit, batch, at: { file, line } };
      for (let k = 0; k < fieldSlots.length; k++) {
        const v = vals[fieldSlots[k]!];
        if (v !== undefined) typed[fieldNames[k]!] = v;
      }
      if (complete) {
        rowLine = line;
        computed.length = 0;
        if (!complete(typed, cell, report)) return;
      }

      // Plausibility (canonical units).
      for (let k = 0; k < plausibleSlots.length; k++) {
        const j = plausibleSlots[k]!;
        const c = columns[j]!;
        const p = c.def.plausible!;
        const v = vals[j];
        if (typeof v !== 'number') continue;
        if ((p.max !== undefined && v > p.max) || (p.min !== undefined && v < p.min)) {
          const u = c.def.quantity ? UNITS[c.def.quantity].canonical : '';
          issues.push(issue(MSG.implausible(c.def.name, Number(v.toPrecision(6)), u, p.reason), cellAt(c, line), { variants: variantId ? [variantId] : [] }));
        }
      }
      for (const { column, value: v, reportedIn, note } of complete ? computed : []) {
        const def = cat.columns.find((c) => c.name === column);
        const p = def?.plausible;
        if (!p || !((p.max !== undefined && v > p.max) || (p.min !== undefined && v < p.min))) continue;
        const u = def.quantity ? UNITS[def.quantity].canonical : '';
        const c = byName.get(reportedIn);
        issues.push(issue(MSG.implausible(column, Number(v.toPrecision(6)), u, `${p.reason} (${note})`), c ? cellAt(c, line) : { file, line }, { variants: variantId ? [variantId] : [] }));
      }

      // Duplicates.
      if (firstByKey) {
        // Two keys are equal exactly when their JSON texts are: texts by their pool id, numbers
        // as JSON writes them (every non-finite number as null, −0 as 0), a missing cell apart.
        for (let k = 0; k < keySlots.length; k++) {
          const j = keySlots[k]!;
          const v = vals[j];
          keyParts[k] = v === undefined ? '-' : kindOf[j] === 0 ? `s${ids[j]}` : Number.isFinite(v) ? String(v) : 'null';
        }
        const key = keyParts.join('\0');
        const first = firstByKey.get(key);
        if (first === undefined) firstByKey.set(key, line);
        else {
          issues.push(issue(MSG.duplicateKey(first, keyColumns.map((k, i) => `${k} ${vals[keySlots[i]!] ?? ''}`).join(', ')), { file, line }));
          return;
        }
      } else {
        const key = joinKey(cells.map((c) => c.trim()));
        const first = firstByRow.get(key);
        if (first !== undefined) issues.push(issue(MSG.duplicateRow(first), { file, line }, { variants: variantId ? [variantId] : [] }));
        else firstByRow.set(key, line);
      }

      if (batch !== lastBatch) out.batches.add((lastBatch = batch));
      if (unit && unit !== lastUnit) out.units.add((lastUnit = unit));
      rows.push(typed);
    };
  }

  return {
    header(cells, line) {
      if (state !== 'no-header') throw new Error('createRowReader: header given twice');
      header(cells, line);
    },
    row(cells, line) {
      out.rowCount++;
      if (state === 'read') readRow(cells, line);
    },
    finish() {
      if (state === 'no-header') issues.push(issue(MSG.noHeader(), { file }));
      else if (state === 'read' && out.rowCount === 0) issues.push(issue(MSG.noRows(), { file, line: headerLine }));
      return out;
    },
  };
}
