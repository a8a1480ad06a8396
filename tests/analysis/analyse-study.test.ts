/**
 * analyseStudy plumbing on constructed unit results (no fitting): exclusions, Westgard
 * rejections flagging the variants compared in a batch, calibration counts from control calls.
 * The numbers are constructed for each branch (no external source needed: these are our rules).
 */
import { describe, expect, it } from 'vitest';
import { analyseStudy } from '../../src/analysis/analyse-study.js';
import { atpase } from '../../src/assays/atpase/module.js';
import type { AtpaseRateRow } from '../../src/assays/atpase/inputs.js';
import type { UnitResult } from '../../src/results/types.js';
import type { Exclusion, Study, Variant } from '../../src/study/types.js';

const at = { file: 'constructed.csv' };

function unit(variant: string, unitName: string, batch: string, kcat: number): UnitResult {
  return { assay: 'atpase', variant, unit: unitName, batch, metrics: { kcat, km: 40, basal: 0.03 }, flags: [], nTechnical: 24, plot: { points: [] }, source: [at] };
}

function variant(id: string, control?: Variant['control']): Variant {
  return { id, gene: 'G', isWT: id === 'WT', hgvs: id, short: id, label: id, at, ...(control ? { control } : {}) };
}

function study(variants: Variant[], exclusions: Exclusion[] = []): Study {
  return {
    title: 't', lab: 'l', dates: [], synthetic: true, genes: [], variants, direction: 'hypercontractile',
    thresholds: {}, exclusions, caveats: [], settings: {}, files: [],
    rows: { 'atpase-rates': [{ variant: 'WT', unit: 'x', batch: 'b', actinUM: 0, ratePerS: 0, at } as AtpaseRateRow] },
    manifestRaw: {}, manifestSha256: '0'.repeat(64),
  };
}

const options = (units: UnitResult[]) => ({ toolVersion: 't', builtAt: '1970-01-01T00:00:00.000Z', assays: [atpase], units });

