import { describe, expect, it } from 'vitest';
import { assayCall, metricCall, readoutOf, variantCall } from '../../src/analysis/score.js';
import type { MetricComparison, MetricDef } from '../../src/results/types.js';

// The scoring rules are ours (DESIGN.md §6; common practice, no source): these tests pin each branch.
const band: [number, number] = [0.8, 1.25];

describe('metricCall', () => {
  it.each([
    // effect, ciLow, ciHigh, q, expected
    [1.5, 1.3, 1.7, 0.01, 'increased'],
    [0.6, 0.5, 0.7, 0.01, 'decreased'],
    [1.5, 0.9, 2.5, 0.2, 'indeterminate'], // outside band but not significant
    [1.2, 1.1, 1.3, 0.001, 'indeterminate'], // significant but inside the band, CI crosses it
    [1.0, 0.9, 1.1, 0.9, 'within WT range'],
    [1.0, 0.8, 1.25, 0.9, 'within WT range'], // CI on the band edges counts as inside
    [1.0, null, null, null, 'indeterminate'], // no interval
    [null, null, null, null, 'not estimable'],
  ] as const)('effect %s CI [%s, %s] q %s → %s', (effect, lo, hi, q, expected) => {
    expect(metricCall(effect, lo, hi, q, band, 0.05)).toBe(expected);
  });
});

const defs: MetricDef[] = [
  { id: 'kcat', label: 'kcat', unit: 's⁻¹', scale: 'ratio', hyper: 'up', primary: true, description: '' },
  { id: 'srx', label: 'slow fraction', unit: '', scale: 'difference', hyper: 'down', primary: true, description: '' },
  { id: 'km', label: 'KM', unit: 'µM', scale: 'ratio', hyper: 'none', primary: false, description: '' },
];

function comp(metric: string, call: MetricComparison['call'], effect = 1): MetricComparison {
  return {
    assay: 'a', metric, variant: 'v', scale: metric === 'srx' ? 'difference' : 'ratio', effect, ciLow: null, ciHigh: null,
    p: null, q: null, df: null, nVariantUnits: 3, nWtUnits: 6, batches: ['b1'], band, call, sentence: '', flags: [],
  };
}

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
