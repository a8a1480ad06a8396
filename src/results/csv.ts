/**
 * results.csv: one row per variant × metric, for spreadsheets. RFC 4180 quoting; text cells
 * that a spreadsheet would run as a formula (leading = + - @, tab or CR) get a leading
 * apostrophe (OWASP "CSV injection" guidance); numbers are written as numbers.
 */
import type { StudyResults } from './types.js';

export const RESULTS_CSV_COLUMNS = [
  'variant_id',
  'gene',
  'hgvs',
  'short',
  'control_class',
  'assay',
  'metric',
  'scale',
  'metric_unit',
  'variant_mean',
  'wt_mean',
  'effect',
  'ci_low',
  'ci_high',
  'p_beyond_band',
  'q',
  'p_within_band',
  'df',
  'variance',
  'n_variant_units',
  'n_wt_units',
  'batches',
  'band_low',
  'band_high',
  'metric_call',
  'assay_call',
  'overall_call',
  'evidence_ceiling',
  'flags',
] as const;

/** Neutralise a text cell that a spreadsheet would treat as a formula. Example: '=1+1' → "'=1+1". */
export function neutraliseFormula(text: string): string {
  return /^[=+\-@\t\r]/.test(text) ? `'${text}` : text;
}

function cell(v: unknown): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : '';
  const s = neutraliseFormula(String(v));
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

export function resultsCsv(results: StudyResults): string {
  const lines = [RESULTS_CSV_COLUMNS.join(',')];
  const byId = new Map(results.variants.map((v) => [v.id, v]));
  for (const c of results.comparisons) {
    const v = byId.get(c.variant);
    if (!v) continue;
    const assayCall = v.assayCalls.find((a) => a.assay === c.assay)?.call;
    const row = [
      v.id,
      v.gene,
      v.hgvs,
      v.short,
      v.control?.class ?? '',
      c.assay,
      c.metric,
      c.scale,
      c.unit,
      c.variantMean,
      c.wtMean,
      c.effect,
      c.ciLow,
      c.ciHigh,
      c.pBeyond,
      c.q,
      c.pWithin,
      c.df,
      c.variance ?? '',
      c.nVariantUnits,
      c.nWtUnits,
      c.batches.join(' '),
      c.band[0],
      c.band[1],
      c.call,
      assayCall ?? '',
      v.overall.call,
      v.evidence.level,
      c.flags.map((f) => f.code).join(' '),
    ];
    lines.push(row.map(cell).join(','));
  }
  return lines.join('\r\n') + '\r\n';
}
