import { describe, expect, it } from 'vitest';
import { FORCE_SETTINGS as SETTINGS } from '../../src/assays/force/settings.js';
import { FIT } from '../../src/defaults.js';
import { analyseForceUnit, force, pCa50RelativeSe } from '../../src/assays/force/module.js';
import { hillForcePca } from '../../src/numeric/models/hill-force-pca.js';
import type { ForceRow } from '../../src/assays/force/inputs.js';
import { mean, sd } from '../../src/stats/descriptive.js';
import { at, expectChartCompiles, makeStudy, normalSource } from './helpers.js';

/** Invented "true" fibre (typical magnitudes, from memory): passive 2 kPa, Fmax 30 kPa, pCa50 5.8, nH 3. */
const TRUTH = [2, 30, 5.8, 3];
const PCA = [9.0, 6.5, 6.2, 6.0, 5.9, 5.8, 5.7, 5.6, 5.4, 5.0, 4.5];

function fibre(variant: string, unit: string, batch: string, truth: number[], pCas: number[], noise?: () => number): ForceRow[] {
  return pCas.map((pCa, i) => ({
    variant,
    unit,
    batch,
    pCa,
    tensionKPa: hillForcePca.f(pCa, truth) + (noise ? noise() : 0),
    at: at('force.csv', i + 2),
  }));
}

describe('force: normalised force and curve', () => {
  it('puts the 10%, 50% and 90% points where the Hill check values say', () => {
    // Computed from the Hill equation [C]: F(pCa50) is half-maximal; 10% and 90% at pCa50 ± log10(9)/nH (nH = 3: ±0.3181).
    const pCas = [...PCA, 5.8 + 0.3181, 5.8 - 0.3181];
    const r = analyseForceUnit(fibre('wt', 'f1', 'b1', TRUTH, pCas), SETTINGS.forceMinPoints);
    expect(r.fit!.converged).toBe(true);
    const norm = (pCa: number) => r.plot.points.find((p) => p.pCa === pCa)!.normForce as number;
    expect(norm(5.8)).toBeCloseTo(0.5, 6);
    expect(norm(5.8 + 0.3181)).toBeCloseTo(0.1, 3);
    expect(norm(5.8 - 0.3181)).toBeCloseTo(0.9, 3);
    expect(r.metrics.pCa50).toBeCloseTo(5.8, 6);
    expect(r.metrics.fmax).toBeCloseTo(30, 5);
    expect(r.metrics.passive).toBeCloseTo(2, 5);
    expect(r.metrics.nH).toBeCloseTo(3, 5);
    // curve spans the measured range plus 0.25 pCa on each side, high pCa first
    const curve = r.plot.curve!;
    expect(curve[0]!.pCa).toBeCloseTo(9.25, 9);
    expect(curve[curve.length - 1]!.pCa).toBeCloseTo(4.25, 9);
    expect(curve[0]!.normForce as number).toBeCloseTo(0, 6);
    expect(curve[curve.length - 1]!.normForce as number).toBeCloseTo(1, 3);
    expect(r.flags).toEqual([]);
  });

  it('converts pCa50 SE to a relative SE of [Ca²⁺]50', () => {
    // Delta method, computed: ln(10)·0.1 = 0.230259
    expect(pCa50RelativeSe(0.1)).toBeCloseTo(0.230259, 6);
  });
});

describe('force: recovery of known truth from seeded noisy fibres', () => {
  it('recovers Fmax, pCa50, nH and passive, with honest standard errors', () => {
    const normal = normalSource(1234);
    const noiseSd = 0.6; // kPa, invented
    const pCas = [...PCA, ...PCA]; // duplicate readings per pCa (technical replicates)
    const fits = Array.from({ length: 40 }, (_, i) =>
      analyseForceUnit(fibre('wt', `f${i}`, 'b1', TRUTH, pCas, () => normal(0, noiseSd)), SETTINGS.forceMinPoints),
    );
    expect(fits.every((f) => f.fit!.converged)).toBe(true);
    const names = ['passive', 'fmax', 'pCa50', 'nH'];
    names.forEach((name, j) => {
      const estimates = fits.map((f) => f.metrics[name] as number);
      const ses = fits.map((f) => f.metricSe![name] as number);
      const empiricalSd = sd(estimates);
      // Known truth of the simulation: the mean of 40 estimates is within 4 empirical SE of the truth.
      expect(Math.abs(mean(estimates) - TRUTH[j]!)).toBeLessThan((4 * empiricalSd) / Math.sqrt(40));
      // Asymptotic SEs agree with the spread across simulated fibres within a factor 1.5 (common practice, no source).
      expect(mean(ses) / empiricalSd).toBeGreaterThan(1 / 1.5);
      expect(mean(ses) / empiricalSd).toBeLessThan(1.5);
    });
    // pCa50 is precise at this noise: every fibre within 0.05 of 5.8
    fits.forEach((f) => expect(Math.abs((f.metrics.pCa50 as number) - 5.8)).toBeLessThan(0.05));
    expect(fits[0]!.nTechnical).toBe(pCas.length);
  });
});

