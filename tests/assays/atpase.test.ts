import { describe, expect, it } from 'vitest';
import { kcatOverKmOf } from '../../src/assays/atpase/module.js';
import type { FitResult } from '../../src/numeric/types.js';

describe('kcatOverKmOf (delta method)', () => {
  it('matches R nls refitted with the slope as a parameter (Puromycin, treated)', () => {
    // R 4.2.2, datasets::Puromycin (treated; Bates & Watts 1988): nls(rate ~ Vm*conc/(K + conc)) gives
    // Vm 212.68372516594 (SE 6.947154216963), K 0.06412125365 (SE 0.008280946618), correlation 0.7650836753;
    // nls(rate ~ s*conc/(1 + conc/K)) gives s = Vm/K = 3316.893953 with SE 352.4424381. The delta method on the
    // first fit must give the second fit's SE (a reparametrisation at the same optimum); R's two fits stop about
    // 2e-6 apart (K 0.06412125 against 0.06412138), hence the tolerance.
    const fit: FitResult = {
      modelId: 'michaelis-menten',
      parameters: [
        { name: 'kcat', estimate: 212.68372516594, se: 6.947154216963, ciLow: NaN, ciHigh: NaN },
        { name: 'km', estimate: 0.06412125365, se: 0.008280946618, ciLow: NaN, ciHigh: NaN },
      ],
      rss: 1195.449, residualSd: 10.93, df: 10, r2: NaN, n: 12, iterations: 1, converged: true, stopReason: 'converged-rss',
      correlation: [
        [1, 0.7650836753],
        [0.7650836753, 1],
      ],
    };
    const r = kcatOverKmOf(fit);
    expect(Math.abs(r.estimate / 3316.893953 - 1)).toBeLessThan(1e-5);
    expect(Math.abs(r.se! / 352.4424381 - 1)).toBeLessThan(1e-5);
  });
});
