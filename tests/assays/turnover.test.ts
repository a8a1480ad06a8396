import { describe, expect, it } from 'vitest';
import { TURNOVER_SETTINGS } from '../../src/assays/turnover/settings.js';
import { FIT } from '../../src/defaults.js';
import { fitTurnoverTrace, resolveOnePhase, turnover, turnoverSettings, analyseTurnoverUnit } from '../../src/assays/turnover/module.js';
import type { TurnoverRow } from '../../src/assays/turnover/inputs.js';
import { mean } from '../../src/stats/descriptive.js';
import { at, expectChartCompiles, makeStudy, normalSource } from './helpers.js';

const SETTINGS = turnoverSettings({});

/** y = scale·[(1 − sf)·e^(−kf·t) + sf·e^(−ks·t)] + offset (+ noise). */
function decay(t: number, sf: number, kf: number, ks: number, scale = 1, offset = 0): number {
  return scale * ((1 - sf) * Math.exp(-kf * t) + sf * Math.exp(-ks * t)) + offset;
}

function times(end: number, step: number): number[] {
  return Array.from({ length: Math.floor(end / step) + 1 }, (_, i) => i * step);
}

function traceRows(variant: string, unit: string, batch: string, trace: string, t: number[], y: number[]): TurnoverRow[] {
  return t.map((timeS, i) => ({ variant, unit, batch, trace, timeS, fluorescence: y[i]!, at: at('turnover.csv', i + 2) }));
}

describe('fitTurnoverTrace', () => {
  it('recovers the double-exponential check curve exactly from noiseless data', () => {
    // Computed from the model [C]: amplitude 1, slow fraction 0.30, k_fast 0.030 s⁻¹, k_slow 0.0034 s⁻¹, offset 0 →
    // 1.0000, 0.36035, 0.10826, 0.014066 at t = 0, 60, 300, 900 s. Here scaled by 500 with offset 120 (invented):
    // normalised fluorescence must reproduce the published check values.
    const t = [...new Set([...times(1800, 10), 60, 300, 900])].sort((a, b) => a - b);
    const y = t.map((s) => decay(s, 0.3, 0.03, 0.0034, 500, 120));
    const rows = traceRows('wt', 'p1', 'b1', 'A', t, y);
    const unit = analyseTurnoverUnit(rows, SETTINGS);
    expect(unit.fit?.converged).toBe(true);
    expect(unit.metrics.slowFraction).toBeCloseTo(0.3, 6);
    expect(unit.metrics.kFast).toBeCloseTo(0.03, 7);
    expect(unit.metrics.kSlow).toBeCloseTo(0.0034, 8);
    const norm = (s: number) => unit.plot.points.find((p) => p.time === s)!.normFluorescence as number;
    expect(norm(0)).toBeCloseTo(1.0, 6);
    expect(norm(60)).toBeCloseTo(0.36035, 5);
    expect(norm(300)).toBeCloseTo(0.10826, 5);
    expect(norm(900)).toBeCloseTo(0.014066, 6);
    expect(unit.flags).toEqual([]);
    expect(unit.modelNote).toBeUndefined();
  });

  it('falls back to a single exponential when the data hold one phase', () => {
    const normal = normalSource(314);
    const t = times(1200, 5);
    const y = t.map((s) => 100 * Math.exp(-0.02 * s) + 10 + normal(0, 0.5));
    const r = fitTurnoverTrace(t, y, SETTINGS, 'Trace S');
    expect(r.model).toBe('single');
    expect(r.single.converged).toBe(true);
    expect(r.kSingle!).toBeCloseTo(0.02, 3); // known truth of the simulation
    expect(r.slowFraction).toBeNull();
    expect(r.kFast).toBeNull();
    const flag = r.flags.find((f) => f.code === 'one-phase-trace')!;
    expect(flag.message).toContain('one phase (k = ');
    expect(flag.message).toContain(' s⁻¹) was resolved');
  });

  it('falls back when the rates are closer than turnoverMinRateRatio, even if the F test favours two phases', () => {
    // Rates 0.02 and 0.008 s⁻¹ (ratio 2.5 < TURNOVER_SETTINGS.turnoverMinRateRatio = 3), nearly noiseless: the F test alone would keep two.
    const normal = normalSource(2718);
    const t = times(1500, 5);
    const y = t.map((s) => decay(s, 0.5, 0.02, 0.008, 100, 5) + normal(0, 0.01));
    const r = fitTurnoverTrace(t, y, SETTINGS);
    expect(r.double.converged).toBe(true);
    expect(param(r.double, 'kFast') / param(r.double, 'kSlow')).toBeLessThan(TURNOVER_SETTINGS.turnoverMinRateRatio);
    expect(r.model).toBe('single');
    expect(r.reason).toContain('rates differ by a factor');
    // and with the ratio rule relaxed to 2, the same trace keeps both phases and recovers the truth
    const relaxed = fitTurnoverTrace(t, y, turnoverSettings({ turnoverMinRateRatio: 2 }));
    expect(relaxed.model).toBe('double');
    expect(relaxed.slowFraction!).toBeCloseTo(0.5, 2);
  });

  it('falls back when an amplitude is not positive (a rise and a decay)', () => {
    const normal = normalSource(11);
    const t = times(1500, 5);
    const y = t.map((s) => 100 * Math.exp(-0.03 * s) - 40 * Math.exp(-0.003 * s) + 60 + normal(0, 0.05));
    const r = fitTurnoverTrace(t, y, SETTINGS);
    expect(r.double.converged).toBe(true);
    expect(r.model).toBe('single');
    expect(r.reason).toContain('amplitude is not positive');
  });

  it('flags a window too short for the slow phase', () => {
    // 1/kSlow = 294 s; the trace ends at 240 s (< TURNOVER_SETTINGS.turnoverMinSlowTimeConstants = 1 time constant).
    const normal = normalSource(5);
    const t = times(240, 1);
    const y = t.map((s) => decay(s, 0.3, 0.05, 0.0034, 100, 0) + normal(0, 0.005));
    const r = fitTurnoverTrace(t, y, SETTINGS);
    expect(r.model).toBe('double');
    expect(r.flags.map((f) => f.code)).toContain('window-too-short');
    // the same rule read from settings: 0.5 time constants is satisfied by 240 s
    const lenient = fitTurnoverTrace(t, y, turnoverSettings({ turnoverMinSlowTimeConstants: 0.5 }));
    expect(lenient.flags.map((f) => f.code)).not.toContain('window-too-short');
  });
});

