/**
 * Before any test: compile the sources to dist/ (as `npm install` does through `prepare`), so the
 * tests that run the command line run the JavaScript users run, built from the sources under test.
 */
import { execFileSync } from 'node:child_process';
import { join } from 'node:path';

export default function setup(): void {
  const repo = join(import.meta.dirname, '..');
  execFileSync(process.execPath, [join(repo, 'node_modules', 'typescript', 'bin', 'tsc'), '-p', join(repo, 'tsconfig.build.json')], { cwd: repo, stdio: 'inherit' });
}
