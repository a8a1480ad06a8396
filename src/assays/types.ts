/**
 * The assay contract. An assay is one folder, src/assays/<id>/, and one line in
 * src/assays/registry.ts: the folder's module.ts exports an AssayModule, which brings its input
 * kinds (row schemas, file options, reading rules), metrics with their WT-like bands, settings
 * with their defaults, the per-unit analysis, the chart and the methods text. The loader, the
 * manifest schema, the analysis and the pages read all of these through the registry.
 */
import type { MessageText, SourceRef } from '../results/source.js';
import type { Flag, MetricDef, UnitResult } from '../results/types.js';

/** A Vega-Lite specification (kept loose here; checked by vega-lite at render time). */
export type ChartSpec = Record<string, unknown>;

/** Fields every row has. `unit` is the biological unit (protein preparation, fibre, tissue). */
export interface RowBase {
  variant: string; // Variant.id after resolution
  unit: string;
  batch: string;
  at: SourceRef;
  /** For a row derived from several input rows (a well's rate from its A340 readings): those rows, for provenance. */
  from?: readonly SourceRef[];
}

/** Settings as the manifest gives them (study.settings or an input file's settings). */
export type SettingsBag = Readonly<Record<string, number | string | boolean>> | undefined;

/**
 * A setting of an input file's manifest entry besides path, kind, units, decimal and missing,
 * e.g. the optical path length of NADH plates. The loader converts it to canonical units.
 */
export interface FileOptionDef {
  /** Field of the file entry, e.g. 'pathLength'. */
  name: string;
  /**
   * 'quantity': {"value", "unit"}, one value for the file. 'quantity-per-unit': {"unit", "value"?,
   * "byPreparation"?}, a value for the whole file and/or one per preparation (kept as byUnit: by biological unit).
   */
  shape: 'quantity' | 'quantity-per-unit';
  /** The physical quantity (a quantity of src/study/units.ts), e.g. 'path'. */
  quantity: string;
  /** Manifest schema description. */
  description: string;
  /** Name of the converted value among the file's settings (provenance page), e.g. 'pathLengthCm'. */
  setting: string;
}

/** A file option after conversion: a number, or for 'quantity-per-unit' a value and/or one per unit. */
export type FileOptionValue = number | { value?: number; byUnit?: Record<string, number> };

/**
 * A metric's typical value in the trade, against which fitted values are checked
 * (src/analysis/plausibility.ts): a study's WT mean or a preparation far outside it points to a
 * unit header that does not match the values (a rate headed 1/min with values in 1/s gives kcat 60
 * times too low). The bounds checked are the typical range widened by PLAUSIBLE_SPREAD
 * (src/defaults.ts): as factors for ratio metrics, as shifts for difference metrics (the metric's
 * scale).
 */
export interface PlausibleRange {
  /** The typical WT range in the metric's canonical unit. */
  typical: readonly [number, number];
  /** What the typical range was measured on (shown in messages). */
  of: string;
  /** Where the typical range is from (a source, or "from memory"). */
  source: string;
  /**
   * Columns of the assay's input kinds whose unit shapes the metric: the metric is proportional to
   * the column's value raised to `power` (1: a rate column and kcat; −1: a time column and a rate
   * constant; 0: no unit, the column is only named). Messages name the likely cause among them.
   */
  causes: ReadonlyArray<{ kind: string; column: string; power: 1 | -1 | 0 }>;
}

/** Where a flag code is attached: a biological unit's fit, a variant-versus-WT comparison, or the variant as a whole. */
export type FlagLevel = 'unit' | 'comparison' | 'variant';

/**
 * A flag code in plain words, for the glossary page and a report's flag list. A flag's own
 * message (Flag.message) says what happened to one record, with its numbers; these words say what
 * the code means wherever it appears.
 */
export interface FlagWords {
  /** A few words for a table cell, e.g. 'KM above the actin range'. */
  label: string;
  /** What the flag means and what it does to the result, in one or two plain sentences. */
  explanation: string;
  /** Levels the code is attached at. */
  levels: readonly FlagLevel[];
}

/** A flag whose code is one of C (a catalogue's codes): a flag of a code without words does not compile. */
export type FlagOf<C extends string> = Flag & { code: C };

/** What a kind's reading rules see of one file. */
export interface KindFile {
  /** The file's options in canonical units, by name (absent when the manifest gives none). */
  options: Readonly<Record<string, FileOptionValue | undefined>>;
  /** Does the file's header have this column? */
  has(column: string): boolean;
}

