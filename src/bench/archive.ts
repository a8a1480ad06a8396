/**
 * Archive benchmark: `npm run bench -- --archive [--studies 20] [--variants 30] [--keep]`.
 *
 * Writes an archive of N synthetic studies of V variants each (src/bench/synthetic.ts, one seed per
 * study) to os.tmpdir(), then builds it through buildArchive (src/pipeline/build-archive.ts) as the
 * CLI does, each build in its own child process so that its peak memory is its own:
 *   cold      — no previous output, an empty store;
 *   unchanged — the same archive built again (every study and page reused);
 *   one study — after one variant's velocities in one study changed (its one file rewritten, as a
 *               lab would correct it): that study is built again (through the store), and the archive
 *               pages that show it are written again.
 * Printed: wall and CPU seconds, peak RSS, studies built and reused, archive pages written and reused,
 * charts drawn. Figures only; nothing is asserted.
 */
import { spawn } from 'node:child_process';
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { availableParallelism, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { buildArchive } from '../pipeline/build-archive.js';
import { changeOneVariantInFolder, syntheticStudy, writeStudy } from './synthetic.js';

interface ArchiveFigures {
  mode: string;
  wallS: number;
  cpuS: number;
  peakMB: number;
  built: number;
  reused: number;
  pagesWritten: number;
  pagesReused: number;
  /** Wall seconds until the archive's own pages began (reading, releases, the studies' sites). */
  studiesS: number;
}

const here = fileURLToPath(import.meta.url);

async function buildOnce(archiveDir: string, outDir: string, storeDir: string, mode: string): Promise<ArchiveFigures> {
  const t = performance.now();
  const c = process.cpuUsage();
  let pagesAt = NaN;
  const outcome = await buildArchive(archiveDir, outDir, {
    force: true,
    store: storeDir,
    sourceDateEpoch: 1_740_787_200,
    removePrevious: 'background',
    onPhase: (phase) => {
      if (phase === 'archive pages') pagesAt = performance.now();
    },
  });
  if (!outcome.ok) throw new Error(`archive has errors: ${JSON.stringify(outcome.issues.slice(0, 3))}`);
  const cpu = process.cpuUsage(c);
  return {
    mode,
    wallS: (performance.now() - t) / 1000,
    cpuS: (cpu.user + cpu.system) / 1e6,
    peakMB: process.resourceUsage().maxRSS / 1024,
    built: outcome.studies.filter((s) => s.status === 'built').length,
    reused: outcome.studies.filter((s) => s.status === 'reused').length,
    pagesWritten: outcome.pages?.written ?? 0,
    pagesReused: outcome.pages?.reused ?? 0,
    studiesS: (pagesAt - t) / 1000,
  };
}

function child(args: string[]): Promise<ArchiveFigures> {
  return new Promise((resolve, reject) => {
    const p = spawn(process.execPath, [here, ...args], { stdio: ['ignore', 'pipe', 'inherit'] });
    let out = '';
    p.stdout.on('data', (d: Buffer) => (out += d.toString()));
    p.on('exit', (code, signal) => {
      const line = out.trim().split('\n').pop() ?? '';
      if (code === 0 && line.startsWith('{')) resolve(JSON.parse(line) as ArchiveFigures);
      else reject(new Error(`archive bench child failed (code ${code}, signal ${signal})`));
    });
  });
}

export async function archiveBench(args: string[]): Promise<void> {
  const value = (name: string) => {
    const i = args.indexOf(name);
    return i >= 0 ? args[i + 1] : undefined;
  };
  const studies = Number(value('--studies') ?? 20);
  const variants = Number(value('--variants') ?? 30);
  const root = join(tmpdir(), 'myofolio-bench-archive');
  const archiveDir = join(root, 'archive');
  const outDir = join(root, 'site');
  const storeDir = join(root, 'store');
  rmSync(root, { recursive: true, force: true });
  mkdirSync(archiveDir, { recursive: true });
  const manifests: Array<Record<string, unknown>> = [];
  const refs: Array<{ id: string; path: string }> = [];
  for (let i = 0; i < studies; i++) {
    const id = `study-${String(i + 1).padStart(2, '0')}`;
    const study = syntheticStudy({ variants, seed: 9001 + i });
    study.manifest.title = `Synthetic study ${i + 1} (benchmark)`;
    writeStudy(join(archiveDir, 'studies', id), study);
    manifests.push(study.manifest);
    refs.push({ id, path: `studies/${id}` });
  }
  writeFileSync(join(archiveDir, 'archive.json'), JSON.stringify({ title: 'Benchmark archive (synthetic)', lab: 'Invented benchmark lab', synthetic: true, studies: refs }, null, 2));
  process.stdout.write(`myofolio archive benchmark: ${studies} studies × ${variants} variants; ${availableParallelism()} cores; Node ${process.version}; work folder ${root}\n`);
  const runs: ArchiveFigures[] = [];
  const once = async (mode: string) => {
    const fig = await child(['--child', mode, '--archive', archiveDir, '--out', outDir, '--cache', storeDir]);
    runs.push(fig);
    process.stdout.write(
      `${fig.mode.padEnd(10)} ${fig.wallS.toFixed(1).padStart(7)} s wall (studies ${fig.studiesS.toFixed(1)} s, archive pages ${(fig.wallS - fig.studiesS).toFixed(1)} s) ${fig.cpuS.toFixed(1).padStart(7)} s CPU  peak ${Math.round(fig.peakMB)} MB  studies built ${fig.built}, reused ${fig.reused}; archive pages written ${fig.pagesWritten}, reused ${fig.pagesReused}\n`,
    );
  };
  await once('cold');
  await once('unchanged');
  // One variant of the middle study: its velocities rewritten in its one file.
  const middle = Math.floor(studies / 2);
  const manifest = manifests[middle]!;
  const label = (manifest.variants as Array<{ hgvs?: string }>)[3]!.hgvs!.replace(/^p\./, '');
  changeOneVariantInFolder(join(archiveDir, 'studies', refs[middle]!.id), manifest, label);
  await once('one study');
  if (!args.includes('--keep')) rmSync(root, { recursive: true, force: true });
}

if (process.argv.includes('--child')) {
  const v = (name: string) => process.argv[process.argv.indexOf(name) + 1] as string;
  const fig = await buildOnce(v('--archive'), v('--out'), v('--cache'), v('--child'));
  process.stdout.write(`${JSON.stringify(fig)}\n`);
}