function param(fit: { parameters: { name: string; estimate: number }[] }, name: string): number {
  return fit.parameters.find((p) => p.name === name)!.estimate;
}

describe('turnover: recovery of known truth from seeded noisy traces', () => {
  it('recovers slow fraction and rates per unit as the mean over traces', () => {
    // Known truth (WT-like, Sarkar et al. 2020: kfast 0.030, kslow 0.0034 s⁻¹; slow fraction 0.30 invented).
    const normal = normalSource(8080);
    const t = times(1800, 4);
    const rows: TurnoverRow[] = [];
    const units = 12;
    for (let u = 0; u < units; u++) {
      for (const trace of ['A', 'B', 'C']) {
        const y = t.map((s) => decay(s, 0.3, 0.03, 0.0034, 1000, 200) + normal(0, 5)); // 0.5% noise
        rows.push(...traceRows('wt', `p${u}`, 'b1', trace, t, y));
      }
    }
    const results = turnover.analyse(makeStudy({ turnover: rows }));
    expect(results).toHaveLength(units);
    for (const r of results) {
      expect(r.nTechnical).toBe(3);
      expect(r.flags.filter((f) => f.code !== 'poorly-determined')).toEqual([]);
      // tolerance: per-trace SE of the slow fraction ≈ 0.003 at this noise (delta-method SE of these fits),
      // so a 3-trace mean has SE ≈ 0.0017; 0.01 is ≈ 6 SE. Rates vary ≈ 1.5% per trace; 5% is generous.
      expect(Math.abs((r.metrics.slowFraction as number) - 0.3)).toBeLessThan(0.01);
      expect(Math.abs((r.metrics.kFast as number) / 0.03 - 1)).toBeLessThan(0.05);
      expect(Math.abs((r.metrics.kSlow as number) / 0.0034 - 1)).toBeLessThan(0.05);
      expect(r.metricSe!.slowFraction).not.toBeNull();
    }
    const sf = results.map((r) => r.metrics.slowFraction as number);
    // mean over 12 units: SE ≈ 0.0005; 0.003 is ≈ 6 SE
    expect(Math.abs(mean(sf) - 0.3)).toBeLessThan(0.003);
  });

  it('averages only estimable traces and says how many fell back', () => {
    const normal = normalSource(77);
    const t = times(1800, 5);
    const two = (sf: number) => t.map((s) => decay(s, sf, 0.03, 0.0034, 1000, 0) + normal(0, 1));
    const one = t.map((s) => 1000 * Math.exp(-0.01 * s) + normal(0, 1));
    const rows = [
      ...traceRows('v1', 'p1', 'b1', 'A', t, two(0.2)),
      ...traceRows('v1', 'p1', 'b1', 'B', t, two(0.4)),
      ...traceRows('v1', 'p1', 'b1', 'C', t, one),
    ];
    const r = turnover.analyse(makeStudy({ turnover: rows }))[0]!;
    expect(r.nTechnical).toBe(3);
    expect(r.fit).toBeUndefined();
    expect(r.metrics.slowFraction as number).toBeCloseTo(0.3, 1.5); // mean of 0.2 and 0.4 (known truth)
    expect(r.modelNote).toContain('double exponential in 2 of 3');
    expect(r.modelNote).toContain('one phase that could not be placed in 1 (no value)');
    // No WT in the study: the one-phase trace cannot be placed, and says so.
    expect(r.flags.filter((f) => f.code === 'one-phase-trace')).toHaveLength(1);
    expect(r.flags.find((f) => f.code === 'one-phase-trace')!.message).toContain('Trace C');
    expect(r.flags.find((f) => f.code === 'no-reference-rates')!.message).toContain('Trace C');
  });
});

