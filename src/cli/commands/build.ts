/** `myofolio build <study-dir> [--out <dir>] [--force] [--no-cache]`: check, analyse and write the report site. */
import { existsSync, readdirSync, statSync } from 'node:fs';
import { getHeapStatistics } from 'node:v8';
import { isAbsolute, join, relative } from 'node:path';
import { buildStudy } from '../../pipeline/build-study.js';
import { MANIFEST_NAME } from '../../study/schemas.js';
import { type Command, type Io, readArguments } from '../command.js';
import { CLI } from '../messages.js';
import { runBuild } from '../build-run.js';
import { runArchiveBuild } from './archive-build.js';
import { isArchiveFolder } from '../../pipeline/archive-input.js';

/** Default output folder, relative to the working directory. */
export const DEFAULT_OUT = '_site';

interface BuildArgs {
  study: string;
  out: string;
  force: boolean;
  /** Build without the store: nothing read from it or written to it. */
  noCache: boolean;
}

function parseArgs(args: string[]): BuildArgs | string {
  const got = readArguments(args, { '--out': { alias: '-o', needs: 'a folder' } }, ['--force', '--no-cache']);
  if ('problem' in got) return got.problem;
  const [study] = got.positional;
  if (got.positional.length !== 1 || study === undefined) return 'give exactly one study folder';
  return { study, out: got.values.get('--out') ?? DEFAULT_OUT, force: got.flags.has('--force'), noCache: got.flags.has('--no-cache') };
}

/** SOURCE_DATE_EPOCH (reproducible builds spec): whole seconds since 1970, or undefined. */
export function sourceDateEpoch(env: NodeJS.ProcessEnv): number | undefined {
  const raw = env.SOURCE_DATE_EPOCH;
  if (raw === undefined || raw === '') return undefined;
  return /^\d+$/.test(raw) ? Number(raw) : undefined;
}

/**
 * Memory a build needs per byte of CSV, at most: the 1,000-variant benchmark study (110 MB of CSV)
 * peaks at about 0.75 GB of live heap while its rows are analysed. Measured, rounded up; a guide, not a bound.
 */
export const HEAP_PER_CSV_BYTE = 8;

/**
 * A warning before a build whose CSV files would need more heap than Node allows here, with the
 * fix; '' when the study fits (or its files cannot be listed: the build then reports the problem).
 */
export function memoryWarning(dir: string, heapLimit: number, cmd = 'myofolio'): string {
  let bytes = 0;
  try {
    for (const name of readdirSync(dir, { recursive: true }) as string[]) {
      if (!name.toLowerCase().endsWith('.csv')) continue;
      const st = statSync(join(dir, name));
      if (st.isFile()) bytes += st.size;
    }
  } catch {
    return '';
  }
  const need = bytes * HEAP_PER_CSV_BYTE;
  if (need <= heapLimit * 0.9) return '';
  const gb = (x: number) => (x / 2 ** 30).toFixed(1);
  const mb = Math.ceil(need / 2 ** 20 / 1024) * 1024;
  return (
    `myofolio build: warning: this study has ${gb(bytes)} GB of CSV and may need about ${gb(need)} GB of memory, more than Node's heap limit of ${gb(heapLimit)} GB here; ` +
    `if the build stops with "JavaScript heap out of memory", run it as NODE_OPTIONS=--max-old-space-size=${mb} ${cmd} build … (on a machine with that much free memory).\n`
  );
}

export const command: Command = {
  name: 'build',
  usage: 'build <study-dir> [--out <dir>] [--force] [--no-cache]',
  summary: `Check, analyse and write the report site of a study, or of an archive of studies (default --out ${DEFAULT_OUT}).`,
  async run(args: string[], io: Io): Promise<number> {
    const parsed = parseArgs(args);
    if (typeof parsed === 'string') {
      io.stderr.write(`myofolio build: ${parsed}.\n${CLI.badArgs(this.usage, io.command)}`);
      return 2;
    }
    const dir = isAbsolute(parsed.study) ? parsed.study : join(io.cwd, parsed.study);
    // An empty --out stays empty, so that the build refuses it as such (not as the working folder).
    const out = parsed.out === '' || isAbsolute(parsed.out) ? parsed.out : join(io.cwd, parsed.out);
    if (!existsSync(dir) || !statSync(dir).isDirectory()) {
      io.stderr.write(`myofolio build: cannot read the study folder '${parsed.study}': no such folder.\n`);
      return 1;
    }
    if (isArchiveFolder(dir)) return runArchiveBuild(dir, out, { force: parsed.force, noCache: parsed.noCache, sourceDateEpoch: sourceDateEpoch(process.env) }, io);
    if (!existsSync(join(dir, MANIFEST_NAME))) {
      io.stderr.write(`myofolio build: '${parsed.study}' has no ${MANIFEST_NAME}. Run '${io.command ?? 'myofolio'} init <dir>' for a starter study.\n`);
      return 1;
    }
    const memoryNote = memoryWarning(dir, getHeapStatistics().heap_size_limit, io.command);
    if (memoryNote) io.stderr.write(memoryNote);
    const started = Date.now();
    const outcome = await runBuild(io, MANIFEST_NAME, (progress) =>
      buildStudy(dir, out, {
        force: parsed.force,
        ...(parsed.noCache ? { store: false as const } : {}),
        sourceDateEpoch: sourceDateEpoch(process.env),
        onPhase: (p) => progress.onProgress(p, 0, 1),
        onProgress: progress.onProgress,
        removePrevious: 'background',
      }),
    );
    if (typeof outcome === 'number') return outcome;
    const r = outcome.results!;
    const shown = relative(io.cwd, outcome.out!) || '.';
    io.stdout.write(
      `Built ${r.variants.length} variants, ${r.assays.length} assays, ${outcome.pages} pages in ${((Date.now() - started) / 1000).toFixed(1)} s.\n` +
        `Open ${join(shown, 'index.html')} in a browser.\n`,
    );
    if (outcome.movedAside) io.stdout.write(`The folder that was there before was moved to ${relative(io.cwd, outcome.movedAside)}.\n`);
    return 0;
  },
};
