/** `myofolio check <archive-dir>`: the archive half of the check command (src/cli/commands/check.ts). */
import { ARCHIVE_MANIFEST_NAME } from '../../archive/manifest.js';
import { checkArchive } from '../../pipeline/archive-input.js';
import type { Io } from '../command.js';
import { CLI } from '../messages.js';
import type { Issue } from '../../study/types.js';

/** The issue formatting of check.ts is passed in (check.ts imports this file). */
export interface IssueFormat {
  formatIssue(i: Issue): string;
  sortIssues(issues: readonly Issue[], manifestName: string): Issue[];
}

export async function runArchiveCheck(dir: string, io: Io, { formatIssue, sortIssues }: IssueFormat): Promise<number> {
  const { issues, studies, releases } = await checkArchive(dir);
  for (const i of sortIssues(issues, ARCHIVE_MANIFEST_NAME)) io.stdout.write(`${formatIssue(i)}\n`);
  const errors = issues.filter((i) => i.severity === 'error').length;
  if (studies) io.stdout.write(`Archive: ${studies} ${studies === 1 ? 'study' : 'studies'}, ${releases} ${releases === 1 ? 'release' : 'releases'} (each checked against its SHA-256).\n`);
  io.stdout.write(CLI.checkSummary(errors, issues.length - errors));
  return errors > 0 ? 1 : 0;
}
