import { describe, expect, it } from 'vitest';
import { assayCall, callComparisons, metricCall, readoutOf, variantCall } from '../../src/analysis/score.js';
import type { MetricComparison, MetricDef } from '../../src/results/types.js';
import { benjaminiHochberg } from '../../src/stats/bh.js';

// The scoring rules are ours (common practice, no source): these tests pin each branch.
const band: [number, number] = [0.8, 1.25];
const OPTIONS = { qThreshold: 0.05, equivalenceAlpha: 0.05 };

describe('metricCall', () => {
  it.each([
    // effect, q (beyond band), pWithin (TOST), expected
    [1.5, 0.01, 0.99, 'increased'],
    [0.6, 0.01, 0.99, 'decreased'],
    [1.5, 0.2, 0.9, 'indeterminate'], // outside the band but not shown beyond it
    [1.2, 0.6, 0.2, 'indeterminate'], // inside the band but not shown inside it
    [1.0, 0.9, 0.01, 'within WT range'],
    [1.0, null, null, 'indeterminate'], // no interval
    [null, null, null, 'not estimable'],
  ] as const)('effect %s q %s pWithin %s → %s', (effect, q, pWithin, expected) => {
    expect(metricCall({ effect, q, pWithin, band }, OPTIONS)).toBe(expected);
  });
});

const defs: MetricDef[] = [
  { id: 'kcat', label: 'kcat', unit: 's⁻¹', scale: 'ratio', hyper: 'up', primary: true, description: '' },
  { id: 'srx', label: 'slow fraction', unit: '', scale: 'difference', hyper: 'down', primary: true, description: '' },
  { id: 'km', label: 'KM', unit: 'µM', scale: 'ratio', hyper: 'none', primary: false, description: '' },
];

function comp(metric: string, call: MetricComparison['call'], effect = 1, variant = 'v', pBeyond: number | null = null): MetricComparison {
  return {
    assay: 'a', metric, variant, scale: metric === 'srx' ? 'difference' : 'ratio', unit: '', effect, ciLow: null, ciHigh: null,
    se: null, df: null, variance: null, pBeyond, q: null, pWithin: null, nVariantUnits: 3, nWtUnits: 6,
    variantMean: null, wtMean: null, batches: ['b1'], band: metric === 'srx' ? [-0.1, 0.1] : band, call, sentence: '', flags: [],
  };
}

describe('callComparisons (multiplicity)', () => {
  const defsMap = new Map(defs.map((d) => [`a.${d.id}`, d]));
  it('adjusts by Benjamini–Hochberg across test variants only; each control as if added to them', () => {
    const tests = [0.001, 0.02, 0.03, 0.5].map((p, i) => comp('km', 'not estimable', 2, `t${i}`, p));
    const control = comp('km', 'not estimable', 2, 'c1', 0.004);
    const out = callComparisons([...tests, control], defsMap, { ...OPTIONS, controls: new Set(['c1']) });
    // Test variants: as if the control were not there.
    const bh = benjaminiHochberg([0.001, 0.02, 0.03, 0.5]);
    out.slice(0, 4).forEach((c, i) => expect(c.q).toBeCloseTo(bh[i]!, 12));
    // The control: its p within the test family plus itself.
    expect(out[4]!.q).toBeCloseTo(benjaminiHochberg([0.001, 0.02, 0.03, 0.5, 0.004])[4]!, 12);
  });

  it('adjusts primary metrics by Holm across the variant’s primary metrics, after Benjamini–Hochberg', () => {
    // One test variant: BH leaves each p as it is; Holm over its two primary metrics doubles the smaller.
    const out = callComparisons(
      [comp('kcat', 'not estimable', 1.5, 'v', 0.03), comp('srx', 'not estimable', -0.2, 'v', 0.04), comp('km', 'not estimable', 2, 'v', 0.03)],
      defsMap,
      { ...OPTIONS, controls: new Set() },
    );
    expect(out[0]!.q).toBeCloseTo(0.06, 12);
    expect(out[1]!.q).toBeCloseTo(0.06, 12);
    expect(out[2]!.q).toBeCloseTo(0.03, 12); // KM is not primary: BH only
    expect(out.map((c) => c.call)).toEqual(['indeterminate', 'indeterminate', 'increased']);
    expect(out[0]!.sentence).toContain("this variant's 2 primary metrics");
  });
});

