/** `myofolio build <archive-dir>`: the archive half of the build command (src/cli/commands/build.ts). */
import { join, relative } from 'node:path';
import { changeLines } from '../../archive/changes.js';
import { ARCHIVE_MANIFEST_NAME } from '../../archive/manifest.js';
import { buildArchive } from '../../pipeline/build-archive.js';
import { OutputError } from '../../pipeline/output.js';
import type { Io } from '../command.js';
import { createProgress, type ProgressStream } from '../progress.js';
import { formatIssue, sortIssues } from './check.js';

export async function runArchiveBuild(dir: string, out: string, options: { force: boolean; sourceDateEpoch?: number }, io: Io): Promise<number> {
  const started = Date.now();
  const progress = createProgress(io.stderr as ProgressStream);
  try {
    const outcome = await buildArchive(dir, out, {
      force: options.force,
      ...(options.sourceDateEpoch !== undefined ? { sourceDateEpoch: options.sourceDateEpoch } : {}),
      onPhase: (p) => progress.onProgress(p, 0, 1),
      onProgress: progress.onProgress,
      removePrevious: 'background',
    });
    progress.done();
    for (const note of outcome.notes) io.stderr.write(`myofolio build: note: ${note}\n`);
    for (const i of sortIssues(outcome.issues, ARCHIVE_MANIFEST_NAME)) io.stdout.write(`${formatIssue(i)}\n`);
    if (!outcome.ok) {
      const errors = outcome.issues.filter((i) => i.severity === 'error').length;
      io.stdout.write(`${errors} error(s): nothing was built; the previous output, if any, is unchanged.\n`);
      return 1;
    }
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
  } catch (err) {
    progress.done();
    if (err instanceof OutputError) {
      io.stderr.write(`myofolio build: ${err.message}\n  fix: ${err.fix}\n`);
      return 1;
    }
    const message = err instanceof Error ? err.message : String(err);
    io.stderr.write(`myofolio build: the archive build failed: ${message}\nThe previous output, if any, is unchanged. Please report this with the archive's check output.\n`);
    if (process.env.MYOFOLIO_DEBUG && err instanceof Error) io.stderr.write(`${err.stack}\n`);
    return 1;
  }
}
