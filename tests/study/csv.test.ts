import { describe, expect, it } from 'vitest';
import { decodeUtf8, parseCsv, parseNumberCell, sniffDelimiter } from '../../src/study/csv.js';

describe('strict number cells', () => {
  it.each([
    ['12', '.', 12],
    ['-0.5', '.', -0.5],
    ['.5', '.', 0.5],
    ['1e-3', '.', 0.001],
    ['00123', '.', 123],
    ['+4', '.', 4],
    ['1,5', ',', 1.5],
    ['-2,25e2', ',', -225],
  ] as const)('%s (decimal %s) → %f', (text, decimal, value) => {
    expect(parseNumberCell(text, decimal)).toEqual({ ok: true, value });
  });

  it.each([
    ['1,2', '.', 'decimal-comma'],
    ['NA', '.', 'not-a-number'],
    ['2024-01-02', '.', 'not-a-number'],
    ['1,000.5', '.', 'not-a-number'],
    ['5 uM', '.', 'not-a-number'],
    ['NaN', '.', 'not-a-number'],
    ['Infinity', '.', 'not-a-number'],
    ['0x1F', '.', 'not-a-number'],
    ['1.5', ',', 'decimal-point'],
  ] as const)('%s (decimal %s) is rejected as %s', (text, decimal, reason) => {
    expect(parseNumberCell(text, decimal)).toEqual({ ok: false, reason });
  });

  it('integers', () => {
    expect(parseNumberCell('3.5', '.', true)).toEqual({ ok: false, reason: 'not-an-integer' });
    expect(parseNumberCell('7', '.', true)).toEqual({ ok: true, value: 7 });
  });
});

describe('CSV reading', () => {
  it('sniffs the delimiter from the header line only', () => {
    expect(sniffDelimiter('# a, b, c\nx;y;z\n1,2;3;4')).toBe(';');
    expect(sniffDelimiter('x,y\n')).toBe(',');
    expect(sniffDelimiter('"a;b",c\n')).toBe(',');
    expect(sniffDelimiter('onecolumn\n1\n')).toBe(',');
  });

  it('maps rows to 1-based file lines through comments, blank lines, CRLF and quoted line breaks', () => {
    const text = '# comment\r\nvariant,x\r\n\r\n# another\r\nWT,"1\r\n2"\r\n   \r\nA,3\r\n';
    const t = parseCsv(text, 'f.csv');
    expect(t.header).toEqual({ cells: ['variant', 'x'], line: 2 });
    expect(t.rows.map((r) => r.line)).toEqual([5, 8]);
    expect(t.rows[1]!.cells).toEqual(['A', '3']);
    expect(t.issues).toEqual([]);
  });

  it('strips a BOM and rejects invalid UTF-8', () => {
    expect(decodeUtf8(new Uint8Array([0xef, 0xbb, 0xbf, 0x61]))).toBe('a');
    expect(decodeUtf8(new Uint8Array([0x61, 0xff, 0x62]))).toBeUndefined();
    expect(decodeUtf8(new TextEncoder().encode('µM'))).toBe('µM');
  });

  it('reports broken quoting once, at its line', () => {
    const t = parseCsv('a,b\n1,2\n3,"x"y\n', 'f.csv');
    expect(t.issues).toHaveLength(1);
    expect(t.issues[0]).toMatchObject({ code: 'csv.quotes', at: { file: 'f.csv', line: 3 } });
  });
});
