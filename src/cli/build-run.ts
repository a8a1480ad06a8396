/**
 * What `build` prints around a study build and an archive build alike (src/cli/commands/build.ts,
 * archive-build.ts): the progress line, the store's notes, the issues found, and a refusal of the
 * output as one message with its fix. Anything else a build throws goes on to main(), which says it
 * in one line (src/cli/main.ts failureText).
 */
import type { Issue } from '../study/types.js';
import { OutputError } from '../pipeline/output.js';
import type { Io } from './command.js';
import { formatIssue, sortIssues } from './commands/check.js';
import { createProgress, type Progress, type ProgressStream } from './progress.js';

interface Outcome {
  ok: boolean;
  notes: readonly string[];
  issues: readonly Issue[];
}

/**
 * Run one build with a progress line on standard error, print its notes and issues, and return
 * the exit code when it stopped (1: input errors, or an output refused) or the outcome when it built.
 */
export async function runBuild<T extends Outcome>(io: Io, manifestName: string, build: (progress: Progress) => Promise<T>): Promise<number | T> {
  const progress = createProgress(io.stderr as ProgressStream);
  let outcome: T;
  try {
    outcome = await build(progress);
  } catch (err) {
    if (!(err instanceof OutputError)) throw err;
    io.stderr.write(`myofolio build: ${err.message}\n  fix: ${err.fix}\n`);
    return 1;
  } finally {
    progress.done();
  }
  for (const note of outcome.notes) io.stderr.write(`myofolio build: note: ${note}\n`);
  for (const i of sortIssues(outcome.issues, manifestName)) io.stdout.write(`${formatIssue(i, io.command)}\n`);
  if (outcome.ok) return outcome;
  const errors = outcome.issues.filter((i) => i.severity === 'error').length;
  io.stdout.write(`${errors} error(s): nothing was built; the previous output, if any, is unchanged.\n`);
  return 1;
}
