/**
 * The assay module contract. Adding an assay means one module implementing this
 * interface plus one line in src/assays/registry.ts, nothing else.
 */
import type { MetricDef, UnitResult } from '../results/types.js';
import type { InputKind, Study } from '../study/types.js';

/** A Vega-Lite specification (kept loose here; checked by vega-lite at render time). */
export type ChartSpec = Record<string, unknown>;

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
  inputs: InputKind[];
  metrics: MetricDef[];
  /** Per-unit analysis: rows → one UnitResult per (variant, unit). Pure: no I/O. */
  analyse(study: Study): UnitResult[];
  /** The variant-report chart: the variant's data and fits beside paired WT. */
  chart(input: AssayChartInput): ChartSpec;
  /** Methods-page text: model, formula, how technical replicates are summarised, flags. */
  methods: string[];
}