describe('analyseStudy on constructed units', () => {
  it('excluded units stay in the results with their reason but leave the statistics', () => {
    const units = [
      unit('WT', 'w1', 'b1', 5), unit('WT', 'w2', 'b1', 5.2), unit('WT', 'w3', 'b1', 4.9),
      unit('A', 'a1', 'b1', 7), unit('A', 'a2', 'b1', 7.2), unit('A', 'a3', 'b1', 20),
    ];
    const r = analyseStudy(
      study([variant('WT'), variant('A')], [{ kind: 'unit', unit: 'a3', reason: 'bubble in the well', at }]),
      options(units),
    );
    expect(r.units.find((u) => u.unit === 'a3')?.excluded).toBe('bubble in the well');
    const kcat = r.comparisons.find((c) => c.variant === 'A' && c.metric === 'kcat')!;
    expect(kcat.nVariantUnits).toBe(2);
    expect(kcat.effect!).toBeCloseTo(Math.exp((Math.log(7) + Math.log(7.2)) / 2 - (Math.log(5) + Math.log(5.2) + Math.log(4.9)) / 3), 12);
    expect(r.variants.find((v) => v.id === 'A')!.flags.map((f) => f.message).join(' ')).toContain('bubble in the well');
    expect(r.exclusions).toEqual([{ kind: 'unit', unit: 'a3', reason: 'bubble in the well' }]);
  });

  it('a batch whose WT values break R-4s flags every variant compared in it, and only those', () => {
    // Ten batches of two WT units near 5 s⁻¹; batch b5 holds one far above and one far below:
    // sample SD of all 20 ≈ 0.34, so b5's values sit near ±2.9 SD (R-4s within one run).
    const units: UnitResult[] = [];
    for (let b = 1; b <= 10; b++) {
      const lo = b === 5 ? 4 : 5 - 0.05 * (b % 3);
      const hi = b === 5 ? 6 : 5 + 0.05 * (b % 2);
      units.push(unit('WT', `w${b}a`, `b${b}`, lo), unit('WT', `w${b}b`, `b${b}`, hi));
    }
    units.push(unit('A', 'a1', 'b5', 5), unit('A', 'a2', 'b5', 5.1), unit('B', 'b1', 'b2', 5), unit('B', 'b2', 'b2', 5.1));
    const r = analyseStudy(study([variant('WT'), variant('A'), variant('B')]), options(units));
    const chart = r.controlCharts.find((c) => c.metric === 'kcat')!;
    expect(chart.rejectedBatches).toContain('b5');
    expect(chart.points.filter((p) => p.batch === 'b5').flatMap((p) => p.rules)).toContain('R-4s');
    expect(r.variants.find((v) => v.id === 'A')!.flags.some((f) => f.code === 'wt-qc-rejected')).toBe(true);
    expect(r.variants.find((v) => v.id === 'B')!.flags.some((f) => f.code === 'wt-qc-rejected')).toBe(false);
  });

  it('counts control readouts into the calibration and gives controls no evidence for themselves', () => {
    const units: UnitResult[] = [];
    const variants = [variant('WT')];
    for (let b = 1; b <= 3; b++) units.push(unit('WT', `w${b}a`, `b${b}`, 5), unit('WT', `w${b}b`, `b${b}`, 5.1), unit('WT', `w${b}c`, `b${b}`, 4.95));
    // Two pathogenic controls clearly up (hypercontractile), two benign controls flat.
    const plan: Array<[string, number, Variant['control']]> = [
      ['P1', 2, { class: 'pathogenic', source: 'constructed' }],
      ['P2', 1.8, { class: 'likely pathogenic', source: 'constructed' }],
      ['N1', 1, { class: 'benign', source: 'constructed' }],
      ['N2', 1.01, { class: 'likely benign', source: 'constructed' }],
    ];
    for (const [id, ratio, control] of plan) {
      variants.push(variant(id, control));
      for (let b = 1; b <= 3; b++) units.push(unit(id, `${id}-${b}a`, `b${b}`, 5 * ratio), unit(id, `${id}-${b}b`, `b${b}`, 5.05 * ratio));
    }
    variants.push(variant('X'));
    for (let b = 1; b <= 3; b++) units.push(unit('X', `x${b}a`, `b${b}`, 9), unit('X', `x${b}b`, `b${b}`, 9.1));
    const r = analyseStudy(study(variants), options(units));
    const cal = r.calibration.find((c) => c.scope === 'atpase')!;
    expect(cal.counts).toEqual({ pathogenicAbnormal: 2, pathogenicNormal: 0, benignAbnormal: 0, benignNormal: 2, notCounted: 0 });
    expect(r.variants.find((v) => v.id === 'P1')!.evidence.level).toBe('none');
    const x = r.variants.find((v) => v.id === 'X')!;
    expect(x.overall.readout).toBe('abnormal');
    // 2P + 2B with perfect separation, pseudo-count pair: OddsPath = nP·(nB+1)/(nP+1) = 2·3/3 = 2.0 (closed form of Brnich et al. 2020) → no evidence.
    expect(r.calibration.find((c) => c.scope === 'overall')!.oddsPathAbnormal).toBeCloseTo(2.0, 12);
    expect(x.evidence.level).toBe('none');
  });
});

describe('lab-declared WT baseline (thresholds.wtBaselines)', () => {
  it('judges the WT values against the declared mean and SD and says so', () => {
    // Declared mean 4.0, SD 0.2; WT values near 5.0 sit ~5 SD above: 1-3s in every batch (constructed).
    const units: UnitResult[] = [];
    for (let b = 1; b <= 3; b++) units.push(unit('WT', `w${b}a`, `b${b}`, 5), unit('WT', `w${b}b`, `b${b}`, 5.05));
    units.push(unit('A', 'a1', 'b2', 6), unit('A', 'a2', 'b2', 6.1));
    const s = study([variant('WT'), variant('A')]);
    s.thresholds = { wtBaselines: { 'atpase.kcat': { mean: 4, sd: 0.2, source: 'WT runs of the previous year' } } };
    const r = analyseStudy(s, options(units));
    const chart = r.controlCharts.find((c) => c.metric === 'kcat')!;
    expect(chart.mean).toBe(4);
    expect(chart.sd).toBe(0.2);
    expect(chart.baseline).toContain('declared by the lab');
    expect(chart.baseline).toContain('WT runs of the previous year');
    expect(chart.rejectedBatches).toEqual(['b1', 'b2', 'b3']);
    expect(r.variants.find((v) => v.id === 'A')!.flags.some((f) => f.code === 'wt-qc-rejected')).toBe(true);
    // Metrics without a declared baseline still use the study's own WT values.
    expect(r.controlCharts.find((c) => c.metric === 'km')!.baseline).not.toContain('declared by the lab');
  });
});