describe('turnover: one-phase traces placed against the batch’s WT rates', () => {
  const REFERENCE = { kFast: 0.03, kSlow: 0.0034, source: 'test reference (Sarkar et al. 2020 WT rates)' };

  it('gives a trace with no slow phase a slow fraction near 0, with its standard error', () => {
    // Known truth: one fast phase at the WT fast rate, no slow phase.
    const normal = normalSource(4242);
    const t = times(1800, 10);
    const y = t.map((s) => 100 * Math.exp(-0.03 * s) + 20 + normal(0, 0.6));
    const free = fitTurnoverTrace(t, y, SETTINGS, 'Trace N');
    expect(free.model).toBe('single');
    const r = resolveOnePhase(free, t, y, REFERENCE, 'Trace N');
    expect(r.model).toBe('one-phase');
    expect(r.fixedRate).toEqual({ phase: 'slow', rate: 0.0034 });
    // Tolerance: the slow amplitude's SE at 0.6% noise is well below 0.01 of the total (delta method, this fit).
    expect(Math.abs(r.slowFraction!)).toBeLessThan(0.02);
    expect(r.slowFractionSe!).toBeGreaterThan(0);
    expect(r.slowFractionSe!).toBeLessThan(0.02);
    expect(r.kFast!).toBeCloseTo(0.03, 3);
    expect(r.kSlow).toBeNull();
    expect(r.flags.find((f) => f.code === 'one-phase-trace')!.message).toContain('taken as the fast phase');
  });

  it('gives a trace with only a slow phase a slow fraction near 1', () => {
    const normal = normalSource(99);
    const t = times(1800, 10);
    const y = t.map((s) => 100 * Math.exp(-0.0034 * s) + 20 + normal(0, 0.6));
    const r = resolveOnePhase(fitTurnoverTrace(t, y, SETTINGS), t, y, REFERENCE);
    expect(r.model).toBe('one-phase');
    expect(r.fixedRate).toEqual({ phase: 'fast', rate: 0.03 });
    expect(Math.abs(r.slowFraction! - 1)).toBeLessThan(0.02);
    expect(r.kSlow!).toBeCloseTo(0.0034, 4);
  });

  it('takes the reference from the WT traces of the same batch (geometric means) and uses it for the variant', () => {
    const normal = normalSource(1234);
    const t = times(1800, 10);
    const rows = [
      ...traceRows('wt', 'w1', 'b1', 'A', t, t.map((s) => decay(s, 0.35, 0.03, 0.0034, 100, 20) + normal(0, 0.3))),
      ...traceRows('wt', 'w2', 'b1', 'A', t, t.map((s) => decay(s, 0.35, 0.033, 0.0031, 100, 20) + normal(0, 0.3))),
      ...traceRows('v1', 'p1', 'b1', 'A', t, t.map((s) => 100 * Math.exp(-0.03 * s) + 20 + normal(0, 0.3))),
      // Batch b2 has no WT: its one-phase trace stays without a value, flagged.
      ...traceRows('v1', 'p2', 'b2', 'A', t, t.map((s) => 100 * Math.exp(-0.03 * s) + 20 + normal(0, 0.3))),
    ];
    const study = makeStudy({ turnover: rows });
    study.variants = [
      { id: 'wt', gene: 'X', isWT: true, hgvs: 'WT', short: 'WT', label: 'wt', at: at('study.json', 1) },
      { id: 'v1', gene: 'X', isWT: false, hgvs: 'v1', short: 'v1', label: 'v1', at: at('study.json', 1) },
    ];
    const units = turnover.analyse(study);
    const p1 = units.find((u) => u.unit === 'p1')!;
    const p2 = units.find((u) => u.unit === 'p2')!;
    expect(Math.abs(p1.metrics.slowFraction as number)).toBeLessThan(0.02);
    const message = p1.flags.find((f) => f.code === 'one-phase-trace')!.message;
    expect(message).toContain('geometric means of 2 WT traces of batch b1');
    expect(p2.metrics.slowFraction).toBeNull();
    expect(p2.flags.map((f) => f.code)).toContain('no-reference-rates');
  });
});

