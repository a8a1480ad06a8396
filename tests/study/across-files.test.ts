/**
 * The same observation in two files is an error naming both places; a preparation split over
 * files without repeats is fine. A study with no data rows, or with no variant besides WT, is an
 * error saying what to add.
 * Fixtures are invented (common practice, no source).
 */
import { describe, expect, it } from 'vitest';
import { loadStudy } from '../../src/study/load.js';
import { RATES, baseManifest } from './fixtures.js';

const HEAD = 'variant,preparation,batch,actin (uM),rate (1/s)';
const two = (a: string, b: string, patch?: (m: Record<string, any>) => void) => {
  const m = baseManifest();
  m.files = [
    { path: 'rates.csv', kind: 'atpase-rates' },
    { path: 'rates-corrected.csv', kind: 'atpase-rates' },
  ];
  patch?.(m);
  return { manifest: JSON.stringify(m), files: { 'rates.csv': a, 'rates-corrected.csv': b } };
};

describe('the same observation in two files', () => {
  it('a corrected copy listed beside the old file: one error at the copy, naming both places', () => {
    const corrected = RATES.replace('R2Q,p1,B1,50,3.1', 'R2Q,p1,B1,50,3.3');
    const o = loadStudy(two(RATES, corrected));
    const dup = o.issues.filter((i) => i.code === 'csv.duplicate-across-files');
    expect(dup).toHaveLength(1);
    expect(dup[0]).toMatchObject({ severity: 'error', count: 6, at: { file: 'rates-corrected.csv', line: 2, lineEnd: 7 } });
    expect(dup[0]!.message).toBe(
      "This row repeats the observation on line 2 of 'rates.csv' (variant WT, preparation w1, batch B1, actin 0 µM). The same on 5 more rows (6 in all, lines 2–7).",
    );
    expect(o.study).toBeUndefined();
  });

  it('units do not hide a repeat: 50 µM in one file is 50000 nM in the other', () => {
    const nM = `variant,preparation,batch,actin (nM),rate (1/s)\nK4E,p2,B1,50000,2.4\n`;
    const o = loadStudy(two(RATES, nM));
    expect(o.issues.find((i) => i.code === 'csv.duplicate-across-files')?.message).toContain("line 7 of 'rates.csv' (variant K4E, preparation p2, batch B1, actin 50 µM");
  });

  it('a preparation split over two files without repeats is fine (how a large file is split)', () => {
    const lines = RATES.split('\n');
    const o = loadStudy(two(lines.slice(0, 4).join('\n'), [HEAD, ...lines.slice(4)].join('\n')));
    expect(o.issues).toEqual([]);
    const more = loadStudy(two(RATES, `${HEAD}\nR2Q,p1,B1,100,3.3\n`));
    expect(more.issues).toEqual([]);
  });
});

describe('a study with nothing to analyse', () => {
  it('files with headers only: one error saying what to add', () => {
    const o = loadStudy({ manifest: JSON.stringify(baseManifest()), files: { 'rates.csv': `# template\n${HEAD}\n` } });
    const err = o.issues.find((i) => i.code === 'study.no-data')!;
    expect(err).toMatchObject({ severity: 'error', at: { file: 'study.json', jsonPath: '/files' } });
    expect(err.message).toContain('its one file holds a data row');
    expect(err.fix).toContain('Add one row per observation');
  });

  it('only the wild type declared: an error saying to add the variants', () => {
    const m = baseManifest();
    m.variants = [{ wt: true }];
    const o = loadStudy({ manifest: JSON.stringify(m), files: { 'rates.csv': 'variant,preparation,batch,actin (uM),rate (1/s)\nWT,w1,B1,0,0.03\n' } });
    expect(o.issues.find((i) => i.code === 'study.no-variants')).toMatchObject({ severity: 'error', at: { jsonPath: '/variants' } });
  });
});
