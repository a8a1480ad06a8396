/**
 * Scale benchmark: `npm run bench [-- --sizes 100,1000] [--full] [--modes plain,cold,warm] [--warm-runs 3]
 * [--keep] [--filaments 300] [--turnover-points 400]`; `npm run bench -- --archive` measures an archive
 * of 20 studies × 30 variants instead (src/bench/archive.ts).
 *
 * For each size (default 100 and 1,000 variants; 10,000 with --full) it writes a synthetic study
 * (src/bench/synthetic.ts) to os.tmpdir(), then builds it through buildStudy, as the CLI does:
 *   plain — one thread, no store: the baseline every other figure is set beside,
 *   cold  — the default build with an empty store (emptied first),
 *   warm  — the default build after one variant's velocities changed (its one file rewritten in
 *           place, as a lab would correct it), with the store of the builds before; with
 *           --warm-runs N, N such rebuilds, each for another variant, and their median,
 *   warm-no-…      — the same rebuild with a kind of store entry left out (after one build in that
 *                    mode, not measured, so that the store holds what such a store would):
 *   warm-no-units  — the same rebuild without stored units (every batch fitted),
 *   warm-no-block  — the same rebuild without assay charts stored by their units (their specs built
 *                    and hashed; SVGs still found by spec),
 *   warm-no-charts — the same rebuild without any stored chart (every chart drawn),
 *   batch — after a new batch was added (one new variant with WT, every assay, in new files),
 * each in its own child process, so every peak-memory figure belongs to one build. Phases: load
 * (read + check), analyse (units + analyseStudy), downloads (results.json and results.csv),
 * variants (variant pages and single-file reports: charts drawn, pages written by Eleventy in
 * runs), study (the study-level pages), swap (the new output put in place).
 * Printed per phase: wall time, CPU time (process.cpuUsage()) and peak RSS (the OS high-water mark,
 * process.resourceUsage().maxRSS, so a phase shows the peak up to its end); then a table of the
 * builds side by side. Figures only; nothing is asserted.
 */
