/**
 * The data shapes of the archive's history (src/archive/history.ts builds them): what the archive's
 * home page, gene pages and variant history pages read.
 */
import type { ControlClass } from '../study/types.js';
import type { EvidenceLevel, FunctionCall, MetricCall, MetricScale, StudyResults } from '../results/types.js';
import type { Agreement, Concordance, ScopeAgreement } from './concordance.js';
import type { ReleaseRef } from './release.js';

/** One analysis of a study: its current build, or one of its releases. */
export interface ArchiveEntry {
  /** Study id in archive.json. */
  studyId: string;
  title: string;
  /** The study's dates (YYYY-MM-DD). */
  dates: string[];
  results: StudyResults;
  /** Present when this entry is a frozen release rather than the current build. */
  release?: ReleaseRef;
}

/** Where a history row comes from: the study's current build, or a frozen release of it. */
export type RowOrigin = 'current build' | 'release';

/** Which analysis a row was read from. */
export interface EntryRef {
  studyId: string;
  studyTitle: string;
  /** The study's last date, '' when it gives none. */
  studyDate: string;
  origin: RowOrigin;
  release?: ReleaseRef;
  /** The study's id for this variant (for links into the study's own site). */
  variantId: string;
  /** How pages name the row: 'Panel 2025 (2025-03-10)', plus ', the release of 2026-03-02' for a release. */
  label: string;
}

/** One study's (or release's) comparison of one metric with paired WT. */
export interface MetricRow extends EntryRef {
  effect: number | null;
  ciLow: number | null;
  ciHigh: number | null;
  scale: MetricScale;
  unit: string;
  band: [number, number];
  call: MetricCall;
  q: number | null;
  nVariantUnits: number;
  nWtUnits: number;
  sentence: string;
}

export interface MetricHistory {
  /** '<assay>.<metric>'. */
  key: string;
  assay: string;
  metric: string;
  /** Labels from the latest entry that has the metric. */
  label: string;
  assayLabel: string;
  unit: string;
  /** Scales the rows use; two scales cannot share one axis (a method change, src/analysis/method-changes.ts). */
  scales: MetricScale[];
  /** In archive order (see the module comment). */
  rows: MetricRow[];
  agreement: ScopeAgreement['status'];
  /** Things a reader must know before comparing the rows (different scales, different bands). */
  notes: string[];
}

export interface OverallRow extends EntryRef {
  call: FunctionCall;
  sentence: string;
  evidence: EvidenceLevel;
  evidenceSentence: string;
  /** Known class when the study used the variant as a calibration control. */
  control?: ControlClass;
}

export interface LatestCall extends EntryRef {
  call: FunctionCall;
  evidence: EvidenceLevel;
  /** True when no study's latest analysis lists the variant: this is its last released call. */
  withdrawn: boolean;
}

export interface VariantHistory {
  /** '<gene>:<hgvs>' (identity.ts). */
  key: string;
  gene: string;
  hgvs: string;
  short: string;
  residue?: number;
  domain?: string;
  /** Every study that measured the variant in any of its analyses, in archive order. */
  studies: Array<{ studyId: string; title: string; date: string; withdrawn: boolean }>;
  overall: OverallRow[];
  metrics: MetricHistory[];
  concordance: Concordance;
  latest: LatestCall;
  notes: string[];
}

export interface GeneVariantSummary {
  key: string;
  hgvs: string;
  short: string;
  residue?: number;
  domain?: string;
  /** Studies that measured it (any analysis). */
  studies: number;
  latest: LatestCall;
  concordance: Agreement;
}

export interface GeneHistory {
  symbol: string;
  variants: GeneVariantSummary[];
}

/** One study for the archive's home page; `ArchiveHistory.studies` lists them oldest first (archive order). */
export interface StudySummary {
  studyId: string;
  title: string;
  dates: string[];
  genes: string[];
  synthetic: boolean;
  /** From the study's latest entry (current build, else latest release). */
  origin: RowOrigin;
  toolVersion: string;
  /** Variants other than WT. */
  variants: number;
  /** Overall calls of those variants, in a fixed order, zero counts left out. */
  calls: Array<{ call: FunctionCall; count: number }>;
  releases: ReleaseRef[];
  latestRelease?: ReleaseRef;
  /** Keys of this study's variants whose history is discordant. */
  discordant: string[];
}

export interface ArchiveHistory {
  studies: StudySummary[];
  genes: GeneHistory[];
  variants: VariantHistory[];
  /** Keys of discordant variants, for the home page. */
  discordant: string[];
  /** True when any entry's data is synthetic. */
  synthetic: boolean;
}
