/**
 * Normalise to paired WT: for every assay metric and every non-WT variant, compare the variant's
 * biological units with the WT units of the same batches (src/analysis/paired-effect.ts) and test
 * the effect against the metric's WT-like band (src/stats/band-tests.ts). Calls are made later,
 * across all assays at once (src/analysis/score.ts: `callComparisons`), because the overall call
 * adjusts for the variant's several primary metrics.
 *
 * Ratio metrics are compared as natural-log values and reported back as ratios; difference
 * metrics are compared directly in their own units (negative values kept). Nothing leaves a
 * comparison silently: units excluded by the manifest are marked elsewhere; units without a value,
 * units whose value is an extrapolation (MetricDef.excludeFlagged), batches without WT and unit
 * flags that qualify the values (MetricDef.carryFlags) each leave a flag on the comparison row.
 */
import type { Flag, MetricComparison, MetricDef, UnitResult } from '../results/types.js';
import { beyondBandP, withinBandP } from '../stats/band-tests.js';
import { ANALYSIS_MSG } from './messages.js';
import { pairedEffect } from './paired-effect.js';

export interface CompareOptions {
  confidenceLevel: number;
  /** Band per metric key `<assay>.<metric>`, on the effect's scale (ratio or difference). */
  bands: Record<string, [number, number]>;
  /** Variant ids in report order; WT ids are skipped. */
  variants: Array<{ id: string; isWT: boolean }>;
}

/** A metric value on the analysis scale: natural log for ratio metrics (NaN unless positive), as it is for differences. */
export function toAnalysisScale(x: number | null | undefined, scale: MetricDef['scale']): number {
  if (x === null || x === undefined || !Number.isFinite(x)) return NaN;
  return scale === 'ratio' ? (x > 0 ? Math.log(x) : NaN) : x;
}

function fromAnalysisScale(x: number | null, scale: MetricDef['scale']): number | null {
  return x === null ? null : scale === 'ratio' ? Math.exp(x) : x;
}

function meanOf(xs: readonly number[]): number | null {
  if (xs.length === 0) return null;
  let s = 0;
  for (const x of xs) s += x;
  return s / xs.length;
}

function listUnits(units: readonly UnitResult[]): string {
  const names = units.map((u) => `${u.unit} (${u.batch})`);
  return names.length > 6 ? `${names.slice(0, 6).join(', ')} and ${names.length - 6} more` : names.join(', ');
}

function flaggedWith(u: UnitResult, codes: readonly string[] | undefined): Flag | undefined {
  return codes ? u.flags.find((f) => codes.includes(f.code)) : undefined;
}

