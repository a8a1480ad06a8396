/**
 * Checks that need the fitted units: plausibility of WT means and preparations against the trade's
 * typical ranges (each assay's `plausible` in src/assays/<assay>/metrics.ts: kcat 4–7 s⁻¹, velocity 0.7–1.0 µm/s, Fmax 20–40 kPa,
 * pCa50 5.5–6.0, typical WT values from memory; turnover rates 0.030 and 0.0034 s⁻¹, Sarkar et
 * al., Sci Adv 2020); one preparation label in two batches; too few known controls.
 * Unit values are constructed; the expected numbers are computed by hand from them (a value read in
 * 1/min is 1/60 of the same number in 1/s: SI Brochure 2019, Table 8). The control counts are checked
 * against closed forms computed from the formula of Brnich et al. 2020 (Genome Med 12:3) with the
 * added pseudo-count pair: with perfect separation, OddsPath(PS3) =
 * nP(nB+1)/(nP+1) and OddsPath(BS3) = (nB+1)/(nB(nP+1)), supporting beyond 2.1 and below 0.48.
 */
import { describe, expect, it } from 'vitest';
import { analyseStudy } from '../../src/analysis/analyse-study.js';
import { plausibilityIssues, plausibleBounds } from '../../src/analysis/plausibility.js';
import { bestCaseLevels, controlsCheck, preparationsInBatches } from '../../src/analysis/study-checks.js';
import { ASSAYS } from '../../src/assays/registry.js';
import type { UnitResult } from '../../src/results/types.js';
import { loadStudy } from '../../src/study/load.js';
import type { ColumnUnit, InputFile, Variant } from '../../src/study/types.js';
import { baseManifest } from '../study/fixtures.js';

const atpase = ASSAYS.find((a) => a.id === 'atpase')!;
const turnover = ASSAYS.find((a) => a.id === 'turnover')!;
const force = ASSAYS.find((a) => a.id === 'force')!;

function variant(id: string, isWT = false, control?: Variant['control']): Variant {
  return { id, gene: 'G', isWT, hgvs: id, short: id, label: id.toUpperCase(), at: { file: 'study.json', jsonPath: '/variants/0' }, ...(control ? { control } : {}) };
}
const VARIANTS = [variant('wt', true), variant('a1b'), variant('c2d')];

let line = 2;
function unit(assay: string, v: string, prep: string, batch: string, metrics: Record<string, number>, file = 'rates.csv'): UnitResult {
  const first = line;
  line += 6;
  return { assay, variant: v, unit: prep, batch, metrics, flags: [], nTechnical: 6, plot: { points: [] }, source: [{ file, line: first, lineEnd: first + 5 }] };
}
const col = (name: string, unit: string, colNo: number, header = `${name} (${unit})`): ColumnUnit => ({ name, header, unit, from: 'header', line: 1, col: colNo });
const file = (path: string, kind: InputFile['kind'], columns: ColumnUnit[]): InputFile => ({ kind, path, sha256: '0'.repeat(64), rows: 100, settings: {}, columns });

describe('plausible bounds', () => {
  it('are the typical range ÷/× 10 for a WT mean and ÷/× 40 for one preparation; pCa50 ∓ 1 and ∓ 1.5', () => {
    // kcat typical 4–7 s⁻¹ (from memory); spreads common practice, no source.
    expect(plausibleBounds('atpase.kcat', 'wildType')).toEqual([0.4, 70]);
    expect(plausibleBounds('atpase.kcat', 'preparation')).toEqual([0.1, 280]);
    expect(plausibleBounds('force.pCa50', 'wildType')).toEqual([4.5, 7]);
    expect(plausibleBounds('force.pCa50', 'preparation')).toEqual([4, 7.5]);
    expect(plausibleBounds('atpase.basal', 'wildType')).toBeUndefined();
  });
});

