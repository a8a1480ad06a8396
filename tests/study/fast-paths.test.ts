/**
 * The loader's fast paths give exactly what the general paths give: the quote-free CSV split
 * against papaparse itself, the hand number scan against the plain-number regular expression,
 * the compiled row pre-check against ajv, the duplicate index on files larger than its first
 * capacity, and one field order for every typed row. Invariants are common practice, no source;
 * fast-check runs with a fixed seed.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { numberCellValue, parseCsv, scanCsv } from '../../src/study/csv.js';
import { readManifest } from '../../src/study/manifest.js';
import { compileRowCheck } from '../../src/study/row-check.js';
import { readRows } from '../../src/study/rows.js';
import { CATALOGUE, INPUT_KINDS, ROW_SCHEMAS, validators } from '../../src/study/schemas.js';
import type { Issue } from '../../src/study/types.js';
import { baseManifest, loadWith } from './fixtures.js';
import { rowsOf as rowsOfKind } from '../../src/assays/assay-common.js';
import { FORCE_PCA } from '../../src/assays/force/inputs.js';

const SEED = 20250302;

function rowsOf(text: string, papaparseOnly: boolean): { rows: Array<[string[], number]>; issues: unknown[]; delimiter: string } {
  const rows: Array<[string[], number]> = [];
  const r = scanCsv(text, 'f.csv', (cells, line) => rows.push([cells, line]), { papaparseOnly });
  return { rows, issues: r.issues, delimiter: r.delimiter };
}

describe('quote-free CSV split', () => {
  it('gives the same cells and lines as papaparse, for any mix of CR, LF, CRLF, comments and blanks', () => {
    const piece = fc.constantFrom(',', ';', 'a', '1', ' ', '#', 'WT', '\r', '\n', '\r\n', '\r\r', '\n\n', '\uFEFF', 'µ');
    fc.assert(
      fc.property(fc.array(piece, { maxLength: 120 }), (parts) => {
        const text = parts.join('');
        expect(rowsOf(text, false)).toEqual(rowsOf(text, true));
      }),
      { seed: SEED, numRuns: 3000 },
    );
  });

  it('counts lines through comments, blank lines and a CRLF file', () => {
    const text = '# c\r\nvariant,x\r\n\r\n# d\r\nWT,1\r\n  \r\nA,3\r\n';
    expect(rowsOf(text, false).rows).toEqual([
      [['variant', 'x'], 2],
      [['WT', '1'], 5],
      [['A', '3'], 7],
    ]);
  });

  it('keeps the line of rows after a stray CR inside a LF file', () => {
    // The lone CR is a line break of its own in the line table: the row 'A,1\rZ' starts on line 2
    // and ends on line 3, so 'B,2' is on line 4.
    const text = 'v,x\nA,1\rZ\nB,2\n';
    const fast = rowsOf(text, false);
    expect(fast).toEqual(rowsOf(text, true));
    expect(fast.rows.map((r) => r[1])).toEqual([1, 2, 4]);
  });
});

describe('number cells', () => {
  // The documented rule (src/study/csv.ts), written as a regular expression.
  const PLAIN = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;
  const expected = (t: string, decimal: '.' | ',', integer: boolean): number => {
    let s = t;
    if (decimal === ',') {
      if (s.includes('.')) return NaN;
      s = s.replace(',', '.');
    }
    if (!PLAIN.test(s)) return NaN;
    const v = Number(s);
    if (!Number.isFinite(v) || (integer && !Number.isInteger(v))) return NaN;
    return v;
  };

  it('accepts exactly what the plain-number pattern accepts, with the same value', () => {
    const text = fc.array(fc.constantFrom('0', '1', '5', '9', '.', ',', 'e', 'E', '+', '-', ' ', 'x', '٣', '1e999', '00'), { maxLength: 10 }).map((p) => p.join(''));
    fc.assert(
      fc.property(text, fc.constantFrom('.' as const, ',' as const), fc.boolean(), (t, decimal, integer) => {
        expect(Object.is(numberCellValue(t, decimal, integer), expected(t, decimal, integer))).toBe(true);
      }),
      { seed: SEED, numRuns: 5000 },
    );
  });

  it('reads decimal text to the same double as Number() (exact fast path and its limits)', () => {
    const digits = (max: number) => fc.array(fc.constantFrom('0', '1', '2', '3', '4', '5', '6', '7', '8', '9'), { maxLength: max }).map((d) => d.join(''));
    const text = fc
      .tuple(fc.constantFrom('', '-', '+'), digits(18), digits(18), fc.option(fc.integer({ min: -40, max: 40 }), { nil: undefined }))
      .filter(([, i, f]) => i.length + f.length > 0)
      .map(([sign, i, f, e]) => `${sign}${i}${f ? `.${f}` : ''}${e === undefined ? '' : `e${e}`}`);
    fc.assert(
      fc.property(text, (t) => {
        expect(Object.is(numberCellValue(t, '.'), Number(t))).toBe(true);
        expect(Object.is(numberCellValue(t.replace('.', ','), ','), Number(t))).toBe(true);
      }),
      { seed: SEED, numRuns: 20000 },
    );
  });

  it('reads the documented examples', () => {
    expect(numberCellValue('1,5', ',')).toBe(1.5);
    expect(numberCellValue('1,5', '.')).toBeNaN();
    expect(numberCellValue('.5', '.')).toBe(0.5);
    expect(numberCellValue('5.', '.')).toBe(5);
    expect(numberCellValue('00123', '.', true)).toBe(123);
    expect(numberCellValue('1e999', '.')).toBeNaN();
    expect(numberCellValue('150.13', '.')).toBe(150.13);
    expect(Object.is(numberCellValue('-0', '.'), -0)).toBe(true);
  });
});

describe('row pre-check', () => {
  for (const kind of INPUT_KINDS) {
    it(`${kind}: says "valid" exactly when ajv does`, () => {
      const columns = CATALOGUE[kind]!.columns;
      const validate = validators().rows[kind]!;
      const value = (type: string, enumValues?: string[]) =>
        type === 'string'
          ? fc.oneof(fc.constantFrom(...(enumValues ?? ['a', 'WT'])), fc.constantFrom('other', 'sample', 'actin-only')).map((v): string | number => v)
          : fc.oneof(fc.constantFrom(0, -0, 1, 2.5, -1, 3, 10, 11, 1e3, -0.2), fc.integer({ min: -5, max: 20 }), fc.double({ min: -1e6, max: 1e6, noNaN: true }));
      const present = fc.subarray(columns.map((c) => c.name));
      fc.assert(
        fc.property(present, fc.tuple(...columns.map((c) => fc.option(value(c.type, c.enum), { nil: undefined }))), (names, values) => {
          const vals = names.map((n) => values[columns.findIndex((c) => c.name === n)]);
          const check = compileRowCheck(ROW_SCHEMAS[kind]!, (n) => (names.includes(n) ? names.indexOf(n) : undefined))!;
          const obj: Record<string, unknown> = {};
          names.forEach((n, i) => {
            if (vals[i] !== undefined) obj[n] = vals[i];
          });
          expect(check(vals)).toBe(validate(obj));
        }),
        { seed: SEED, numRuns: 1500 },
      );
    });
  }

  it('compiles every row schema (no keyword falls back to ajv alone)', () => {
    for (const kind of INPUT_KINDS) expect(compileRowCheck(ROW_SCHEMAS[kind]!, () => 0)).toBeTypeOf('function');
  });

  it('gives up on keywords it does not know', () => {
    expect(compileRowCheck({ type: 'object', properties: { a: { type: 'string', pattern: '^x' } } }, () => 0)).toBeUndefined();
  });
});

describe('duplicate observations in large files', () => {
  it('are found far apart, past the first index capacity, with 0 and −0 alike', () => {
    const head = 'variant,preparation,batch,trace,time (s),fluorescence';
    const rows = Array.from({ length: 4000 }, (_, i) => `WT,u1,B1,t${i % 4},${Math.floor(i / 4)},${i}`);
    // Lines: header 1, data 2..4001; then three repeats of earlier keys.
    rows.push('WT,u1,B1,t0,0,7', 'WT,u1,B1,t3,999,1', 'WT,u1,B1,t1,-0,2');
    // The row reader itself (loadStudy then groups the three into one message).
    const m = baseManifest();
    m.files = [{ path: 't.csv', kind: 'turnover' }];
    const { manifest } = readManifest(JSON.stringify(m), 'study.json');
    const issues: Issue[] = [];
    readRows('turnover', parseCsv([head, ...rows].join('\n'), 't.csv'), manifest!.files[0]!, 't.csv', manifest!.byLabel, issues);
    const dups = issues.filter((i) => i.code === 'csv.duplicate-observation');
    expect(dups.map((i) => [i.at.line, i.message.match(/line (\d+)/)![1]])).toEqual([
      [4002, '2'],
      [4003, '4001'],
      [4004, '3'],
    ]);
  });
});

describe('typed rows', () => {
  it('have one field order, whether every optional cell is filled or not', () => {
    const head = 'variant,preparation,batch,pCa,force (mN),area (mm²),replicate';
    const o = loadWith('f.csv', 'force-pca', [head, 'WT,w1,B1,5,0.01,0.0004,r1', 'WT,w1,B1,6,0.01,0.0004,'].join('\n'));
    const rows = rowsOfKind(o.study!, FORCE_PCA);
    expect(rows.map((r) => Object.keys(r))).toEqual([
      ['variant', 'unit', 'batch', 'at', 'pCa', 'replicate', 'tensionKPa'],
      ['variant', 'unit', 'batch', 'at', 'pCa', 'tensionKPa'],
    ]);
    // 0.01 mN over 0.0004 mm² is 25 kPa (computed from the inputs: 1 mN/mm² = 1 kPa).
    expect(rows[0]!.tensionKPa).toBeCloseTo(25, 12);
  });
});
