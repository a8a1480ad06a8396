/**
 * StudyResults: the one contract between analysis and rendering, and the
 * downloadable results.json (described by schemas/results.schema.json).
 * Plain JSON, deterministic: no dates except those the study gave, no floats
 * that depend on iteration order.
 */
import type { FitResult } from '../numeric/types.js';
import type { ControlClass, DiseaseDirection, Domain, Issue, SourceRef } from './source.js';

/** Comparison scale of a metric: ratio metrics are compared on the log scale. */
export type MetricScale = 'ratio' | 'difference';

/** Which direction of change counts as hypercontractile for a metric; 'none' for metrics not used in calls. */
export type HyperDirection = 'up' | 'down' | 'none';

export interface MetricDef {
  /** Metric id, unique within its assay, e.g. 'kcat'. */
  id: string;
  /** Human label, e.g. 'kcat (actin-activated)'. */
  label: string;
  /** Canonical unit of the per-unit value, e.g. 's⁻¹', 'µM', 'µm/s', '' for fractions. */
  unit: string;
  scale: MetricScale;
  hyper: HyperDirection;
  /** Primary metrics drive the assay call; others are reported only. */
  primary: boolean;
  description: string;
  /**
   * Unit flag codes that make a unit's value of this metric an extrapolation (e.g. 'km-above-range'
   * for kcat and KM). A WT unit with one leaves the comparison, named in a flag; a variant unit with
   * one makes the variant's comparison not estimable, with the reason (src/analysis/normalise.ts).
   */
  excludeFlagged?: readonly string[];
  /** Unit flag codes that qualify this metric's unit values: counted on the comparison row and named in its sentence. */
  carryFlags?: readonly string[];
}

export interface Flag {
  /** Stable code, e.g. 'km-above-range'. */
  code: string;
  severity: 'info' | 'warning' | 'reject';
  message: string;
  at?: SourceRef;
}

/** One biological unit's result for one assay. */
export interface UnitResult {
  assay: string;
  variant: string;
  unit: string;
  batch: string;
  /** Metric values on their natural scale (not normalised); null when not estimable. */
  metrics: Record<string, number | null>;
  /** Standard errors of metrics when a fit provides them. */
  metricSe?: Record<string, number | null>;
  fit?: FitResult;
  /** Name of alternative model when a fallback was chosen (e.g. single exponential). */
  modelNote?: string;
  flags: Flag[];
  /** Technical replicates summarised into this unit (wells, filaments, traces, points). */
  nTechnical: number;
  /** Data for charts: points and curve, assay-specific but plain JSON. */
  plot: { points: Array<Record<string, number | string>>; curve?: Array<Record<string, number | string>> };
  source: SourceRef[];
  /** True when excluded by the manifest (kept for display, not used in statistics). */
  excluded?: string;
}

export type MetricCall = 'increased' | 'decreased' | 'within WT range' | 'indeterminate' | 'not estimable';
/** 'reference' is the WT's own overall call: every variant is compared with it, it is not called against itself. */
export type FunctionCall = 'hypercontractile' | 'hypocontractile' | 'within WT range' | 'mixed' | 'indeterminate' | 'not measured' | 'reference';

/** One variant's metric compared with paired WT (src/analysis/normalise.ts, src/analysis/score.ts). */
export interface MetricComparison {
  assay: string;
  metric: string;
  variant: string;
  scale: MetricScale;
  /** The metric's canonical unit (MetricDef.unit), for the absolute values. */
  unit: string;
  /** Ratio (variant/WT) for ratio metrics, difference (variant − WT) for difference metrics. */
  effect: number | null;
  /** 95% interval of the effect, on the effect's scale. */
  ciLow: number | null;
  ciHigh: number | null;
  /** Standard error on the analysis scale (natural log for ratio metrics). */
  se: number | null;
  /** Degrees of freedom of the interval and tests (Satterthwaite with separate variances). */
  df: number | null;
  /** 'separate': a residual variance per group; 'pooled': one for both (src/analysis/paired-effect.ts). */
  variance: 'separate' | 'pooled' | null;
  /** Minimum-effect test that the effect lies beyond the band (src/stats/band-tests.ts). */
  pBeyond: number | null;
  /**
   * pBeyond adjusted: Benjamini–Hochberg across the study's test variants (a control as if added to
   * them), then, for primary metrics, Holm across the variant's primary metrics. Decides increased/decreased.
   */
  q: number | null;
  /** Two one-sided tests that the effect lies inside the band. Decides within WT range. */
  pWithin: number | null;
  nVariantUnits: number;
  nWtUnits: number;
  /** Means of the units that entered, in the metric's unit: geometric for ratio metrics, arithmetic for differences. */
  variantMean: number | null;
  wtMean: number | null;
  batches: string[];
  band: [number, number];
  call: MetricCall;
  sentence: string;
  flags: Flag[];
}

