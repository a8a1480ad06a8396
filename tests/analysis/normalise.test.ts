import { describe, expect, it } from 'vitest';
import { compareAssay } from '../../src/analysis/normalise.js';
import { pairedEffect } from '../../src/analysis/paired-effect.js';
import type { Flag, MetricDef, UnitResult } from '../../src/results/types.js';

// Rules of the comparison (common practice, no source): these tests pin each one.
const KCAT: MetricDef = { id: 'kcat', label: 'kcat', unit: 's⁻¹', scale: 'ratio', hyper: 'up', primary: true, description: '', excludeFlagged: ['km-above-range'], carryFlags: ['too-few-points'] };
const SLOPE: MetricDef = { id: 'slope', label: 'kcat/KM', unit: 'µM⁻¹·s⁻¹', scale: 'ratio', hyper: 'none', primary: false, description: '' };
const BASAL: MetricDef = { id: 'basal', label: 'basal', unit: 's⁻¹', scale: 'difference', hyper: 'none', primary: false, description: '' };
const OPTIONS = {
  confidenceLevel: 0.95,
  bands: { 'atpase.kcat': [0.8, 1.25] as [number, number], 'atpase.slope': [0.67, 1.5] as [number, number], 'atpase.basal': [-0.01, 0.01] as [number, number] },
  variants: [
    { id: 'WT', isWT: true },
    { id: 'V', isWT: false },
  ],
};

function unit(variant: string, name: string, batch: string, kcat: number, slope: number, basal: number, flags: Flag[] = []): UnitResult {
  return { assay: 'atpase', variant, unit: name, batch, metrics: { kcat, slope, basal }, flags, nTechnical: 24, plot: { points: [] }, source: [] };
}
const flag = (code: string): Flag => ({ code, severity: 'warning', message: `${code} (test).` });

const WT_UNITS = [
  unit('WT', 'w1', 'A', 5.0, 0.11, 0.03),
  unit('WT', 'w2', 'A', 5.3, 0.1, 0.032),
  unit('WT', 'w3', 'B', 4.8, 0.12, 0.028),
  unit('WT', 'w4', 'B', 5.1, 0.1, 0.031),
  unit('WT', 'w5', 'C', 4.9, 0.11, 0.029),
  unit('WT', 'w6', 'C', 5.2, 0.1, 0.03),
];

describe('compareAssay', () => {
  it('gives no kcat comparison when a variant preparation is flagged as extrapolated, and compares kcat/KM as usual', () => {
    const units = [...WT_UNITS, unit('V', 'v1', 'A', 9, 0.05, 0.03, [flag('km-above-range')]), unit('V', 'v2', 'A', 6, 0.06, 0.03), unit('V', 'v3', 'B', 6.2, 0.05, 0.03)];
    const [kcat, slope] = compareAssay('atpase', [KCAT, SLOPE], units, OPTIONS);
    expect(kcat!.effect).toBeNull();
    expect(kcat!.ciLow).toBeNull();
    expect(kcat!.pBeyond).toBeNull();
    const f = kcat!.flags.find((x) => x.code === 'km-above-range')!;
    expect(f.message).toContain('1 of 3 variant preparations (v1 (A))');
    expect(f.message).toContain('not compared');
    expect(slope!.effect).not.toBeNull();
    expect(slope!.nVariantUnits).toBe(3);
  });

  it('leaves a flagged WT preparation out of kcat, names it, and keeps it for the other metrics', () => {
    const units = [...WT_UNITS.map((u) => (u.unit === 'w1' ? { ...u, flags: [flag('km-above-range')] } : u)), unit('V', 'v1', 'A', 6, 0.06, 0.03), unit('V', 'v2', 'B', 6.2, 0.05, 0.03)];
    const [kcat, slope] = compareAssay('atpase', [KCAT, SLOPE], units, OPTIONS);
    expect(kcat!.nWtUnits).toBe(3); // w2 of A, w3 and w4 of B
    expect(kcat!.flags.find((x) => x.code === 'wt-units-left-out')!.message).toContain('w1 (A)');
    expect(slope!.nWtUnits).toBe(4);
  });

  it('counts flags that qualify the values on the row', () => {
    const units = [...WT_UNITS, unit('V', 'v1', 'A', 6, 0.06, 0.03, [flag('too-few-points')]), unit('V', 'v2', 'B', 6.2, 0.05, 0.03)];
    const [kcat] = compareAssay('atpase', [KCAT], units, OPTIONS);
    expect(kcat!.flags.find((x) => x.code === 'too-few-points')!.message).toContain('1 of 2 variant and 0 of 4 WT preparations');
  });

  it('lets WT of batches without the variant inform WT’s variance only, and states geometric means for ratio metrics', () => {
    const units = [...WT_UNITS, unit('V', 'v1', 'A', 6, 0.06, 0.03), unit('V', 'v2', 'A', 6.4, 0.05, 0.02), unit('V', 'v3', 'B', 6.2, 0.05, 0.04)];
    const [kcat] = compareAssay('atpase', [KCAT], units, OPTIONS);
    const ln = Math.log;
    const direct = pairedEffect({
      batches: [
        { batch: 'A', variant: [ln(6), ln(6.4)], wt: [ln(5.0), ln(5.3)] },
        { batch: 'B', variant: [ln(6.2)], wt: [ln(4.8), ln(5.1)] },
      ],
      otherWt: [[ln(4.9), ln(5.2)]],
      confidenceLevel: 0.95,
    })!;
    expect(kcat!.effect).toBeCloseTo(Math.exp(direct.estimate), 12);
    expect(kcat!.nWtUnits).toBe(4);
    expect(kcat!.batches).toEqual(['A', 'B']);
    expect(kcat!.variantMean).toBeCloseTo(Math.cbrt(6 * 6.4 * 6.2), 12);
    expect(kcat!.wtMean).toBeCloseTo((5.0 * 5.3 * 4.8 * 5.1) ** 0.25, 12);
    expect(kcat!.unit).toBe('s⁻¹');
  });

  it('compares a difference metric in its own units, negative values kept', () => {
    const units = [...WT_UNITS, unit('V', 'v1', 'A', 6, 0.06, -0.004), unit('V', 'v2', 'A', 6.4, 0.05, 0.002), unit('V', 'v3', 'B', 6.2, 0.05, -0.001)];
    const [basal] = compareAssay('atpase', [BASAL], units, OPTIONS);
    expect(basal!.nVariantUnits).toBe(3);
    expect(basal!.variantMean).toBeCloseTo((-0.004 + 0.002 - 0.001) / 3, 12);
    expect(basal!.effect!).toBeLessThan(-0.025);
    expect(basal!.ciLow!).toBeLessThan(basal!.effect!);
  });
});
