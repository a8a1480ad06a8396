/**
 * `myofolio check <study-dir>`: load and validate a study; when it loads without errors, analyse it
 * (as a build does, without the store) for the checks that need the fitted units (implausible
 * fitted values, preparations in two batches, too few controls); print every problem.
 */
import { existsSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { analyseStudy } from '../../analysis/analyse-study.js';
import { loadStudy } from '../../study/load.js';
import { readStudyFolder } from '../../study/read-folder.js';
import { TOOL_VERSION } from '../../version.js';
import { MSG, issue } from '../../study/messages.js';
import { MANIFEST_NAME } from '../../study/schemas.js';
import type { Issue } from '../../study/types.js';
import { singleFolderArgument, type Command, type Io } from '../command.js';
import { withCommand } from '../invocation.js';
import { CLI } from '../messages.js';
import { runArchiveCheck } from './archive-check.js';
import { isArchiveFolder } from '../../pipeline/archive-input.js';

/** One issue as `file:line:col: severity: message — fix` (JSON path instead of line for the manifest). */
export function formatIssue(i: Issue, command = 'myofolio'): string {
  let where = i.at.file;
  if (i.at.line !== undefined) where += `:${i.at.line}${i.at.col !== undefined ? `:${i.at.col}` : ''}`;
  else if (i.at.jsonPath !== undefined) where += `:${i.at.jsonPath}`;
  return `${where}: ${i.severity}: ${i.message} — ${withCommand(i.fix, command)}`;
}

/** Issues in reading order: by file, then line, then column; manifest first. */
export function sortIssues(issues: readonly Issue[], manifestName: string): Issue[] {
  return [...issues].sort((a, b) => {
    const fa = a.at.file === manifestName ? '' : a.at.file;
    const fb = b.at.file === manifestName ? '' : b.at.file;
    if (fa !== fb) return fa < fb ? -1 : 1;
    return (a.at.line ?? 0) - (b.at.line ?? 0) || (a.at.col ?? 0) - (b.at.col ?? 0);
  });
}

export const command: Command = {
  name: 'check',
  usage: 'check <study-dir>',
  summary: 'Validate a study folder, or an archive folder, and list every error and warning.',
  async run(args: string[], io: Io): Promise<number> {
    const dir = singleFolderArgument(args, io, this.usage);
    if (dir === null) return 2;
    if (!existsSync(dir) || !statSync(dir).isDirectory()) {
      io.stderr.write(CLI.cannotRead(args[0] ?? dir, 'no such folder'));
      return 1;
    }
    if (isArchiveFolder(dir)) return runArchiveCheck(dir, io, { formatIssue, sortIssues });
    const cmd = io.command ?? 'myofolio';
    if (!existsSync(join(dir, MANIFEST_NAME))) {
      io.stdout.write(`${formatIssue(issue(MSG.manifestMissing(MANIFEST_NAME), { file: MANIFEST_NAME }), cmd)}\n`);
      io.stdout.write(CLI.checkSummary(1, 0));
      return 1;
    }
    let loaded: ReturnType<typeof loadStudy>;
    try {
      loaded = loadStudy(readStudyFolder(dir));
    } catch (err) {
      io.stderr.write(CLI.cannotRead(args[0] ?? dir, err instanceof Error ? err.message : String(err)));
      return 1;
    }
    let issues: Issue[] = loaded.issues;
    // A study without errors is analysed too: some problems show only in what the rows give.
    if (loaded.study) {
      try {
        issues = analyseStudy(loaded.study, { toolVersion: TOOL_VERSION, builtAt: '', issues }).issues;
      } catch (err) {
        io.stderr.write(CLI.analysisFailed(err instanceof Error ? err.message : String(err)));
        if (process.env.MYOFOLIO_DEBUG && err instanceof Error) io.stderr.write(`${err.stack}\n`);
        return 1;
      }
    }
    const sorted = sortIssues(issues, MANIFEST_NAME);
    for (const i of sorted) io.stdout.write(`${formatIssue(i, cmd)}\n`);
    const errors = issues.filter((i) => i.severity === 'error').length;
    io.stdout.write(CLI.checkSummary(errors, issues.length - errors));
    return errors > 0 ? 1 : 0;
  },
};
