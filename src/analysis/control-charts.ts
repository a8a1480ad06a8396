/**
 * WT control charts: per assay metric, the WT biological-unit values in batch order
 * (the order batches first appear in the input files), with the established mean and SD
 * from all WT units of the study (the long-term sample SD; Levey & Jennings 1950), and the
 * Westgard rules evaluated with each batch as one run (src/calibrate/westgard.ts).
 * Units excluded by the manifest are left out of the chart.
 */
import type { AssayModule } from '../assays/types.js';
import { establishedFromValues, westgard } from '../calibrate/westgard.js';
import type { ControlChart, UnitResult } from '../results/types.js';
import type { Variant } from '../study/types.js';

export const CONTROL_CHART_BASELINE = 'Mean and sample SD of all WT units in this study (no lab-declared baseline).';

export function wtControlCharts(module: AssayModule, units: UnitResult[], variants: Variant[]): ControlChart[] {
  const wt = new Set(variants.filter((v) => v.isWT).map((v) => v.id));
  const mine = units.filter((u) => u.assay === module.id && wt.has(u.variant) && !u.excluded);
  const charts: ControlChart[] = [];
  for (const def of module.metrics) {
    const points = mine
      .map((u) => ({ batch: u.batch, run: u.batch, value: u.metrics[def.id] }))
      .filter((p): p is { batch: string; run: string; value: number } => typeof p.value === 'number' && Number.isFinite(p.value));
    const established = establishedFromValues(points.map((p) => p.value));
    if (!established || points.length < 2) {
      charts.push({ assay: module.id, metric: def.id, mean: null, sd: null, baseline: `${CONTROL_CHART_BASELINE} Too few WT values for a chart.`, points: [], rejectedBatches: [], warningBatches: [] });
      continue;
    }
    const result = westgard(points, established);
    charts.push({
      assay: module.id,
      metric: def.id,
      mean: established.mean,
      sd: established.sd,
      baseline: CONTROL_CHART_BASELINE,
      points: result.points,
      rejectedBatches: result.rejectedBatches,
      warningBatches: result.warningBatches,
    });
  }
  return charts;
}