describe('turnover chart and methods', () => {
  it('compiles with vega-lite and carries a title and a description', () => {
    const t = times(1800, 30);
    const rows = [
      ...traceRows('wt', 'p1', 'b1', 'A', t, t.map((s) => decay(s, 0.3, 0.03, 0.0034, 100, 5))),
      ...traceRows('v1', 'p2', 'b1', 'A', t, t.map((s) => decay(s, 0.15, 0.03, 0.0034, 100, 5))),
    ];
    const units = turnover.analyse(makeStudy({ turnover: rows }));
    const spec = turnover.chart({ variantLabel: 'p.Xaa3Yaa (synthetic)', variantUnits: [units[1]!], wtUnits: [units[0]!] });
    expectChartCompiles(spec);
  });

  it('states the selection rule and thresholds from src/defaults.ts', () => {
    const text = turnover.methods.join(' ');
    expect(text).toContain(`p < ${TURNOVER_SETTINGS.turnoverFTestAlpha}`);
    expect(text).toContain(`${TURNOVER_SETTINGS.turnoverMinRateRatio} times`);
    expect(text).toContain(`${TURNOVER_SETTINGS.turnoverMinSlowTimeConstants} slow-phase`);
    expect(text).toContain(`${FIT.maxRelativeSe * 100}%`);
  });
});

describe('turnover: short traces never throw', () => {
  it('flags a trace too short for two phases, and one too short for any fit', () => {
    const four = fitTurnoverTrace([0, 10, 20, 30], [1, 0.7, 0.5, 0.35], SETTINGS, 'Trace F');
    expect(four.double.converged).toBe(false);
    expect(four.double.stopReason).toBe('too-few-points');
    expect(four.model).toBe('single');
    const two = fitTurnoverTrace([0, 10], [1, 0.7], SETTINGS, 'Trace T');
    expect(two.model).toBe('none');
    expect(two.flags.map((f) => f.code)).toEqual(['not-converged']);
    const unit = turnover.analyse(makeStudy({ turnover: traceRows('wt', 'p1', 'b1', 'T', [0, 10], [1, 0.7]) }))[0]!;
    expect(unit.metrics).toEqual({ slowFraction: null, kFast: null, kSlow: null });
    expect(unit.plot.curve).toEqual([]);
  });
});
