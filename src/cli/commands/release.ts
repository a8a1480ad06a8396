/**
 * `myofolio release <archive-dir> <study-id> --note <text> [--out <dir>] [--date YYYY-MM-DD]`:
 * freeze a study's built results, its caveats and their SHA-256 in the archive's releases/ folder.
 */
import { isAbsolute, join, relative } from 'node:path';
import { ARCHIVE_MANIFEST_NAME } from '../../archive/manifest.js';
import { releaseName } from '../../archive/release.js';
import { isArchiveFolder } from '../../pipeline/archive-input.js';
import { releaseStudy } from '../../pipeline/release-study.js';
import { type Command, type Io, readArguments } from '../command.js';
import { CLI } from '../messages.js';
import { DEFAULT_OUT, sourceDateEpoch } from './build.js';
import { formatIssue } from './check.js';

interface ReleaseArgs {
  archive: string;
  study: string;
  note: string;
  out: string;
  date?: string;
}

function parseArgs(args: string[]): ReleaseArgs | string {
  const got = readArguments(args, {
    '--note': { needs: 'a text, e.g. --note "sent to the cardiogenetics clinic"' },
    '--out': { alias: '-o', needs: 'a folder' },
    '--date': { needs: 'a date YYYY-MM-DD' },
  });
  if ('problem' in got) return got.problem;
  const [archive, study] = got.positional;
  if (got.positional.length !== 2 || archive === undefined || study === undefined) return 'give the archive folder and the id of the study to release';
  const note = got.values.get('--note');
  if (note === undefined) return 'say with whom or why the results are shared: --note "sent to the cardiogenetics clinic"';
  const date = got.values.get('--date');
  return { archive, study, note, out: got.values.get('--out') ?? DEFAULT_OUT, ...(date !== undefined ? { date } : {}) };
}

export const command: Command = {
  name: 'release',
  usage: 'release <archive-dir> <study-id> --note <text> [--out <dir>] [--date YYYY-MM-DD]',
  summary: `Freeze a study's built results (from --out, default ${DEFAULT_OUT}) with their caveats and SHA-256 in the archive's releases/ folder.`,
  async run(args: string[], io: Io): Promise<number> {
    const parsed = parseArgs(args);
    if (typeof parsed === 'string') {
      io.stderr.write(`myofolio release: ${parsed}.\n${CLI.badArgs(this.usage)}`);
      return 2;
    }
    const abs = (p: string) => (isAbsolute(p) ? p : join(io.cwd, p));
    const dir = abs(parsed.archive);
    if (!isArchiveFolder(dir)) {
      io.stderr.write(`myofolio release: '${parsed.archive}' has no ${ARCHIVE_MANIFEST_NAME}; releases belong to an archive folder (see README, "Archives").\n`);
      return 1;
    }
    const date = parsed.date ?? new Date().toISOString().slice(0, 10);
    const made = await releaseStudy(dir, { studyId: parsed.study, note: parsed.note, date, out: abs(parsed.out), ...(sourceDateEpoch(process.env) !== undefined ? { sourceDateEpoch: sourceDateEpoch(process.env) } : {}) });
    for (const i of made.issues) io.stdout.write(`${formatIssue(i)}\n`);
    if (!made.release) {
      io.stdout.write('Nothing was released.\n');
      return 1;
    }
    const r = made.release.record;
    const folder = relative(io.cwd, join(dir, ...made.release.folder.split('/')));
    io.stdout.write(
      `Released study ${r.study} (${made.results?.study.title ?? ''}): ${releaseName(r)}, note "${r.note}".\n` +
        `  ${folder}/results.json  SHA-256 ${r.resultsSha256}\n` +
        `  ${folder}/release.json  with the ${r.caveats.length} caveats it went out with\n` +
        'Both files are read-only and never changed; every later build compares the study with this release.\n',
    );
    return 0;
  },
};