describe('implausible fitted values', () => {
  const rates = (unitText: string) => file('rates.csv', 'atpase-rates', [col('actin', 'µM', 4), col('rate', unitText, 5)]);
  const atpaseUnits = (kcat: number) => [
    unit('atpase', 'wt', 'w1', 'B1', { kcat, km: 40 }),
    unit('atpase', 'wt', 'w2', 'B1', { kcat: kcat * 1.1, km: 40 }),
    unit('atpase', 'a1b', 'p1', 'B1', { kcat: kcat * 1.3, km: 40 }),
  ];

  it('a rate headed 1/min with values in 1/s: one warning at the header cell, naming the unit that fits', () => {
    // 5 s⁻¹ read as per minute is 5/60 = 0.0833 s⁻¹; geometric mean of 0.0833 and 0.0917 = 0.0874.
    const kcat = 5 / 60;
    const issues = plausibilityIssues(atpaseUnits(kcat), [atpase], [rates('1/min')], VARIANTS);
    expect(issues).toHaveLength(1);
    const w = issues[0]!;
    expect(w).toMatchObject({ severity: 'warning', code: 'study.implausible-wt', at: { file: 'rates.csv', line: 1, column: 'rate', col: 5 }, variants: ['wt', 'a1b'] });
    expect(w.message).toContain('kcat of WT in this file: 0.0874 s⁻¹ (geometric mean of 2 preparations)');
    expect(w.message).toContain('below the plausible 0.4–70 s⁻¹ (typical 4–7 s⁻¹ for human β-cardiac myosin)');
    // sqrt(5 × 5.5) = 5.244 s⁻¹ once read as 1/s.
    expect(w.message).toContain("its header 'rate (1/min)' reads it as 1/min; read as 1/s, the values would give 5.244 s⁻¹");
  });

  it('values in the typical range give no warning; a file without WT is checked per preparation only', () => {
    expect(plausibilityIssues(atpaseUnits(5), [atpase], [rates('1/s')], VARIANTS)).toEqual([]);
    const onlyVariant = [unit('atpase', 'a1b', 'p1', 'B1', { kcat: 300, km: 40 })];
    const w = plausibilityIssues(onlyVariant, [atpase], [rates('1/s')], VARIANTS)[0]!;
    expect(w.code).toBe('study.implausible-preparation');
    // 300 s⁻¹ read as 1/min is 5 s⁻¹.
    expect(w.message).toContain("'p1' of 'A1B' (batch 'B1') 300 s⁻¹");
    expect(w.message).toContain('read as 1/min, the values would give 5 s⁻¹');
  });

  it('one odd preparation among plausible ones: one warning at its rows, on its variant only', () => {
    const units = [...atpaseUnits(5), unit('atpase', 'c2d', 'p9', 'B1', { kcat: 500, km: 40 })];
    const issues = plausibilityIssues(units, [atpase], [rates('1/s')], VARIANTS);
    expect(issues).toHaveLength(1);
    expect(issues[0]).toMatchObject({ code: 'study.implausible-preparation', variants: ['c2d'], at: { file: 'rates.csv', column: 'rate' } });
    expect(issues[0]!.at.lineEnd! - issues[0]!.at.line!).toBe(5);
  });

  it('tension headed Pa with values in kPa: Fmax of WT 0.025 kPa, read as kPa 25 kPa', () => {
    const units = [unit('force', 'wt', 'w1', 'B1', { fmax: 0.025, pCa50: 5.8 }, 'f.csv'), unit('force', 'wt', 'w2', 'B1', { fmax: 0.025, pCa50: 5.8 }, 'f.csv')];
    const w = plausibilityIssues(units, [force], [file('f.csv', 'force-pca', [col('tension', 'Pa', 5)])], VARIANTS)[0]!;
    expect(w.at).toMatchObject({ file: 'f.csv', line: 1, column: 'tension', col: 5 });
    expect(w.message).toContain('read as kPa, the values would give 25 kPa');
  });

  it('pCa50 of WT at 7.8: the pCa column is named (it has no unit)', () => {
    const units = [unit('force', 'wt', 'w1', 'B1', { fmax: 30, pCa50: 7.8 }, 'f.csv')];
    const w = plausibilityIssues(units, [force], [file('f.csv', 'force-pca', [col('tension', 'kPa', 5)])], VARIANTS)[0]!;
    expect(w.message).toContain('above the plausible 4.5–7');
    expect(w.message).toContain("Check the column 'pCa' of 'f.csv'");
  });

  it('a time column headed min with values in s: both turnover rates in one warning', () => {
    // 0.030/60 = 0.0005 s⁻¹ and 0.0034/60 = 0.0000567 s⁻¹.
    const units = [unit('turnover', 'wt', 'w1', 'B1', { kFast: 0.0005, kSlow: 0.0034 / 60, slowFraction: 0.3 }, 't.csv')];
    const issues = plausibilityIssues(units, [turnover], [file('t.csv', 'turnover', [col('time', 'min', 5)])], VARIANTS);
    expect(issues).toHaveLength(1);
    expect(issues[0]!.message).toMatch(/^Fast-phase rate of WT in this file: 0\.0005 s⁻¹ .* Slow-phase rate of WT: 0\.0000567 s⁻¹ .* read as s, the values would give 0\.03 s⁻¹\.$/);
  });

  it('excluded and extrapolated units do not count', () => {
    const units = atpaseUnits(5 / 60).map((u) => ({ ...u, excluded: 'spilled' }));
    expect(plausibilityIssues(units, [atpase], [rates('1/min')], VARIANTS)).toEqual([]);
    const flagged = atpaseUnits(5 / 60).map((u) => ({ ...u, flags: [{ code: 'km-above-range', severity: 'warning' as const, message: '' }] }));
    expect(plausibilityIssues(flagged, [atpase], [rates('1/min')], VARIANTS)).toEqual([]);
  });
});

