/**
 * Manifest checks added for issue 22: duplicate JSON keys, labels that name another variant,
 * gene symbols that differ only by case, and every other check still running when the manifest
 * breaks its schema. Fixtures are invented (common practice, no source); line and column numbers
 * are counted by hand from the literal texts.
 */
import { describe, expect, it } from 'vitest';
import type { LoadOutcome } from '../../src/study/types.js';
import { RATES, baseManifest, load } from './fixtures.js';

const codes = (o: LoadOutcome) => o.issues.map((i) => i.code);
const m = (patch: (x: Record<string, any>) => void) => {
  const x = baseManifest();
  patch(x);
  return x;
};

describe('duplicate JSON keys', () => {
  it('are errors at the repeat, naming the first line ("synthetic": true then false)', () => {
    const text = JSON.stringify(baseManifest(), null, 2).replace('"synthetic": true,', '"synthetic": true,\n  "synthetic": false,');
    const o = load(text);
    const dup = o.issues.find((i) => i.code === 'manifest.duplicate-key')!;
    // Line 1 '{', 2 title, 3 lab, 4 '"dates": [', 5 the date, 6 ']', 7 synthetic, 8 the repeat.
    expect(dup).toMatchObject({ severity: 'error', at: { file: 'study.json', line: 8, col: 3, jsonPath: '/synthetic' } });
    expect(dup.message).toContain("The field 'synthetic' appears twice in the same object (first on line 7)");
    expect(o.study).toBeUndefined();
  });

  it('are found inside lists of objects too', () => {
    const x = baseManifest();
    const text = JSON.stringify(x).replace('"path":"rates.csv"', '"path":"old.csv","path":"rates.csv"');
    const o = load(text);
    expect(o.issues.find((i) => i.code === 'manifest.duplicate-key')?.at.jsonPath).toBe('/files/0/path');
  });
});

describe('labels and gene symbols', () => {
  it('a label that is another variant\'s short form is an error', () => {
    const o = load(m((x) => (x.variants[2].label = 'R2Q')));
    // Its label equals R2Q's own label too, so the duplicate-label rule also speaks.
    expect(codes(o)).toContain('manifest.duplicate-label');
    const swapped = load(
      m((x) => {
        x.variants[1].label = 'first';
        x.variants[2].label = 'R2Q';
      }),
      { 'rates.csv': RATES.replace(/^R2Q,/m, 'first,') },
    );
    const hit = swapped.issues.find((i) => i.code === 'manifest.label-names-other')!;
    expect(hit).toMatchObject({ severity: 'error', at: { jsonPath: '/variants/2/label' } });
    expect(hit.message).toContain("The label 'R2Q' is the name of another declared variant, ZZG1 p.Arg2Gln");
  });

  it('a label that is another variant\'s HGVS is an error', () => {
    const o = load(m((x) => (x.variants[2].label = 'p.Arg2Gln')));
    expect(o.issues.find((i) => i.code === 'manifest.label-names-other')?.at.jsonPath).toBe('/variants/2/label');
  });

  it('a variant labelled with its own short form or HGVS is fine', () => {
    expect(load(m((x) => (x.variants[1].label = 'p.Arg2Gln'))).issues.filter((i) => i.severity === 'error')).toEqual([]);
  });

  it('gene symbols that differ only by case are refused', () => {
    const o = load(
      m((x) => {
        x.genes.push({ symbol: 'zzg1' });
        for (const v of x.variants) v.gene = 'ZZG1';
      }),
    );
    const hit = o.issues.find((i) => i.code === 'manifest.gene-case')!;
    expect(hit).toMatchObject({ severity: 'error', at: { jsonPath: '/genes/1/symbol' } });
    expect(hit.message).toBe("The gene symbols 'ZZG1' and 'zzg1' differ only by case, so their variants could not be told apart.");
  });

  it('an undeclared gene spelt in another case gets a suggestion', () => {
    const o = load(m((x) => (x.variants[2].gene = 'Zzg1')));
    expect(o.issues.find((i) => i.code === 'manifest.unknown-gene')?.message).toBe("The gene 'Zzg1' is not declared in genes. Did you mean 'ZZG1'?");
  });

  it('two genes whose report names would collide are refused', () => {
    const o = load(
      m((x) => {
        x.genes = [{ symbol: 'ZZ-G1' }, { symbol: 'ZZ.G1' }];
        x.variants = [{ wt: true, gene: 'ZZ-G1' }, { wt: true, gene: 'ZZ.G1', label: 'WT2' }, { hgvs: 'R2Q', gene: 'ZZ-G1' }];
      }),
    );
    expect(codes(o)).toContain('manifest.variant-id-clash');
  });
});

describe('schema errors do not stop the other checks', () => {
  it('a missing title, a missing file and a bad CSV cell are all reported in one run', () => {
    const o = load(
      m((x) => {
        delete x.title;
        x.files.push({ path: 'gone.csv', kind: 'turnover' });
      }),
      { 'rates.csv': RATES.replace('WT,w1,B1,50,2.6', 'WT,w1,B1,50,fast') },
    );
    expect(o.issues.map((i) => [i.code, i.at.jsonPath ?? i.at.line])).toEqual(
      expect.arrayContaining([
        ['manifest.required', '/title'],
        ['folder.file-not-found', '/files/1/path'],
        ['csv.not-a-number', 3],
      ]),
    );
  });

  it('a variant entry with a schema error gives no false errors on its rows or on WT', () => {
    const o = load(m((x) => (x.variants[1].control.class = 'VUS')));
    expect(o.issues.map((i) => i.code)).toEqual(['manifest.enum']);
  });

  it('a wild-type entry with a schema error does not make every batch lack WT', () => {
    const o = load(m((x) => (x.variants[0].colour = 'red')));
    expect(o.issues.map((i) => i.code)).toEqual(['manifest.unknown-field']);
  });

  it('a file entry with a schema error is left out; the other files are still read', () => {
    const o = load(
      m((x) => x.files.unshift({ path: 'other.csv', kind: 'atpase-ratez' })),
      { 'rates.csv': RATES.replace('WT,w1,B1,50,2.6', 'WT,w1,B1,50,fast') },
    );
    expect(o.issues.map((i) => [i.code, i.at.jsonPath ?? i.at.line])).toEqual([
      ['manifest.enum', '/files/0/kind'],
      ['csv.not-a-number', 3],
    ]);
  });

  it('a manifest that is not an object stops there, with one error', () => {
    expect(codes(load('[1, 2]'))).toEqual(['manifest.type']);
  });
});
