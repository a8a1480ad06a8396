/**
 * Normalise to paired WT: for every assay metric and every non-WT variant, compare the
 * variant's biological units with the WT units of the same batches (src/analysis/paired-effect.ts),
 * then adjust p values across variants within the metric (Benjamini–Hochberg) and score.
 *
 * Ratio metrics are compared as natural-log values and reported back as ratios;
 * difference metrics are compared directly. Units excluded by the manifest, and units whose
 * metric is not estimable, do not enter; each is counted in a flag so nothing is lost silently.
 */
import type { Flag, MetricComparison, MetricDef, UnitResult } from '../results/types.js';
import { benjaminiHochberg } from '../stats/bh.js';
import { pairedEffect } from './paired-effect.js';
import { metricCall, metricSentence } from './score.js';

export interface NormaliseOptions {
  confidenceLevel: number;
  qThreshold: number;
  /** Band per metric key `<assay>.<metric>`. */
  bands: Record<string, [number, number]>;
  /** Variant ids in report order; WT ids are skipped. */
  variants: Array<{ id: string; isWT: boolean }>;
}

/** Compare every variant with paired WT for each metric of one assay. */
export function normaliseAssay(
  assay: string,
  metrics: MetricDef[],
  units: UnitResult[],
  options: NormaliseOptions,
): MetricComparison[] {
  const wtIds = new Set(options.variants.filter((v) => v.isWT).map((v) => v.id));
  const mine = units.filter((u) => u.assay === assay && !u.excluded);
  const byVariant = new Map<string, UnitResult[]>();
  for (const u of mine) {
    const list = byVariant.get(u.variant) ?? [];
    list.push(u);
    byVariant.set(u.variant, list);
  }
  const wtUnits = mine.filter((u) => wtIds.has(u.variant));
  const out: MetricComparison[] = [];
  for (const def of metrics) {
    const key = `${assay}.${def.id}`;
    const band = options.bands[key];
    if (!band) throw new Error(`No WT-like band defined for metric ${key} (add it to BANDS in src/defaults.ts).`);
    const toScale = (x: number | null | undefined): number =>
      x === null || x === undefined ? NaN : def.scale === 'ratio' ? (x > 0 ? Math.log(x) : NaN) : x;
    const wtByBatch = new Map<string, number[]>();
    for (const u of wtUnits) {
      const list = wtByBatch.get(u.batch) ?? [];
      list.push(toScale(u.metrics[def.id]));
      wtByBatch.set(u.batch, list);
    }
    const metricRows: MetricComparison[] = [];
    for (const v of options.variants) {
      if (v.isWT) continue;
      const vUnits = byVariant.get(v.id);
      if (!vUnits || vUnits.length === 0) continue;
      const batches = [...new Set(vUnits.map((u) => u.batch))].sort();
      const flags: Flag[] = [];
      const notEstimable = vUnits.filter((u) => !Number.isFinite(toScale(u.metrics[def.id])));
      if (notEstimable.length > 0) {
        flags.push({
          code: 'units-not-estimable',
          severity: 'warning',
          message: `${notEstimable.length} of ${vUnits.length} variant units gave no ${def.label} value (${notEstimable
            .map((u) => u.unit)
            .join(', ')}) and were left out of the comparison.`,
        });
      }
      const perBatch = batches.map((b) => ({
        batch: b,
        variant: vUnits.filter((u) => u.batch === b).map((u) => toScale(u.metrics[def.id])),
        wt: wtByBatch.get(b) ?? [],
      }));
      const effect = pairedEffect({ confidenceLevel: options.confidenceLevel, batches: perBatch });
      // Batches where the variant has a value but WT has none: named, never dropped silently.
      const unpaired = perBatch.filter((b) => b.variant.some(Number.isFinite) && !b.wt.some(Number.isFinite)).map((b) => b.batch);
      if (unpaired.length > 0) {
        flags.push({
          code: 'batch-without-wt',
          severity: 'warning',
          message: `Batch ${unpaired.join(', ')} had no WT ${def.label} value, so the variant's units there were not compared.`,
        });
      }
      if (effect && effect.se === null) {
        flags.push({
          code: 'no-residual-df',
          severity: 'warning',
          message: `Too few units for a confidence interval (${effect.nVariant} variant, ${effect.nWt} WT; at least one more unit is needed).`,
        });
      }
      const back = (x: number | null): number | null => (x === null ? null : def.scale === 'ratio' ? Math.exp(x) : x);
      metricRows.push({
        assay,
        metric: def.id,
        variant: v.id,
        scale: def.scale,
        effect: effect ? back(effect.estimate) : null,
        ciLow: effect ? back(effect.ciLow) : null,
        ciHigh: effect ? back(effect.ciHigh) : null,
        p: effect ? effect.p : null,
        q: null,
        df: effect ? effect.df : null,
        nVariantUnits: effect ? effect.nVariant : 0,
        nWtUnits: effect ? effect.nWt : 0,
        batches: effect ? effect.batchesUsed : [],
        band,
        call: 'not estimable',
        sentence: '',
        flags,
      });
    }
    const q = benjaminiHochberg(metricRows.map((r) => r.p));
    metricRows.forEach((r, i) => {
      r.q = q[i];
      r.call = metricCall(r.effect, r.ciLow, r.ciHigh, r.q, band, options.qThreshold);
      r.sentence = metricSentence(r, def, options.qThreshold);
    });
    for (const r of metricRows) out.push(r);
  }
  return out;
}