/** Compare every variant with paired WT for each metric of one assay: estimates and band tests, no calls yet. */
export function compareAssay(assay: string, metrics: readonly MetricDef[], units: readonly UnitResult[], options: CompareOptions): MetricComparison[] {
  const wtIds = new Set(options.variants.filter((v) => v.isWT).map((v) => v.id));
  const mine = units.filter((u) => u.assay === assay && !u.excluded);
  const byVariant = new Map<string, UnitResult[]>();
  for (const u of mine) {
    const list = byVariant.get(u.variant);
    if (list) list.push(u);
    else byVariant.set(u.variant, [u]);
  }
  const wtUnits = mine.filter((u) => wtIds.has(u.variant));
  const out: MetricComparison[] = [];
  for (const def of metrics) {
    const key = `${assay}.${def.id}`;
    const band = options.bands[key];
    if (!band) throw new Error(`No WT-like band defined for metric ${key} (add it to the assay's bands).`);
    const analysisBand: [number, number] = def.scale === 'ratio' ? [Math.log(band[0]), Math.log(band[1])] : band;
    const value = (u: UnitResult) => toAnalysisScale(u.metrics[def.id], def.scale);
    // WT units that enter: a value, and no flag that makes it an extrapolation.
    const wtLeftOut = wtUnits.filter((u) => Number.isFinite(value(u)) && flaggedWith(u, def.excludeFlagged));
    const wtByBatch = new Map<string, UnitResult[]>();
    for (const u of wtUnits) {
      if (!Number.isFinite(value(u)) || flaggedWith(u, def.excludeFlagged)) continue;
      const list = wtByBatch.get(u.batch);
      if (list) list.push(u);
      else wtByBatch.set(u.batch, [u]);
    }
    for (const v of options.variants) {
      if (v.isWT) continue;
      const vUnits = byVariant.get(v.id);
      if (!vUnits || vUnits.length === 0) continue;
      const flags: Flag[] = [];
      const notEstimable = vUnits.filter((u) => !Number.isFinite(value(u)));
      if (notEstimable.length > 0) {
        flags.push(ANALYSIS_MSG.unitsNotEstimable(notEstimable.length, vUnits.length, def.label, listUnits(notEstimable)));
      }
      const valued = vUnits.filter((u) => Number.isFinite(value(u)));
      const extrapolated = valued.filter((u) => flaggedWith(u, def.excludeFlagged));
      const batches = [...new Set(valued.map((u) => u.batch))].sort();
      const pairedWt = batches.flatMap((b) => wtByBatch.get(b) ?? []);
      const wtOut = wtLeftOut.filter((u) => batches.includes(u.batch));
      if (wtOut.length > 0) {
        const first = flaggedWith(wtOut[0]!, def.excludeFlagged)!;
        flags.push(ANALYSIS_MSG.wtUnitsLeftOut(wtOut.length, listUnits(wtOut), first));
      }
      const base = {
        assay,
        metric: def.id,
        variant: v.id,
        scale: def.scale,
        unit: def.unit,
        band,
        q: null,
        call: 'not estimable' as const,
        sentence: '',
      };
      if (extrapolated.length > 0) {
        const first = flaggedWith(extrapolated[0]!, def.excludeFlagged)!;
        flags.push(ANALYSIS_MSG.passedOn(first, extrapolated.length, valued.length, listUnits(extrapolated), def.label));
        out.push({
          ...base,
          effect: null,
          ciLow: null,
          ciHigh: null,
          se: null,
          df: null,
          variance: null,
          pBeyond: null,
          pWithin: null,
          nVariantUnits: valued.length,
          nWtUnits: pairedWt.length,
          variantMean: null,
          wtMean: null,
          batches,
          flags,
        });
        continue;
      }
      const perBatch = batches.map((b) => ({
        batch: b,
        variant: valued.filter((u) => u.batch === b).map(value),
        wt: (wtByBatch.get(b) ?? []).map(value),
      }));
      const otherWt = [...wtByBatch.entries()].filter(([b]) => !batches.includes(b)).map(([, us]) => us.map(value));
      const effect = pairedEffect({ confidenceLevel: options.confidenceLevel, batches: perBatch, otherWt });
      const unpaired = perBatch.filter((b) => b.variant.length > 0 && b.wt.length === 0).map((b) => b.batch);
      if (unpaired.length > 0) {
        flags.push(ANALYSIS_MSG.batchWithoutWt(unpaired, def.label));
      }
      if (effect && effect.se === null) {
        flags.push(ANALYSIS_MSG.noResidualDf(effect.nVariant, effect.nWt));
      }
      if (effect && effect.se !== null && effect.variance === 'pooled') {
        flags.push(ANALYSIS_MSG.variancePooled(effect.nVariant));
      }
      const enteredVariant = valued.filter((u) => (wtByBatch.get(u.batch) ?? []).length > 0);
      const enteredWt = (effect?.batchesUsed ?? []).flatMap((b) => wtByBatch.get(b) ?? []);
      for (const code of def.carryFlags ?? []) {
        const vFlagged = enteredVariant.filter((u) => u.flags.some((f) => f.code === code));
        const wFlagged = enteredWt.filter((u) => u.flags.some((f) => f.code === code));
        if (vFlagged.length + wFlagged.length === 0) continue;
        const sample = [...vFlagged, ...wFlagged][0]!.flags.find((f) => f.code === code)!;
        flags.push(ANALYSIS_MSG.carried(sample, vFlagged.length, enteredVariant.length, wFlagged.length, enteredWt.length));
      }
      const back = (x: number | null) => fromAnalysisScale(x, def.scale);
      const m = (xs: number[]) => back(meanOf(xs));
      out.push({
        ...base,
        effect: effect ? back(effect.estimate) : null,
        ciLow: effect ? back(effect.ciLow) : null,
        ciHigh: effect ? back(effect.ciHigh) : null,
        se: effect?.se ?? null,
        df: effect?.df ?? null,
        variance: effect?.se != null ? effect.variance : null,
        pBeyond: effect ? beyondBandP(effect.estimate, effect.se, effect.df, analysisBand[0], analysisBand[1]) : null,
        pWithin: effect ? withinBandP(effect.estimate, effect.se, effect.df, analysisBand[0], analysisBand[1]) : null,
        nVariantUnits: effect ? effect.nVariant : 0,
        nWtUnits: effect ? effect.nWt : 0,
        variantMean: m(enteredVariant.map(value)),
        wtMean: m(enteredWt.map(value)),
        batches: effect ? effect.batchesUsed : [],
        flags,
      });
    }
  }
  return out;
}