export interface AssayCall {
  assay: string;
  variant: string;
  call: FunctionCall;
  sentence: string;
  /** Readout used for calibration: abnormal/normal in the disease direction, or null (indeterminate, not counted). */
  readout: 'abnormal' | 'normal' | null;
}

export type EvidenceLevel =
  | 'PS3 very strong'
  | 'PS3 strong'
  | 'PS3 moderate'
  | 'PS3 supporting'
  | 'BS3 supporting'
  | 'BS3 moderate'
  | 'BS3 strong'
  | 'none';

export interface Calibration {
  /** Assay id, or 'overall' for the variant call across assays. */
  scope: string;
  counts: {
    pathogenicAbnormal: number;
    pathogenicNormal: number;
    benignAbnormal: number;
    benignNormal: number;
    /** Controls whose readout was indeterminate/mixed/not measured: not counted. */
    notCounted: number;
  };
  totalControls: number;
  p1: number | null;
  p2Abnormal: number | null;
  p2Normal: number | null;
  oddsPathAbnormal: number | null;
  oddsPathNormal: number | null;
  levelAbnormal: EvidenceLevel;
  levelNormal: EvidenceLevel;
  /** Why a level was limited (too few controls, lab cap, …). */
  notes: string[];
}

export interface WestgardPoint {
  batch: string;
  value: number;
  z: number;
  rules: string[]; // rules triggered at this point, e.g. ['1-2s'], ['2-2s']
}

export interface ControlChart {
  assay: string;
  metric: string;
  mean: number | null;
  sd: number | null;
  baseline: string; // how mean and SD were established
  points: WestgardPoint[];
  rejectedBatches: string[];
  warningBatches: string[];
}

export interface VariantResult {
  id: string;
  gene: string;
  hgvs: string;
  short: string;
  label: string;
  isWT: boolean;
  residue?: number;
  domain?: string;
  control?: { class: ControlClass; source: string };
  note?: string;
  assayCalls: AssayCall[];
  overall: { call: FunctionCall; sentence: string; readout: 'abnormal' | 'normal' | null };
  /** Evidence ceiling for this variant's readout (overall), with the counts behind it. */
  evidence: { level: EvidenceLevel; scope: string; sentence: string };
  /** Flags about the variant as a whole (excluded units, WT QC rejections); unit and comparison flags live on those records. */
  flags: Flag[];
  /** Input warnings that touch this variant (also in StudyResults.issues), shown on its report. Absent in results of version 0.2.0. */
  warnings?: Issue[];
}

export interface StudyResults {
  schemaVersion: 1;
  tool: { name: 'myofolio'; version: string };
  study: {
    title: string;
    lab: string;
    dates: string[];
    synthetic: boolean;
    description?: string;
    direction: DiseaseDirection;
    caveats: string[];
    genes: Array<{ symbol: string; length?: number; domains: Domain[] }>;
  };
  settings: {
    qThreshold: number;
    equivalenceAlpha: number;
    /** The rule that combines metric and assay calls into the overall call (src/analysis/score.ts). */
    combiningRule: string;
    bands: Record<string, [number, number]>;
    bandSource: Record<string, string>;
    comparisonMethod: string;
    evidenceCap?: string;
  };
  assays: Array<{ id: string; label: string; metrics: MetricDef[]; methods: string[] }>;
  variants: VariantResult[];
  units: UnitResult[];
  comparisons: MetricComparison[];
  calibration: Calibration[];
  controlCharts: ControlChart[];
  exclusions: Array<{ kind: string; assay?: string; batch?: string; unit?: string; variant?: string; reason: string }>;
  provenance: {
    files: Array<{ path: string; kind: string; sha256: string; rows: number }>;
    manifestSha256: string;
    manifest: unknown;
    builtAt: string;
  };
  issues: Issue[];
}