describe('one preparation label in two batches', () => {
  it('one warning per variant and assay, naming the preparations and batches, on that variant', () => {
    const units = [
      unit('atpase', 'a1b', 'p1', 'B1', { kcat: 5 }),
      unit('atpase', 'a1b', 'p1', 'B2', { kcat: 5 }),
      unit('atpase', 'a1b', 'p2', 'B1', { kcat: 5 }),
      unit('atpase', 'c2d', 'p1', 'B1', { kcat: 5 }),
    ];
    const issues = preparationsInBatches(units, [atpase], VARIANTS);
    expect(issues).toHaveLength(1);
    expect(issues[0]).toMatchObject({ severity: 'warning', code: 'study.preparation-in-two-batches', variants: ['a1b'], at: { file: 'rates.csv', column: 'preparation' } });
    expect(issues[0]!.message).toBe("Preparation 'p1' (batches 'B1', 'B2') of 'A1B' appears in more than one batch of the Actin-activated ATPase data: the comparison with WT counts each batch's values as a separate preparation, as if independent.");
  });
});

describe('too few known controls', () => {
  it('the best case of a perfect readout matches the closed forms (computed from the formula of Brnich et al. 2020)', () => {
    // 2P+2B: PS3 2·3/3 = 2 (none), BS3 3/(2·3) = 0.5 (none). 2P+3B: 2·4/3 = 2.67, 4/(3·3) = 0.44.
    expect(bestCaseLevels(2, 2)).toEqual({ abnormal: 'none', normal: 'none' });
    expect(bestCaseLevels(2, 3)).toEqual({ abnormal: 'PS3 supporting', normal: 'BS3 supporting' });
    // 1P+5B: PS3 1·6/2 = 3 (supporting); BS3 6/(5·2) = 0.6 (none).
    expect(bestCaseLevels(1, 5)).toEqual({ abnormal: 'PS3 supporting', normal: 'none' });
  });

  it('a warning per assay whose controls cannot reach any level, with the fewest to add', () => {
    const variants = [variant('wt', true), variant('p1', false, { class: 'pathogenic', source: 'x' }), variant('b1', false, { class: 'benign', source: 'x' })];
    const units = [unit('atpase', 'p1', 'u', 'B1', { kcat: 5 }), unit('atpase', 'b1', 'u', 'B1', { kcat: 5 })];
    const issues = controlsCheck({ variants, thresholds: {} }, units, [atpase]);
    expect(issues).toHaveLength(1);
    expect(issues[0]).toMatchObject({ severity: 'warning', code: 'study.too-few-controls', at: { file: 'study.json', jsonPath: '/variants' } });
    // 1P+1B: no addition of one or two controls reaches a level (2P+2B, 1P+3B, 3P+1B: PS3 ≤ 2, BS3 ≥ 0.5);
    // three more benign give 1P+4B, PS3 1·5/2 = 2.5 (supporting).
    expect(issues[0]!.message).toContain('With 1 pathogenic and 1 benign control measured in Actin-activated ATPase, no functional evidence level');
    expect(issues[0]!.fix).toContain('3 more benign would make supporting evidence reachable');
    expect(controlsCheck({ variants: [variant('wt', true)], thresholds: {} }, [], [atpase]).map((i) => i.message)).toEqual([
      'With 0 pathogenic and 0 benign controls measured, no functional evidence level (PS3 or BS3) can be reached, even if every control reads as its class predicts.',
    ]);
  });
});

describe('through loading and analysis', () => {
  const HEAD = 'variant,preparation,batch,actin (uM),rate (1/min)';
  // Invented Michaelis–Menten rates per second (kcat 5, KM 40, basal 0.03), headed as per minute.
  const rows = (v: string, prep: string, scale = 1) => [0, 5, 10, 20, 40, 80, 100].map((a) => `${v},${prep},B1,${a},${((0.03 + (5 * a) / (40 + a)) * scale).toFixed(4)}`);
  const text = [HEAD, ...rows('WT', 'w1'), ...rows('WT', 'w2', 1.05), ...rows('R2Q', 'p1', 1.2), ...rows('K4E', 'p2', 0.9)].join('\n');

  it('the warning reaches results.issues and the report data of every variant in the file, not the cell warnings', () => {
    const loaded = loadStudy({ manifest: JSON.stringify(baseManifest()), files: { 'rates.csv': text } });
    expect(loaded.study).toBeDefined();
    const r = analyseStudy(loaded.study!, { toolVersion: 't', builtAt: '', issues: loaded.issues });
    const w = r.issues.find((i) => i.code === 'study.implausible-wt')!;
    expect(w.at).toMatchObject({ file: 'rates.csv', line: 1, column: 'rate', col: 5 });
    for (const v of r.variants) expect(v.warnings?.map((x) => x.code)).toContain('study.implausible-wt');
    expect(r.issues.some((i) => i.code === 'csv.implausible')).toBe(false);
  });
});
