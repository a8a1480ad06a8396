import { readFileSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { demoScenario } from '../../src/demo/scenario.js';
import { createRng, simulateStudy } from '../../src/demo/simulate.js';
import { loadStudy } from '../../src/study/load.js';
import { readStudyFolder } from '../../src/study/read-folder.js';
import { CATALOGUE, INPUT_KINDS, validators } from '../../src/study/schemas.js';
import { rowsOf } from '../../src/assays/assay-common.js';
import { ATPASE_RATES } from '../../src/assays/atpase/inputs.js';

const DEMO = join(import.meta.dirname, '../../data-demo');

describe('demo study data-demo/', () => {
  const outcome = loadStudy(readStudyFolder(DEMO));

  it('passes the loader with no errors', () => {
    expect(outcome.issues.filter((i) => i.severity === 'error')).toEqual([]);
    expect(outcome.study).toBeDefined();
  });

  it('every file validates: the manifest against its schema, every CSV row via the row schemas', () => {
    const manifest = JSON.parse(readFileSync(join(DEMO, 'study.json'), 'utf8'));
    expect(validators().manifest(manifest), JSON.stringify(validators().manifest.errors)).toBe(true);
    const listed = new Set((manifest.files as { path: string }[]).map((f) => f.path));
    for (const name of readdirSync(DEMO)) {
      if (name === 'study.json') continue;
      expect(listed.has(name), `${name} is not listed in the manifest`).toBe(true);
    }
    expect(outcome.study!.files.every((f) => f.rows > 0)).toBe(true);
  });

  it('is labelled synthetic, invented, and has what the brief asks for', () => {
    const s = outcome.study!;
    expect(s.synthetic).toBe(true);
    expect(s.lab).toMatch(/invented/i);
    expect(s.genes[0]!.symbol).toBe('ZZMYO1');
    const controls = s.variants.filter((v) => v.control);
    expect(controls.filter((v) => /pathogenic/.test(v.control!.class)).length).toBeGreaterThanOrEqual(4);
    expect(controls.filter((v) => /benign/.test(v.control!.class)).length).toBeGreaterThanOrEqual(4);
    expect(controls.every((v) => v.control!.source === 'invented for the demo')).toBe(true);
    expect(s.variants.filter((v) => !v.isWT && !v.control).length).toBeGreaterThanOrEqual(12);
    expect(new Set(s.files.map((f) => f.kind))).toEqual(new Set(INPUT_KINDS));
    const batches = new Set(rowsOf(s, ATPASE_RATES).map((r) => r.batch));
    expect(batches.size).toBeGreaterThanOrEqual(3);
    // ≥ 2 WT units per batch and ≥ 2 units per variant in every kind.
    for (const kind of INPUT_KINDS) {
      const rows = (s.rows[kind] ?? []) as { variant: string; unit: string; batch: string }[];
      const units = new Map<string, Set<string>>();
      for (const r of rows) {
        if (r.variant === '') continue;
        const key = r.variant === 'zzmyo1-wt' ? `WT|${r.batch}` : r.variant;
        if (!units.has(key)) units.set(key, new Set());
        units.get(key)!.add(r.unit);
      }
      for (const [key, set] of units) expect(set.size, `${kind} ${key}`).toBeGreaterThanOrEqual(2);
    }
  });

  it('stays small (< 3 MB)', () => {
    const total = readdirSync(DEMO).reduce((n, f) => n + statSync(join(DEMO, f)).size, 0);
    expect(total).toBeLessThan(3 * 1024 * 1024);
  });

  it('is exactly what the seeded simulator writes (regenerate with npx tsx src/demo/generate-demo.ts)', () => {
    const sim = simulateStudy(demoScenario());
    for (const [path, text] of Object.entries(sim.files)) expect(readFileSync(join(DEMO, path), 'utf8')).toBe(text);
    expect(JSON.parse(readFileSync(join(DEMO, 'study.json'), 'utf8'))).toEqual(sim.manifest);
  });

  it('holds the deliberate problems: one KM beyond the top [actin], one unresolved turnover trace', () => {
    const sc = demoScenario();
    const topActin = Math.max(...rowsOf(outcome.study!, ATPASE_RATES).map((r) => r.actinUM));
    const kmProblem = sc.variants.filter((v) => sc.wt.km * (v.effects.km ?? 1) > topActin);
    expect(kmProblem).toHaveLength(1);
    expect(sc.variants.filter((v) => v.unresolvedTurnoverTrace)).toHaveLength(1);
  });
});

describe('simulator', () => {
  it('is deterministic for a seed and changes with it', () => {
    const a = simulateStudy(demoScenario());
    const b = simulateStudy(demoScenario());
    expect(a.files).toEqual(b.files);
    const c = simulateStudy({ ...demoScenario(), seed: 7 });
    expect(c.files['turnover.csv']).not.toBe(a.files['turnover.csv']);
  });

  it('mulberry32 gives uniform values in [0, 1) with mean ≈ 0.5 and normals with SD ≈ 1 (common practice, no source)', () => {
    const rng = createRng(42);
    const u = Array.from({ length: 20000 }, () => rng.uniform());
    expect(Math.min(...u)).toBeGreaterThanOrEqual(0);
    expect(Math.max(...u)).toBeLessThan(1);
    expect(u.reduce((s, x) => s + x, 0) / u.length).toBeCloseTo(0.5, 1);
    const n = Array.from({ length: 20000 }, () => rng.normal());
    const mean = n.reduce((s, x) => s + x, 0) / n.length;
    const sd = Math.sqrt(n.reduce((s, x) => s + (x - mean) ** 2, 0) / (n.length - 1));
    expect(Math.abs(mean)).toBeLessThan(0.05);
    expect(Math.abs(sd - 1)).toBeLessThan(0.05);
  });

  it('WT rates follow v = basal + kcat·A/(KM + A) at the unit truth (noise-free check at high [actin] mean)', () => {
    const sim = simulateStudy(demoScenario());
    const truth = Object.entries(sim.truth).find(([k]) => k.startsWith('WT|WT-B1-1'))![1];
    const rows = sim.files['atpase-rates.csv']!.split('\n').filter((l) => l.startsWith('WT,WT-B1-1,') && l.endsWith(',100,') === false);
    const at100 = rows.filter((l) => l.split(',')[4] === '100').map((l) => Number(l.split(',')[5]));
    const expected = truth.basal + (truth.kcat * 100) / (truth.km + 100); // computed from the model and the simulated truth
    const mean = at100.reduce((s, x) => s + x, 0) / at100.length;
    expect(Math.abs(mean / expected - 1)).toBeLessThan(0.2);
  });
});

describe('column catalogue', () => {
  it('every row schema column has a description and a typed-row field', () => {
    for (const kind of INPUT_KINDS) {
      for (const c of CATALOGUE[kind]!.columns) {
        expect(c.description.length, `${kind}.${c.name}`).toBeGreaterThan(5);
        expect(c.field, `${kind}.${c.name}`).toBeTruthy();
      }
    }
  });
});
