/**
 * Synthetic studies for the scale benchmark: N invented variants of an invented gene (symbol
 * ZZBENCH1, random seeded sequence), all four assays, batches of ~20 variants with 3 WT units
 * per batch and 3 units per variant. Every value is invented (labelled synthetic).
 *
 * Rows come from the seeded demo simulator (src/demo/simulate.ts); the per-unit truths it
 * returns are then used to redraw three files at benchmark density, because the simulator's
 * own densities are demo-sized: motility velocities (300 filaments per unit instead of 40),
 * force–pCa (10 pCa points instead of 9) and single-turnover traces (400 points per trace
 * instead of 91–181). ATPase rates (8 [actin] × 3 wells), NADH wells and motility tracks are
 * kept as the simulator writes them.
 */
import { mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { createRng, nth, simulateStudy, type AssayTruth, type Scenario, type ScenarioVariant } from '../demo/simulate.js';
import { MANIFEST_NAME } from '../study/schemas.js';
import { DEMO_WT } from '../demo/scenario.js';

const AMINO = 'ACDEFGHIKLMNPQRSTVWY';
const WT: AssayTruth = DEMO_WT;

export interface SyntheticOptions {
  variants: number;
  seed?: number;
  /** Variants per batch (each variant's units spread over its batch and the next). */
  perBatch?: number;
  filaments?: number;
  turnoverPoints?: number;
  /** Data rows per CSV part (default 30,000). */
  maxRowsPerFile?: number;
  /**
   * Only variants first … first + count − 1 of the study (writeSyntheticStudy writes a large study
   * slice by slice); batches are the slice's own, named B<index + 1>-<k>.
   */
  slice?: { first: number; count: number; index: number };
}

/** Scenario of `variants` invented variants (deterministic for a seed). */
export function benchScenario(o: SyntheticOptions): Scenario {
  const seed = o.seed ?? 9001;
  const rng = createRng(seed);
  const n = o.variants;
  // Each residue carries at most 10 different changes, so the gene grows with the study.
  const length = Math.max(420, Math.ceil(n / 10) + 10);
  let sequence = 'M';
  while (sequence.length < length) sequence += rng.pick([...AMINO]);
  const first = o.slice?.first ?? 0;
  const count = o.slice?.count ?? n;
  // A slice draws its effects from its own stream, so slices can be made one at a time.
  const effectsRng = o.slice ? createRng((seed + 7919 * (o.slice.index + 1)) >>> 0) : rng;
  const nBatches = Math.max(2, Math.ceil(count / (o.perBatch ?? 20)));
  const batches = Array.from({ length: nBatches }, (_, i) => (o.slice ? `B${o.slice.index + 1}-${i + 1}` : `B${i + 1}`));
  const variants: ScenarioVariant[] = [];
  for (let i = first; i < first + count; i++) {
    const residue = 2 + (i % (length - 1));
    const ref = sequence[residue - 1];
    const alts = [...AMINO].filter((a) => a !== ref);
    const alt = alts[Math.floor(i / (length - 1)) % alts.length];
    const r = effectsRng.uniform();
    const effects: Partial<AssayTruth> =
      r < 0.15 ? { kcat: 1.4, velocity: 1.3, pCa50: 0.15 } : r < 0.3 ? { kcat: 0.65, fmax: 0.7 } : r < 0.4 ? { slowFraction: -0.12 } : {};
    const control =
      i % 25 === 0 ? { class: 'pathogenic' as const, source: 'invented for the benchmark' } : i % 25 === 1 ? { class: 'benign' as const, source: 'invented for the benchmark' } : undefined;
    if (control?.class === 'benign') for (const k of Object.keys(effects)) delete effects[k as keyof AssayTruth];
    const b = Math.floor((i - first) / (o.perBatch ?? 20)) % nBatches;
    variants.push({
      hgvs: `p.${ref}${residue}${alt}`,
      ...(control ? { control } : {}),
      effects,
      batches: [nth(batches, b), nth(batches, b + 1)],
      atpase: i % 5 === 4 ? 'nadh' : 'rates',
      motility: i % 5 === 3 ? 'tracks' : 'velocities',
      force: true,
      turnover: true,
    });
  }
  return {
    seed,
    title: `ZZBENCH1 scale benchmark, ${n} variants (synthetic)`,
    lab: 'Benchmark Lab (invented)',
    dates: ['2025-03-01'],
    description: 'Invented study made by src/bench/synthetic.ts for the scale benchmark. No value in it was measured.',
    gene: { symbol: 'ZZBENCH1', sequence, domains: [{ name: 'motor domain', start: 1, end: Math.floor(length * 0.6) }, { name: 'tail', start: Math.floor(length * 0.6) + 1, end: length }] },
    direction: 'hypercontractile',
    caveats: ['Synthetic benchmark data: the lab, the gene, the variants and every value are invented.'],
    batches,
    wt: WT,
    wtUnitsPerBatch: 3,
    unitsPerVariant: 3,
    variants,
    unitSd: 0.06,
    batchSd: 0.05,
  };
}

function fx(x: number, digits: number): string {
  const s = x.toFixed(digits);
  return /^-0\.?0*$/.test(s) ? s.slice(1) : s;
}

const PCA10 = [9, 6.8, 6.6, 6.2, 6.0, 5.8, 5.6, 5.4, 5.0, 4.5];
const BANNER = '# Synthetic benchmark data: invented lab, gene and variants; not measurements.';

/** Units (label, unit, batch) present in a simulator CSV, in file order. */
function unitsOf(csv: string): Array<[string, string, string]> {
  const seen = new Set<string>();
  const out: Array<[string, string, string]> = [];
  for (const line of csv.split('\n')) {
    if (!line || line.startsWith('#') || line.startsWith('variant,')) continue;
    const [label = '', unit = '', batch = ''] = line.split(',', 3);
    const key = `${label}|${unit}|${batch}`;
    if (!seen.has(key)) {
      seen.add(key);
      out.push([label, unit, batch]);
    }
  }
  return out;
}

/** Manifest and files of a synthetic study at benchmark density. */
export function syntheticStudy(o: SyntheticOptions): { manifest: Record<string, unknown>; files: Record<string, string> } {
  const sim = simulateStudy(benchScenario(o));
  const rng = createRng((o.seed ?? 9001) ^ 0xbe7c);
  const filaments = o.filaments ?? 300;
  const points = o.turnoverPoints ?? 400;
  const truthOf = (l: string, u: string, b: string) => {
    const t = sim.truth[`${l}|${u}|${b}`];
    if (!t) throw new Error(`no simulated truth for unit ${u} of ${l} in batch ${b}`);
    return t;
  };
  const files = { ...sim.files };
  const velocities = files['motility-velocities.csv'];
  if (velocities) {
    const lines = [BANNER, 'variant,preparation,batch,movie,filament,velocity (nm/s)'];
    for (const [l, u, b] of unitsOf(velocities)) {
      const t = truthOf(l, u, b);
      for (let f = 1; f <= filaments; f++) {
        const immobile = rng.uniform() < t.fractionImmobile;
        const v = immobile ? Math.abs(rng.normal(0, 0.015)) : Math.max(0.06, rng.normal(t.velocity, 0.1 * t.velocity));
        lines.push(`${l},${u},${b},m${1 + Math.floor((f - 1) / 30)},f${f},${fx(v * 1000, 1)}`);
      }
    }
    files['motility-velocities.csv'] = lines.join('\n') + '\n';
  }
  const forces = files['force-pca.csv'];
  if (forces) {
    const lines = [BANNER, 'variant,preparation,batch,pCa,force (uN),area (um2)'];
    for (const [l, u, b] of unitsOf(forces)) {
      const t = truthOf(l, u, b);
      const area = Math.round(Math.max(150, rng.normal(400, 60)));
      for (const pCa of PCA10) {
        const tension = t.passive + t.fmax / (1 + 10 ** (t.nH * (pCa - t.pCa50))) + rng.normal(0, 0.5);
        lines.push(`${l},${u},${b},${pCa},${fx(tension * area * 1e-3, 3)},${area}`);
      }
    }
    files['force-pca.csv'] = lines.join('\n') + '\n';
  }
  const traces = files['turnover.csv'];
  if (traces) {
    const lines = [BANNER, 'variant,preparation,batch,trace,time (s),fluorescence'];
    for (const [l, u, b] of unitsOf(traces)) {
      const t = truthOf(l, u, b);
      const amplitude = 100 * Math.exp(rng.normal(0, 0.1));
      const offset = 20 + rng.normal(0, 2);
      const dt = 1800 / (points - 1);
      for (let k = 0; k < points; k++) {
        const s = k * dt;
        const f = offset + amplitude * ((1 - t.slowFraction) * Math.exp(-t.kFast * s) + t.slowFraction * Math.exp(-t.kSlow * s));
        lines.push(`${l},${u},${b},tr1,${fx(s, 2)},${fx(f + rng.normal(0, 0.6), 3)}`);
      }
    }
    files['turnover.csv'] = lines.join('\n') + '\n';
  }
  return splitFiles(sim.manifest, files, o.maxRowsPerFile ?? 30_000);
}

/**
 * Split every CSV into parts of at most `maxRows` data rows, at unit boundaries, each part a
 * manifest entry of the same kind (labs often keep one file per run). Also keeps each file
 * under the size where loadStudy's `push(...rows)` overflows the call stack (>~100k rows).
 */
function splitFiles(manifest: Record<string, unknown>, files: Record<string, string>, maxRows: number) {
  const entries = manifest.files as Array<Record<string, unknown>>;
  const outFiles: Record<string, string> = {};
  const outEntries: Array<Record<string, unknown>> = [];
  for (const entry of entries) {
    const p = entry.path as string;
    const text = files[p];
    if (text === undefined) throw new Error(`the manifest names ${p}, which the study does not have`);
    const lines = text.split('\n').filter((l) => l !== '');
    const head = lines.filter((l) => l.startsWith('#') || l.startsWith('variant,'));
    const body = lines.filter((l) => !(l.startsWith('#') || l.startsWith('variant,')));
    if (body.length <= maxRows) {
      outFiles[p] = text;
      outEntries.push(entry);
      continue;
    }
    let part = 1;
    let start = 0;
    while (start < body.length) {
      let end = Math.min(body.length, start + maxRows);
      // Move the cut back to a unit boundary (first three cells change).
      const unitOf = (l: string) => l.split(',', 3).join(',');
      while (end < body.length && end > start + 1 && unitOf(body[end]!) === unitOf(body[end - 1]!)) end--;
      const name = p.replace(/\.csv$/, `-part${part}.csv`);
      outFiles[name] = [...head, ...body.slice(start, end)].join('\n') + '\n';
      outEntries.push({ ...entry, path: name });
      part++;
      start = end;
    }
  }
  return { manifest: { ...manifest, files: outEntries }, files: outFiles };
}

/**
 * Write a synthetic study of any size slice by slice (`sliceSize` variants each, every slice with
 * its own batches and WT units), so that the generator never holds more than one slice's CSV
 * text: the 10,000-variant study is about 1.1 GB of CSV. Files are named s<slice>-<name>.
 * Returns the manifest written.
 */
export function writeSyntheticStudy(dir: string, o: SyntheticOptions, sliceSize = 500): Record<string, unknown> {
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  let manifest: Record<string, unknown> | undefined;
  const files: Array<Record<string, unknown>> = [];
  const variants: unknown[] = [];
  const seen = new Set<string>();
  for (let index = 0; index * sliceSize < o.variants; index++) {
    const first = index * sliceSize;
    const part = syntheticStudy({ ...o, slice: { first, count: Math.min(sliceSize, o.variants - first), index } });
    const prefix = `s${String(index + 1).padStart(3, '0')}-`;
    for (const entry of part.manifest.files as Array<Record<string, unknown>>) {
      const text = part.files[entry.path as string];
      if (text === undefined) throw new Error(`slice ${index + 1} has no file ${entry.path as string}`);
      writeFileSync(join(dir, prefix + (entry.path as string)), text);
      files.push({ ...entry, path: prefix + (entry.path as string) });
    }
    // WT (and anything else listed in every slice) once.
    for (const v of part.manifest.variants as unknown[]) {
      const key = JSON.stringify(v);
      if (!seen.has(key)) {
        seen.add(key);
        variants.push(v);
      }
    }
    manifest ??= part.manifest;
  }
  const out = { ...manifest, variants, files };
  writeFileSync(join(dir, MANIFEST_NAME), JSON.stringify(out, null, 2) + '\n');
  return out;
}

/** changeOneVariant on a study folder: rewrites the one velocity file holding `label`'s rows. */
export function changeOneVariantInFolder(dir: string, manifest: Record<string, unknown>, label: string): void {
  for (const entry of manifest.files as Array<{ path: string }>) {
    if (!/motility-velocities/.test(entry.path)) continue;
    const text = readFileSync(join(dir, entry.path), 'utf8');
    if (!text.includes(`\n${label},`)) continue;
    writeFileSync(join(dir, entry.path), scaleVelocities(text, label));
    return;
  }
  throw new Error(`no velocity rows for ${label}`);
}

/**
 * A new batch on a study folder, as a lab adds one after a new run: one new variant (declared in
 * the manifest) with WT, in new files `new-batch-<kind>.csv`, one per input kind of the study.
 * Its rows are those of WT, of the batch's actin-only wells and of one non-control variant of
 * the study's first batch, moved to batch 'BNEW' under the new label; each new file is read with
 * the manifest entry of the kind's first file. The other files are left as they are. Returns the
 * new variant's label.
 */
export function addBatchInFolder(dir: string, manifest: Record<string, unknown>): string {
  const variants = manifest.variants as Array<{ hgvs?: string; control?: unknown; wt?: boolean }>;
  const entries = manifest.files as Array<{ path: string; kind: string } & Record<string, unknown>>;
  const declared = new Set(variants.map((v) => v.hgvs));
  const sequence = (manifest.genes as Array<{ sequence: string }>)[0]?.sequence;
  if (sequence === undefined) throw new Error('the study declares no gene');
  let hgvs = '';
  for (let pos = sequence.length; pos > 0 && hgvs === ''; pos--) {
    const ref = sequence[pos - 1];
    for (const alt of 'WYF') if (alt !== ref && !declared.has(`p.${ref}${pos}${alt}`) && hgvs === '') hgvs = `p.${ref}${pos}${alt}`;
  }
  const label = hgvs.slice(2);
  const firstBatch = (text: string) => text.split('\n').find((l) => l !== '' && !l.startsWith('#') && !l.startsWith('variant,'))?.split(',')[2];
  const firstFile = entries[0];
  if (!firstFile) throw new Error('the study has no files');
  const batch = firstBatch(readFileSync(join(dir, firstFile.path), 'utf8')) as string;
  const controls = new Set(variants.filter((v) => v.control !== undefined).map((v) => v.hgvs?.slice(2)));
  let model: string | undefined;
  const out = new Map<string, string[]>();
  for (const entry of entries) {
    const lines = readFileSync(join(dir, entry.path), 'utf8').split('\n');
    const rows = out.get(entry.kind) ?? lines.filter((l) => l.startsWith('#') || l.startsWith('variant,'));
    out.set(entry.kind, rows);
    for (const line of lines) {
      const cells = line.split(',');
      if (cells.length < 3 || cells[2] !== batch || line.startsWith('#')) continue;
      if (model === undefined && cells[0] !== 'WT' && cells[0] !== '' && !controls.has(cells[0])) model = cells[0];
      if (cells[0] !== 'WT' && cells[0] !== '' && cells[0] !== model) continue;
      const to = cells[0] === model ? label : cells[0];
      rows.push([to, cells[1] === '' ? '' : `${cells[1]!.replace(model as string, label)}-new`, 'BNEW', ...cells.slice(3)].join(','));
    }
  }
  if (model === undefined) throw new Error(`no variant to model a new batch on in batch ${batch}`);
  for (const [kind, rows] of out) {
    const path = `new-batch-${kind}.csv`;
    writeFileSync(join(dir, path), `${rows.join('\n')}\n`);
    // Read as the kind's other files are (pixel size, frame interval, path length…).
    entries.push({ ...(entries.find((e) => e.kind === kind) as Record<string, unknown>), path, kind });
  }
  variants.push({ hgvs });
  writeFileSync(join(dir, MANIFEST_NAME), JSON.stringify(manifest, null, 2) + '\n');
  return label;
}

/** Write a study folder (replacing it). */
export function writeStudy(dir: string, study: { manifest: Record<string, unknown>; files: Record<string, string> }): void {
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  writeFileSync(join(dir, MANIFEST_NAME), JSON.stringify(study.manifest, null, 2) + '\n');
  for (const [p, text] of Object.entries(study.files)) writeFileSync(join(dir, p), text);
}

/**
 * Change one variant's data: scale the velocities of the units labelled `label` by 1.1
 * (one file changes; every other variant's rows stay byte-identical).
 */
export function changeOneVariant(files: Record<string, string>, label: string): Record<string, string> {
  const path = Object.keys(files).find((p) => p.startsWith('motility-velocities') && files[p]?.includes(`\n${label},`));
  const text = path === undefined ? undefined : files[path];
  if (path === undefined || text === undefined) throw new Error(`no velocity rows for ${label}`);
  return { ...files, [path]: scaleVelocities(text, label) };
}

/** A velocities file with the velocities of the units labelled `label` scaled by 1.1. */
function scaleVelocities(text: string, label: string): string {
  return text
    .split('\n')
    .map((line) => {
      if (!line.startsWith(`${label},`)) return line;
      const cells = line.split(',');
      cells[5] = fx(Number(cells[5]) * 1.1, 1);
      return cells.join(',');
    })
    .join('\n');
}