describe('assayCall', () => {
  it('maps a metric whose hyper direction is down: decreased slow fraction is hypercontractile', () => {
    expect(assayCall('a', 'v', [comp('kcat', 'within WT range'), comp('srx', 'decreased', -0.2)], defs, 'hypercontractile').call).toBe('hypercontractile');
  });
  it('changes in both directions are mixed', () => {
    expect(assayCall('a', 'v', [comp('kcat', 'increased', 1.5), comp('srx', 'increased', 0.2)], defs, 'hypercontractile').call).toBe('mixed');
  });
  it('all primary metrics within range → within WT range, ignoring non-primary metrics', () => {
    expect(assayCall('a', 'v', [comp('kcat', 'within WT range'), comp('srx', 'within WT range'), comp('km', 'increased', 2)], defs, 'either').call).toBe('within WT range');
  });
  it('no change and something unclear → indeterminate', () => {
    expect(assayCall('a', 'v', [comp('kcat', 'within WT range'), comp('srx', 'indeterminate')], defs, 'either').call).toBe('indeterminate');
  });
  it('no comparison → not measured', () => {
    expect(assayCall('a', 'v', [], defs, 'either').call).toBe('not measured');
  });
  it('sentence states the numbers', () => {
    expect(assayCall('a', 'v', [comp('kcat', 'increased', 1.5)], defs, 'either').sentence).toContain('1.50×');
  });
});

describe('variantCall and readout', () => {
  const ac = (assay: string, call: any) => ({ assay, variant: 'v', call, sentence: '', readout: null });
  it('combines assays; not-measured assays are ignored', () => {
    expect(variantCall([ac('x', 'hypercontractile'), ac('y', 'not measured')], {}, 'hypercontractile').call).toBe('hypercontractile');
    expect(variantCall([ac('x', 'hypercontractile'), ac('y', 'hypocontractile')], {}, 'either').call).toBe('mixed');
    expect(variantCall([ac('x', 'within WT range'), ac('y', 'within WT range')], {}, 'either').call).toBe('within WT range');
    expect(variantCall([ac('x', 'within WT range'), ac('y', 'indeterminate')], {}, 'either').call).toBe('indeterminate');
  });

  it('says how many of the measured assays changed, not only how many were measured', () => {
    const labels = { x: 'ATPase', y: 'Motility', z: 'Turnover' };
    expect(variantCall([ac('x', 'within WT range'), ac('y', 'within WT range'), ac('z', 'hypercontractile'), ac('w', 'not measured')], labels, 'either').sentence).toBe(
      'Hypercontractile overall, from a change in 1 of 3 assays measured: ATPase within WT range; Motility within WT range; Turnover hypercontractile.',
    );
    expect(variantCall([ac('x', 'within WT range'), ac('y', 'within WT range')], labels, 'either').sentence).toBe(
      'Within WT range overall, from no change in any of the 2 assays measured: ATPase within WT range; Motility within WT range.',
    );
    expect(variantCall([ac('x', 'indeterminate')], labels, 'either').sentence).toBe('Indeterminate overall, from no change in the one assay measured: ATPase indeterminate.');
    expect(variantCall([ac('x', 'hypocontractile'), ac('y', 'hypercontractile')], labels, 'either').sentence).toBe(
      'Mixed overall, from a change in 2 of 2 assays measured: ATPase hypocontractile; Motility hypercontractile.',
    );
  });
  it.each([
    ['hypercontractile', 'hypercontractile', 'abnormal'],
    ['hypocontractile', 'hypercontractile', null],
    ['mixed', 'hypercontractile', null],
    ['mixed', 'either', 'abnormal'],
    ['within WT range', 'hypocontractile', 'normal'],
    ['indeterminate', 'either', null],
    ['hypocontractile', 'hypocontractile', 'abnormal'],
  ] as const)('%s under direction %s → %s', (call, dir, expected) => {
    expect(readoutOf(call, dir)).toBe(expected);
  });
});
