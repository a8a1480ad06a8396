import { mkdirSync, mkdtempSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { loadStudy } from '../../src/study/load.js';
import { readStudyFolder } from '../../src/study/read-folder.js';
import { RATES, baseManifest } from './fixtures.js';

const root = mkdtempSync(join(tmpdir(), 'myofolio-read-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

function folder(name: string, files: Record<string, unknown>[]): string {
  const dir = join(root, name);
  mkdirSync(dir);
  const m = baseManifest();
  m.files = files;
  writeFileSync(join(dir, 'study.json'), JSON.stringify(m));
  writeFileSync(join(dir, 'rates.csv'), RATES);
  return dir;
}

describe('readStudyFolder', () => {
  it('reads listed files and their SHA-256', () => {
    const dir = folder('ok', [{ path: 'rates.csv', kind: 'atpase-rates' }]);
    const files = readStudyFolder(dir);
    const o = loadStudy(files);
    expect(o.issues).toEqual([]);
    // SHA-256 of the fixture text, computed with node:crypto at the reader; the loader keeps it.
    expect(o.study!.files[0]!.sha256).toBe(files.sha256!.get('rates.csv'));
  });

  it('refuses a symbolic link that points outside the folder', () => {
    const outside = join(root, 'outside.csv');
    writeFileSync(outside, RATES);
    const dir = folder('link', [{ path: 'rates.csv', kind: 'atpase-rates' }, { path: 'out.csv', kind: 'atpase-rates' }]);
    symlinkSync(outside, join(dir, 'out.csv'));
    const o = loadStudy(readStudyFolder(dir));
    const hit = o.issues.find((i) => i.code === 'folder.not-a-file');
    expect(hit).toMatchObject({ severity: 'error', at: { file: 'study.json', jsonPath: '/files/1/path' } });
    expect(hit!.message).toContain("'out.csv' is not a regular file inside the study folder");
    expect(o.issues.filter((i) => i.code === 'folder.file-not-found')).toEqual([]);
  });

  it('refuses a directory or device named as a file, and "..", once each', () => {
    const dir = folder('dev', [{ path: 'rates.csv', kind: 'atpase-rates' }, { path: 'sub', kind: 'turnover' }, { path: '../x.csv', kind: 'turnover' }]);
    mkdirSync(join(dir, 'sub'));
    const o = loadStudy(readStudyFolder(dir));
    expect(o.issues.map((i) => [i.code, i.at.jsonPath])).toEqual([
      ['folder.not-a-file', '/files/1/path'],
      ['folder.path-outside', '/files/2/path'],
    ]);
  });
});