describe('force: flags', () => {
  it('flags pCa50 outside the measured range', () => {
    // Noiseless, measured only on the relaxed side of pCa50 = 5.8 (nH 1.5, so the curve is still informative).
    const truth = [1, 25, 5.8, 1.5];
    const r = analyseForceUnit(fibre('wt', 'f1', 'b1', truth, [5.9, 6.0, 6.1, 6.2, 6.4, 6.6, 7.0, 8.0]), SETTINGS.forceMinPoints);
    expect(r.fit!.converged).toBe(true);
    expect(r.metrics.pCa50).toBeCloseTo(5.8, 4);
    expect(r.flags.map((f) => f.code)).toContain('pca50-out-of-range');
  });

  it('flags too few pCa points', () => {
    const r = analyseForceUnit(fibre('wt', 'f1', 'b1', TRUTH, [9, 6.2, 5.8, 5.4, 4.5]), SETTINGS.forceMinPoints);
    expect(r.flags.map((f) => f.code)).toContain('too-few-points');
  });

  it('reports no values for a fit that does not converge, and flags it', () => {
    // A flat record (no calcium response): Fmax → 0 leaves pCa50 and nH undetermined.
    const rows = PCA.map((pCa, i) => ({ variant: 'wt', unit: 'f1', batch: 'b1', pCa, tensionKPa: 3, at: at('force.csv', i + 2) }));
    const r = analyseForceUnit(rows, SETTINGS.forceMinPoints);
    expect(r.fit!.converged).toBe(false);
    expect(r.metrics).toEqual({ fmax: null, pCa50: null, nH: null, passive: null });
    expect(r.flags.map((f) => f.code)).toContain('not-converged');
    expect(r.plot.curve).toEqual([]);
  });

  it('flags poorly determined parameters exactly when a relative SE exceeds FIT.maxRelativeSe', () => {
    const normal = normalSource(99);
    // Few, very noisy points (SD 8 kPa on a 30 kPa curve), 12 seeded fibres: the flag must follow the rule,
    // and at this noise at least one fibre must be flagged.
    let flagged = 0;
    for (let i = 0; i < 12; i++) {
      const r = analyseForceUnit(fibre('wt', `f${i}`, 'b1', TRUTH, [9, 6.2, 6.0, 5.8, 5.6, 5.4, 4.5], () => normal(0, 8)), SETTINGS.forceMinPoints);
      if (!r.fit!.converged) {
        expect(r.flags.map((f) => f.code)).toContain('not-converged');
        continue;
      }
      const rel = ['fmax', 'nH'].map((n) => Math.abs((r.metricSe![n] ?? Infinity) / (r.metrics[n] as number)));
      rel.push(pCa50RelativeSe(r.metricSe!.pCa50 ?? Infinity));
      const hasFlag = r.flags.some((f) => f.code === 'poorly-determined');
      expect(hasFlag).toBe(Math.max(...rel) > FIT.maxRelativeSe);
      if (hasFlag) flagged++;
    }
    expect(flagged).toBeGreaterThan(0);
  });
});

describe('force module', () => {
  it('analyses a study per preparation, reads forceMinPoints from settings, and charts variant beside WT', () => {
    const rows = [...fibre('wt', 'f1', 'b1', TRUTH, PCA), ...fibre('v1', 'f2', 'b1', [2, 36, 5.95, 3], PCA)];
    const units = force.analyse(makeStudy({ 'force-pca': rows }));
    expect(units.map((u) => [u.variant, u.unit, u.assay])).toEqual([
      ['wt', 'f1', 'force'],
      ['v1', 'f2', 'force'],
    ]);
    expect(units[1]!.metrics.pCa50).toBeCloseTo(5.95, 5);
    expect(units[1]!.metrics.fmax).toBeCloseTo(36, 4);
    for (const m of force.metrics) expect(m.id in units[0]!.metrics).toBe(true);
    const strict = force.analyse(makeStudy({ 'force-pca': rows }, { forceMinPoints: 20 }));
    expect(strict[0]!.flags.map((f) => f.code)).toContain('too-few-points');
    const spec = force.chart({ variantLabel: 'p.Xaa2Yaa (synthetic)', variantUnits: [units[1]!], wtUnits: [units[0]!] });
    expectChartCompiles(spec);
    expect(JSON.stringify(spec)).toContain('"reverse":true');
  });

  it('states thresholds from src/defaults.ts in the methods', () => {
    const text = force.methods.join(' ');
    expect(text).toContain(`${SETTINGS.forceMinPoints} distinct pCa`);
    expect(text).toContain(`${FIT.maxRelativeSe * 100}%`);
  });
});
