/**
 * Broken and hostile study folders (tests/fixtures/hostile/broken-studies.ts): `check` and
 * `build` both exit 1, print each problem as `file:line:col` (or `file:/json/path`) with a fix,
 * never a stack trace, never hang; a study with several problems gets all of them in one run.
 * Expected line/column numbers are counted from the generated files (common practice, no source).
 */
import { existsSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { formatIssue } from '../../src/cli/commands/check.js';
import { loadStudy } from '../../src/study/load.js';
import { readStudyFolder } from '../../src/study/read-folder.js';
import { CASES, MANY, type BrokenCase, type Expected } from '../fixtures/hostile/broken-studies.js';
import { CRASH, cleanup, copyDemo, runChild, runCli, tempRoot } from './helpers.js';

const root = tempRoot('broken');
afterAll(() => cleanup(root));
const hasMkfifo = ['/usr/bin/mkfifo', '/bin/mkfifo'].some((p) => existsSync(p));

let n = 0;
function prepare(c: BrokenCase): string {
  const dir = join(root, `case-${++n}`, 'study');
  copyDemo(dir);
  c.make(dir);
  return dir;
}

/** The printed location of an expected issue, e.g. 'force-pca.csv:4:5' or 'study.json:/files/3/path'. */
function where(e: Expected): string {
  if (e.line !== undefined) return `${e.file}:${e.line}${e.col !== undefined ? `:${e.col}` : ''}`;
  if (e.jsonPath !== undefined) return `${e.file}:${e.jsonPath}`;
  return `${e.file}:`;
}

function assertReported(out: string, expected: Expected[]): void {
  const printed = out.split('\n');
  for (const e of expected) {
    const hit = printed.find((l) => l.startsWith(`${where(e)}`) && (e.text === undefined || l.includes(e.text)));
    expect(hit, `expected ${e.code} at ${where(e)}${e.text ? ` containing "${e.text}"` : ''} in:\n${out}`).toBeDefined();
    // Every error line says what is wrong and, after the dash, how to fix it.
    expect(hit).toMatch(/: error: .+ — .+/);
  }
}

describe.each(CASES.map((c) => [c.name, c] as const))('%s', (_name, c) => {
  const skip = c.needs === 'fifo' && !hasMkfifo;
  it.skipIf(skip)('loader reports it with code and location', () => {
    const dir = prepare(c);
    const { issues } = loadStudy(readStudyFolder(dir));
    for (const e of c.expect) {
      const hit = issues.find((i) => i.code === e.code && i.at.file === e.file && (e.line === undefined || i.at.line === e.line) && (e.col === undefined || i.at.col === e.col) && (e.jsonPath === undefined || i.at.jsonPath === e.jsonPath));
      expect(hit, `${e.code} at ${where(e)}; got:\n${issues.map((i) => formatIssue(i)).join('\n')}`).toBeDefined();
      expect(hit!.severity).toBe('error');
    }
  }, 10_000);

  it.skipIf(skip)('check and build exit 1 with located messages, no crash, nothing written', async () => {
    const dir = prepare(c);
    const out = join(dir, '..', 'site');
    const check = await runCli(['check', dir], root);
    expect(check.code, check.out + check.err).toBe(1);
    assertReported(check.out, c.expect);
    expect(check.out + check.err).not.toMatch(CRASH);
    const build = await runCli(['build', dir, '--out', out], root);
    expect(build.code, build.out + build.err).toBe(1);
    assertReported(build.out, c.expect);
    expect(build.out + build.err).not.toMatch(CRASH);
    expect(build.out).toContain('nothing was built');
    expect(existsSync(out)).toBe(false);
    expect(readdirSync(join(dir, '..')).sort()).toEqual(readdirSync(join(dir, '..')).filter((f) => !f.startsWith('site')).sort());
  }, 15_000);
});

describe('a study with several independent problems', () => {
  it('check reports every problem in one run', async () => {
    const dir = prepare(MANY);
    const r = await runCli(['check', dir], root);
    expect(r.code).toBe(1);
    assertReported(r.out, MANY.expect);
    expect(r.out).toMatch(/^\d+ error\(s\), \d+ warning\(s\)\.$/m);
  });

  it('the launcher (check and build as a user runs them) exits 1 with all problems and no stack trace', () => {
    const dir = prepare(MANY);
    for (const argv of [['check', dir], ['build', dir, '--out', join(dir, '..', 'site')]]) {
      const r = runChild(argv, root);
      expect(r.code, r.out + r.err).toBe(1);
      assertReported(r.out, MANY.expect);
      expect(r.out + r.err).not.toMatch(CRASH);
    }
  }, 30_000);
});

describe('header-only file', () => {
  it('is a located warning, not an error (a fresh `myofolio init` study has header-only files)', async () => {
    const dir = join(root, 'header-only');
    copyDemo(dir);
    const { writeFileSync } = await import('node:fs');
    writeFileSync(join(dir, 'force-pca.csv'), '# comment\nvariant,preparation,batch,pCa,force (uN),area (um2)\n');
    const r = await runCli(['check', dir], root);
    expect(r.out).toMatch(/^force-pca\.csv:2: warning: The file has a header but no data rows\. — /m);
    expect(r.out).not.toContain(': error:');
    expect(r.code).toBe(0);
  });
});