import { execFileSync, spawn } from 'node:child_process';
import { mkdirSync, mkdtempSync, realpathSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { availableParallelism, tmpdir, totalmem } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import Eleventy from '@11ty/eleventy';
import { type StoreKind, buildStudy } from '../pipeline/build-study.js';
import { addBatchInFolder, changeOneVariantInFolder, syntheticStudy, writeStudy, writeSyntheticStudy } from './synthetic.js';

interface PhaseFigure {
  phase: string;
  wallS: number;
  cpuS: number;
  peakMB: number;
}

interface BuildFigures {
  size: number;
  mode: string;
  phases: PhaseFigure[];
  pages: number;
  charts: { rendered: number; stored: number };
  outMB: number;
  /** Size of downloads/results.json. */
  resultsMB?: number;
}

/** Studies above this many variants are written slice by slice (writeSyntheticStudy). */
const SLICED_FROM = 2000;

const args = process.argv.slice(2);
const flag = (name: string) => args.includes(name);
const value = (name: string) => {
  const i = args.indexOf(name);
  return i >= 0 ? args[i + 1] : undefined;
};

function peakMB(): number {
  return process.resourceUsage().maxRSS / 1024; // maxRSS is in KiB
}

function meter() {
  const phases: PhaseFigure[] = [];
  let t = performance.now();
  let c = process.cpuUsage();
  return {
    phases,
    lap(phase: string) {
      const now = performance.now();
      const cpu = process.cpuUsage(c);
      const fig = { phase, wallS: (now - t) / 1000, cpuS: (cpu.user + cpu.system) / 1e6, peakMB: peakMB() };
      phases.push(fig);
      // Also at once on stderr, so a build that runs out of memory still leaves its finished phases.
      process.stderr.write(`  [${phase} done: ${fig.wallS.toFixed(2)} s wall, ${fig.cpuS.toFixed(2)} s CPU, peak ${Math.round(fig.peakMB)} MB]\n`);
      t = now;
      c = process.cpuUsage();
      return fig;
    },
  };
}

function duMB(dir: string): number {
  try {
    return Number(execFileSync('du', ['-sk', dir], { encoding: 'utf8' }).split(/\s/)[0]) / 1024;
  } catch {
    return NaN;
  }
}

/** The store's kinds of entry a mode leaves out (src/pipeline/build-study.ts, BuildOptions.storeKinds). */
const STORE_KINDS: Record<string, ReadonlyArray<StoreKind>> = {
  'warm-no-units': ['svg', 'block'],
  'warm-no-block': ['units', 'svg'],
  'warm-no-charts': ['units'],
};

/** One build of a study folder by buildStudy (src/pipeline/build-study.ts), timed phase by phase (child process). */
async function buildOnce(studyDir: string, outDir: string, storeDir: string, mode: string, size: number): Promise<BuildFigures> {
  const m = meter();
  const kinds = STORE_KINDS[mode];
  const outcome = await buildStudy(studyDir, outDir, {
    force: true,
    sourceDateEpoch: 1_740_787_200,
    store: mode === 'plain' ? false : storeDir,
    ...(kinds ? { storeKinds: kinds } : {}),
    removePrevious: 'background',
    // buildStudy's phases in order: read, check, analyse, write (results.json and .csv), pages;
    // within pages, progress ('pages', 0, 1) when the variant pages are written, ('pages', 1, 1) after the study pages.
    onPhase: (phase: string) => {
      if (phase === 'analyse') m.lap('load');
      else if (phase === 'write') m.lap('analyse');
      else if (phase === 'pages') m.lap('downloads');
    },
    onProgress: (phase: string, done: number) => {
      if (phase === 'pages') m.lap(done === 0 ? 'variants' : 'study');
    },
  });
  if (!outcome.ok) throw new Error(`study has errors: ${JSON.stringify(outcome.issues.slice(0, 3))}`);
  m.lap('swap');
  const out = realpathSync(outcome.out as string);
  const resultsMB = statSync(join(out, 'downloads', 'results.json')).size / 1e6;
  return { size, mode, phases: m.phases, pages: outcome.pages ?? 0, charts: outcome.charts ?? { rendered: 0, stored: 0 }, outMB: duMB(out), resultsMB };
}

/** Bare Eleventy: `n` trivial pages from one paginated template (the floor for the pages phase). */
async function eleventyFloor(n: number): Promise<PhaseFigure> {
  const dir = mkdtempSync(join(tmpdir(), 'myofolio-bench-11ty-'));
  try {
    mkdirSync(join(dir, 'in'));
    writeFileSync(join(dir, 'in', 'p.njk'), '---\npagination:\n  data: items\n  size: 1\npermalink: "p/{{ pagination.pageNumber }}.html"\n---\n<!doctype html><title>{{ pagination.items[0] }}</title><p>{{ pagination.items[0] }}</p>\n');
    const items = Array.from({ length: n }, (_, i) => `page ${i + 1}`);
    const m = meter();
    const elev = new Eleventy(join(dir, 'in'), join(dir, 'out'), {
      quietMode: true,
      config(cfg) {
        cfg.addGlobalData('items', items);
      },
    });
    elev.disableLogger();
    await elev.write();
    return m.lap('eleventy');
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

const here = fileURLToPath(import.meta.url);

/** Run one measured build in a fresh process (so its peak memory is its own). */
function child(childArgs: string[], bigHeap = false): Promise<BuildFigures | PhaseFigure> {
  return new Promise((resolve, reject) => {
    // The heap limit V8 picks (about 4 GB here) is too small for the rows of a 10,000-variant study:
    // those builds get three quarters of the machine's memory, as the README tells users to do.
    const heap = bigHeap ? `--max-old-space-size=${Math.floor((totalmem() / 2 ** 20) * 0.75)}` : '';
    const env = heap ? { ...process.env, NODE_OPTIONS: [process.env.NODE_OPTIONS, heap].filter(Boolean).join(' ') } : process.env;
    const p = spawn(process.execPath, [here, ...childArgs], { stdio: ['ignore', 'pipe', 'inherit'], env });
    let out = '';
    p.stdout.on('data', (d: Buffer) => (out += d.toString()));
    p.on('exit', (code, signal) => {
      const line = out.trim().split('\n').pop() ?? '';
      if (code === 0 && line.startsWith('{')) resolve(JSON.parse(line));
      else reject(new Error(`bench child ${childArgs.join(' ')} failed (code ${code}, signal ${signal})`));
    });
  });
}

const f1 = (x: number) => (Number.isFinite(x) ? x.toFixed(1) : '—');
const f2 = (x: number) => (Number.isFinite(x) ? x.toFixed(2) : '—');

function printBuild(b: BuildFigures): void {
  const total = b.phases.reduce((s, p) => s + p.wallS, 0);
  const cpu = b.phases.reduce((s, p) => s + p.cpuS, 0);
  const peak = Math.max(...b.phases.map((p) => p.peakMB));
  process.stdout.write(`\n${b.size} variants, ${b.mode}: ${f1(total)} s wall, ${f1(cpu)} s CPU, peak RSS ${Math.round(peak)} MB, ${b.pages} pages, charts drawn ${b.charts.rendered} / from the store ${b.charts.stored}, output ${Math.round(b.outMB)} MB (results.json ${b.resultsMB === undefined ? '—' : f1(b.resultsMB)} MB)\n`);
  process.stdout.write('  phase      wall s    CPU s   peak MB   ms/variant\n');
  for (const p of b.phases) {
    process.stdout.write(`  ${p.phase.padEnd(9)} ${f2(p.wallS).padStart(7)} ${f2(p.cpuS).padStart(8)} ${String(Math.round(p.peakMB)).padStart(9)} ${f1((p.wallS * 1000) / b.size).padStart(12)}\n`);
  }
}

async function main(): Promise<void> {
  if (flag('--archive')) {
    // An archive of many studies, cold and after one study changed (src/bench/archive.ts).
    await (await import('./archive.js')).archiveBench(args);
    return;
  }
  if (flag('--child')) {
    const kind = value('--child');
    const size = Number(value('--size'));
    const fig =
      kind === 'floor'
        ? await eleventyFloor(size)
        : await buildOnce(value('--study') as string, value('--out') as string, value('--cache') as string, kind as string, size);
    process.stdout.write(JSON.stringify(fig) + '\n');
    return;
  }
  const sizes = (value('--sizes') ?? (flag('--full') ? '100,1000,10000' : '100,1000')).split(',').map(Number).filter((n) => n > 0);
  const root = join(tmpdir(), 'myofolio-bench');
  process.stdout.write(`myofolio scale benchmark: sizes ${sizes.join(', ')}; ${availableParallelism()} cores; Node ${process.version}; work folder ${root}\n`);
  process.stdout.write(`Study per size: 3 units per variant over 2 batches of ~20 variants, 3 WT units per batch; ATPase 8 [actin] × 3 wells (1 in 5 variants as NADH traces), ${value('--filaments') ?? 300} filament velocities per unit (1 in 5 variants as 30 tracks × 25 frames), 10 pCa points, ${value('--turnover-points') ?? 400}-point turnover traces.\n`);
  const summary: BuildFigures[] = [];
  for (const size of sizes) {
    const base = join(root, String(size));
    const studyDir = join(base, 'study');
    const cacheDir = join(base, 'cache');
    const outDir = join(base, 'site');
    rmSync(base, { recursive: true, force: true });
    mkdirSync(base, { recursive: true });
    let t = performance.now();
    const options = { variants: size, filaments: Number(value('--filaments') ?? 300), turnoverPoints: Number(value('--turnover-points') ?? 400) };
    // Up to SLICED_FROM variants the study is made in one piece (as the figures in the notes were);
    // larger ones slice by slice of 500 variants, each with its own batches (one piece would not fit in memory).
    const sliced = size > SLICED_FROM;
    let manifest: Record<string, unknown>;
    if (sliced) manifest = writeSyntheticStudy(studyDir, options);
    else {
      const study = syntheticStudy(options);
      writeStudy(studyDir, study);
      manifest = study.manifest;
    }
    const entries = manifest.files as Array<{ path: string }>;
    const inputMB = entries.reduce((n, e) => n + statSync(join(studyDir, e.path)).size, 0) / 1e6;
    process.stdout.write(`\n== ${size} variants: study written in ${f1((performance.now() - t) / 1000)} s (${f1(inputMB)} MB of CSV in ${entries.length} files${sliced ? ', made in slices of 500 variants' : ''})\n`);
    const modes: string[] = value('--modes')?.split(',') ?? ['plain', 'cold', 'warm'];
    const warmRuns = Math.max(1, Number(value('--warm-runs') ?? 1));
    const runs = modes.flatMap((m) => (m.startsWith('warm') ? Array<string>(warmRuns).fill(m) : [m]));
    // Variants that are not calibration controls (controls are i % 25 = 0 or 1, and a control's
    // change may move the calibration, and with it every report), from the middle on.
    const changeable = Array.from({ length: size }, (_, i) => i).filter((i) => i % 25 === 2);
    const middle = changeable.indexOf(Math.floor(size / 2 / 25) * 25 + 2);
    let changed = 0;
    for (const mode of runs) {
      // A cold build starts from an empty store (which the rebuilds after it then use).
      if (mode === 'cold') rmSync(cacheDir, { recursive: true, force: true });
      if (STORE_KINDS[mode]) {
        // The store as this mode fills it: one build in this mode first (not measured), so that
        // the rebuild measured below finds what such a store would hold.
        await child(['--child', mode, '--size', String(size), '--study', studyDir, '--out', outDir, '--cache', cacheDir], sliced);
      }
      if (mode.startsWith('warm')) {
        const i = changeable[(Math.max(0, middle) + changed++) % changeable.length] as number;
        // The manifest declares WT first, then the variants in order.
        const hgvs = (manifest.variants as Array<{ hgvs?: string }>)[1 + i]?.hgvs;
        if (hgvs === undefined) throw new Error(`the synthetic manifest has no variant ${i}`);
        const label = hgvs.replace(/^p\./, '');
        // As a lab would: the one file holding that variant's velocities is rewritten, the others
        // are left as they are (same bytes, same inode and times).
        changeOneVariantInFolder(studyDir, manifest, label);
      } else if (mode === 'batch') addBatchInFolder(studyDir, manifest);
      t = performance.now();
      try {
        const fig = (await child(['--child', mode, '--size', String(size), '--study', studyDir, '--out', outDir, '--cache', cacheDir], sliced)) as BuildFigures;
        printBuild(fig);
        summary.push(fig);
      } catch (err) {
        process.stdout.write(`\n${size} variants, ${mode}: ${(err as Error).message} after ${f1((performance.now() - t) / 1000)} s\n`);
      }
    }
    const pages = size + 10;
    const floor = (await child(['--child', 'floor', '--size', String(pages)])) as PhaseFigure;
    process.stdout.write(`\nbare Eleventy, ${pages} trivial pages: ${f2(floor.wallS)} s wall, ${f2(floor.cpuS)} s CPU, peak RSS ${Math.round(floor.peakMB)} MB\n`);
    if (!flag('--keep')) rmSync(base, { recursive: true, force: true });
  }
  printSummary(summary);
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const mid = Math.floor(s.length / 2);
  return s.length % 2 === 1 ? (s[mid] as number) : ((s[mid - 1] as number) + (s[mid] as number)) / 2;
};

/** One row per size and mode (the median of repeated rebuilds), the plain build first. */
function printSummary(builds: BuildFigures[]): void {
  process.stdout.write('\nSummary (wall and CPU seconds of the whole build; peak RSS; repeated rebuilds: median, with each run)\n');
  process.stdout.write('  variants  mode            wall s    CPU s   peak MB   charts drawn / stored\n');
  const keys = [...new Set(builds.map((b) => `${b.size}\0${b.mode}`))];
  for (const key of keys) {
    const runs = builds.filter((b) => `${b.size}\0${b.mode}` === key);
    const first = runs[0] as BuildFigures;
    const walls = runs.map((b) => b.phases.reduce((s, p) => s + p.wallS, 0));
    const cpus = runs.map((b) => b.phases.reduce((s, p) => s + p.cpuS, 0));
    const peak = Math.max(...runs.flatMap((b) => b.phases.map((p) => p.peakMB)));
    const each = runs.length > 1 ? `  (${walls.map(f1).join(', ')} s)` : '';
    process.stdout.write(`  ${String(first.size).padStart(8)}  ${first.mode.padEnd(14)} ${f1(median(walls)).padStart(7)} ${f1(median(cpus)).padStart(8)} ${String(Math.round(peak)).padStart(9)}   ${first.charts.rendered} / ${first.charts.stored}${each}\n`);
  }
}

await main();
