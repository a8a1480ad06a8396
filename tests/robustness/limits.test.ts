/**
 * Size limit and low-level locators: a 100 MB CSV gives a clear error without being read
 * (policy: at most MAX_INPUT_FILE_BYTES = 64 MiB per file, stated in src/study/read-folder.ts);
 * JSON syntax errors and non-UTF-8 bytes are located by line and column.
 * Expected positions are counted by hand from the literal inputs (common practice, no source).
 */
import { closeSync, openSync, writeSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeText, firstInvalidUtf8 } from '../../src/study/csv.js';
import { locateJsonError } from '../../src/study/json-position.js';
import { MAX_INPUT_FILE_BYTES } from '../../src/study/read-folder.js';
import { CRASH, cleanup, copyDemo, readManifest, runCli, tempRoot, writeManifest } from './helpers.js';

const root = tempRoot('limits');
afterAll(() => cleanup(root));

describe('file size limit', () => {
  it('a 100 MB CSV is refused with its size and the limit, before it is read', async () => {
    const dir = copyDemo(join(root, 'big'));
    const file = join(dir, 'huge.csv');
    const fd = openSync(file, 'w');
    const chunk = Buffer.from('WT,WT-B1-1,B1,m1,f1,749.9\n'.repeat(40_000)); // 1.04 MB
    writeSync(fd, Buffer.from('variant,preparation,batch,movie,filament,velocity (nm/s)\n'));
    for (let written = 0; written < 100e6; written += chunk.length) writeSync(fd, chunk);
    closeSync(fd);
    const m = readManifest(dir);
    m.files.push({ path: 'huge.csv', kind: 'motility-velocities' });
    writeManifest(dir, m);
    const before = process.memoryUsage().rss;
    const r = await runCli(['check', dir], root);
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/^study\.json:\/files\/3\/path: error: 'huge\.csv' is 9\d\.\d MiB; myofolio reads files of at most 64 MiB\. — Split the data/m);
    expect(r.out + r.err).not.toMatch(CRASH);
    // Not read: memory grew by far less than the file size (the limit check uses fstat).
    expect(process.memoryUsage().rss - before).toBeLessThan(50e6);
    const b = await runCli(['build', dir, '--out', join(root, 'big-site')], root);
    expect(b.code).toBe(1);
    expect(b.out).toContain("'huge.csv' is");
  }, 30_000);

  it('the limit is 64 MiB', () => {
    expect(MAX_INPUT_FILE_BYTES).toBe(64 * 1024 * 1024);
  });
});

describe('locateJsonError', () => {
  it.each([
    ['{"a": 1}', undefined],
    ['{\n  "a": 1,\n}', [3, 1, "a comma before '}'"]],
    ['[1, 2,]', [1, 7, "a comma before ']'"]],
    ['{\n  "a": 1\n  "b": 2\n}', [3, 3, "expected ',' or '}'"]],
    ["{'a': 1}", [1, 2, 'single quote']],
    ['{"a": tru}', [1, 7, 'where a value is expected']],
    ['{"a": "x\ny"}', [1, 9, 'line break']],
    ['{"path": "C:\\data"}', [1, 13, 'invalid escape']],
    ['{"a": [1, 2}', [1, 12, "expected ',' or ']'"]],
    ['{"a": 1', [1, 8, "every '{' is closed"]],
    ['', [1, 1, 'empty']],
    ['{} x', [1, 4, 'after the end']],
    ['{"a": "never closed}', [1, 7, 'never closed']],
    ['{"a": 01}', [1, 8, "expected ',' or '}'"]],
    ['\r\n\r\n  ]', [3, 3, 'where a value is expected']],
  ] as const)('%j', (text, want) => {
    const got = locateJsonError(text);
    if (want === undefined) {
      expect(got).toBeUndefined();
      expect(() => JSON.parse(text)).not.toThrow();
      return;
    }
    expect(() => JSON.parse(text)).toThrow();
    expect(got).toMatchObject({ line: want[0], col: want[1] });
    expect(got!.reason).toContain(want[2]);
  });

  it('handles 100 000 levels of nesting without overflowing the stack', () => {
    const deep = '['.repeat(100_000) + ']'.repeat(99_999);
    expect(locateJsonError(deep)).toMatchObject({ line: 1, col: 200_000 });
  });
});

describe('decodeText', () => {
  it('locates the first byte that is not UTF-8', () => {
    // 'ab\nc' then 0xB5 (Latin-1 µ): line 2, column 2.
    const r = decodeText(new Uint8Array([0x61, 0x62, 0x0a, 0x63, 0xb5, 0x4d]));
    expect(r).toMatchObject({ ok: false, line: 2, col: 2 });
    expect(!r.ok && r.problem.message).toContain("'µ'");
  });

  it('counts characters, not bytes, for the column', () => {
    // 'µµ' in UTF-8 (4 bytes) then a stray 0xFF: column 3.
    expect(decodeText(new Uint8Array([0xc2, 0xb5, 0xc2, 0xb5, 0xff]))).toMatchObject({ ok: false, line: 1, col: 3 });
  });

  it('agrees with the WHATWG decoder on what is valid UTF-8', () => {
    const cases = [
      [0xed, 0xa0, 0x80], // surrogate U+D800: invalid
      [0xc0, 0xaf], // overlong '/': invalid
      [0xf4, 0x90, 0x80, 0x80], // beyond U+10FFFF: invalid
      [0xf0, 0x9f, 0x98, 0x80], // U+1F600: valid
      [0xe2, 0x82], // truncated: invalid
      [0xef, 0xbb, 0xbf, 0x41], // BOM + 'A': valid
    ];
    for (const c of cases) {
      const bytes = new Uint8Array(c);
      let valid = true;
      try {
        new TextDecoder('utf-8', { fatal: true }).decode(bytes);
      } catch {
        valid = false;
      }
      expect(firstInvalidUtf8(bytes) === -1, c.join(' ')).toBe(valid);
    }
  });
});
