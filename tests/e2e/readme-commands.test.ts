/**
 * The README's "Using it on your own study" commands, run as written (through the real launcher)
 * in a temporary folder: init → check → build must all succeed on the starter study.
 */
import { describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';

const launcher = path.resolve('dist/cli/myofolio.js');

describe('README usage commands', () => {
  it('init, check and build a starter study as the README shows', () => {
    const readme = readFileSync('README.md', 'utf8');
    const commands = readme
      .split('\n')
      .map((l) => l.trim())
      .filter((l) => l.startsWith('node dist/cli/myofolio.js '))
      .map((l) => l.replace(/\s+#.*$/, '').split(/\s+/).slice(2));
    expect(commands.map((c) => c[0])).toEqual(['init', 'check', 'build']);
    const dir = mkdtempSync(path.join(os.tmpdir(), 'myofolio-readme-'));
    for (const args of commands) {
      // execFileSync throws on a non-zero exit code, with the output in the error.
      execFileSync(process.execPath, [launcher, ...args], { cwd: dir, encoding: 'utf8', env: { ...process.env, XDG_CACHE_HOME: path.join(dir, 'cache') } });
    }
    expect(existsSync(path.join(dir, 'my-study', 'study.json'))).toBe(true);
    expect(existsSync(path.join(dir, 'my-study-site', 'index.html'))).toBe(true);
  });
});