/** What a kind's reading rules may report about a row. */
export interface RowReport {
  /** A problem at this row, in the given column's cell (or the whole row). */
  problem(text: MessageText, column?: string): void;
  /** Check a value the rules computed against a column's plausible range (x-plausible), reported in another column. */
  plausible(column: string, value: number, reportedIn: string, note: string): void;
}

/** Reading rules of a kind for one file, beyond what its row schema says (see InputKindDef.reading). */
export interface KindReading {
  /** Problems of the header given the file's options; an error stops reading the file. */
  headerProblems?: MessageText[];
  /** The message for an empty required cell of this column, when the kind words it itself. */
  emptyCell?(column: string): MessageText | undefined;
  /**
   * Complete a typed row (fields the file does not give, computed from other cells or the file's
   * options). `cell(column)` is the row's value of a column in canonical units. Return false to
   * leave the row out (after reporting why).
   */
  complete?(row: Record<string, unknown>, cell: (column: string) => string | number | undefined, report: RowReport): boolean;
}

/**
 * One input kind: a kind of CSV file an assay reads. `R` is the type of its typed rows.
 * The row schema is the one source of truth for the kind's columns (names, types, units,
 * required columns, alternatives, duplicate keys, plausible ranges, and the typed-row field
 * each fills: x-field).
 */
export interface InputKindDef<R extends RowBase = RowBase> {
  /** The kind's name in the manifest (files[].kind), e.g. 'atpase-rates'; equal to the schema's x-kind. */
  kind: string;
  /** JSON Schema of one row (…schema.json in the assay's folder). */
  schema: Record<string, unknown>;
  /** Options of the kind's file entries in the manifest. */
  fileOptions?: readonly FileOptionDef[];
  /** Columns that starter templates leave out (the second of an alternative pair, helpers). */
  templateSkip?: readonly string[];
  /** Typed-row fields of columns read only to compute other fields (not kept in the rows). */
  transientFields?: readonly string[];
  /** Reading rules beyond the schema, made once per file. */
  reading?(file: KindFile): KindReading;
  /** Type of the rows (never set: carries R for rowsOf). */
  readonly rowType?: R;
}

/** What an assay module reads of a loaded study (src/study/types.ts Study is one). */
export interface AssayStudy {
  /** Rows of every input kind, by kind. */
  rows: Readonly<Partial<Record<string, readonly RowBase[]>>>;
  /** Settings of the manifest (study-wide). */
  settings: SettingsBag;
  /** Input files with their own settings. */
  files: ReadonlyArray<{ path: string; settings: SettingsBag }>;
  variants: ReadonlyArray<{ id: string; isWT: boolean }>;
}

export interface AssayChartInput {
  variantLabel: string;
  /** The variant's units and the WT units of the same batches. */
  variantUnits: UnitResult[];
  wtUnits: UnitResult[];
}

export interface AssayModule {
  id: string;
  label: string;
  /** Input kinds this assay reads (any one of them is enough). */
  inputs: readonly InputKindDef[];
  metrics: MetricDef[];
  /**
   * Default WT-like band per metric id (manifest: thresholds.bands["<assay>.<metric>"]). Ratio
   * metrics: [low, high] of variant/WT; difference metrics: [low, high] of variant − WT.
   */
  bands: Readonly<Record<string, readonly [number, number]>>;
  /**
   * Typical range per metric id, or null for a metric whose fitted values are not checked against
   * one (no typical value in the trade, or one derived from other metrics). Every metric has an
   * entry, so that a new metric is a choice, never an oversight (src/assays/assembled.ts checks).
   */
  plausible: Readonly<Record<string, PlausibleRange | null>>;
  /**
   * Every flag code the assay's analysis can raise on a unit, in plain words (the assay's
   * messages.ts, where each flag's message is written too). The glossary page shows them
   * (src/analysis/flag-words.ts); a code two assays raise must be worded alike.
   */
  flagWords: Readonly<Record<string, FlagWords>>;
  /** Default of each setting of the assay (manifest: settings.<name>); names are unique across assays. */
  settings: Readonly<Record<string, number>>;
  /** Per-unit analysis: rows → one UnitResult per (variant, unit). Pure: no I/O. */
  analyse(study: AssayStudy): UnitResult[];
  /** The variant-report chart: the variant's data and fits beside paired WT. */
  chart(input: AssayChartInput): ChartSpec;
  /** Methods-page text: model, formula, how technical replicates are summarised, flags. */
  methods: string[];
}
