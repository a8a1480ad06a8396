/** `myofolio build <archive-dir>`: the archive half of the build command (src/cli/commands/build.ts). */
import { join, relative } from 'node:path';
import { changeLines } from '../../archive/changes.js';
import { ARCHIVE_MANIFEST_NAME } from '../../archive/manifest.js';
import { buildArchive } from '../../pipeline/build-archive.js';
import type { Io } from '../command.js';
import { runBuild } from '../build-run.js';

export async function runArchiveBuild(dir: string, out: string, options: { force: boolean; noCache?: boolean; sourceDateEpoch?: number }, io: Io): Promise<number> {
  const started = Date.now();
  const outcome = await runBuild(io, ARCHIVE_MANIFEST_NAME, (progress) =>
    buildArchive(dir, out, {
      force: options.force,
      ...(options.noCache ? { store: false as const } : {}),
      ...(options.sourceDateEpoch !== undefined ? { sourceDateEpoch: options.sourceDateEpoch } : {}),
      onPhase: (p) => progress.onProgress(p, 0, 1),
      onProgress: progress.onProgress,
      removePrevious: 'background',
    }),
  );
  if (typeof outcome === 'number') return outcome;
  const built = outcome.studies.filter((s) => s.status === 'built');
  const reused = outcome.studies.length - built.length;
  const shown = relative(io.cwd, outcome.out!) || '.';
  const pages = outcome.pages!;
  io.stdout.write(
    `Built the archive: ${outcome.studies.length} ${outcome.studies.length === 1 ? 'study' : 'studies'} (${built.length} built${built.length ? `: ${built.map((s) => s.id).join(', ')}` : ''}; ${reused} unchanged, reused), ` +
      `${pages.written + pages.reused} archive pages (${pages.written} written, ${pages.reused} unchanged) in ${((Date.now() - started) / 1000).toFixed(1)} s.\n` +
      `Open ${join(shown, 'index.html')} in a browser.\n`,
  );
  if (outcome.movedAside) io.stdout.write(`The folder that was there before was moved to ${relative(io.cwd, outcome.movedAside)}.\n`);
  const discordant = outcome.history?.discordant.length ?? 0;
  if (discordant) io.stdout.write(`${discordant} discordant variant${discordant === 1 ? '' : 's'} (studies disagree): see the home page.\n`);
  // What changed since each study's latest release, at the end, where it is seen.
  for (const c of outcome.comparisons) {
    io.stdout.write(`\nStudy ${c.study}, compared with its latest release:\n`);
    for (const line of changeLines(c)) io.stdout.write(`  ${line}\n`);
  }
  return 0;
}
