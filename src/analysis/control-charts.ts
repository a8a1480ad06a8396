/**
 * WT control charts: per assay metric, the WT biological-unit values in batch order
 * (the order batches first appear in the input files), judged by the Westgard rules with each
 * batch as one run (src/calibrate/westgard.ts), against the lab-declared long-term baseline
 * (manifest thresholds.wtBaselines) when there is one, else the mean and SD of this study's WT
 * values. Units excluded by the manifest are left out.
 */
import type { AssayModule } from '../assays/types.js';
import { controlChart } from '../calibrate/westgard.js';
import type { ControlChart, UnitResult } from '../results/types.js';
import type { Variant } from '../study/types.js';

export function wtControlCharts(
  module: AssayModule,
  units: UnitResult[],
  variants: Variant[],
  baselines: Record<string, { mean: number; sd: number; source?: string }> = {},
): ControlChart[] {
  const wt = new Set(variants.filter((v) => v.isWT).map((v) => v.id));
  const mine = units.filter((u) => u.assay === module.id && wt.has(u.variant) && !u.excluded);
  return module.metrics.map((def) =>
    controlChart(
      module.id,
      def.id,
      mine
        .map((u) => ({ batch: u.batch, run: u.batch, value: u.metrics[def.id] }))
        .filter((p): p is { batch: string; run: string; value: number } => typeof p.value === 'number' && Number.isFinite(p.value)),
      baselines[`${module.id}.${def.id}`],
    ),
  );
}
