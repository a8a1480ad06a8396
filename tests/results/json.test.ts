import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { writeJsonStreamed } from '../../src/results/json.js';
import { makeFixture } from '../fixtures/results-fixture.js';

const dir = mkdtempSync(join(tmpdir(), 'myofolio-json-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('writeJsonStreamed', () => {
  it('writes exactly JSON.stringify(value) + newline for a results object', () => {
    const results = makeFixture();
    const file = join(dir, 'results.json');
    writeJsonStreamed(file, results as never);
    expect(readFileSync(file, 'utf8')).toBe(JSON.stringify(results) + '\n');
  });

  it('handles empty arrays, undefined and null values, escapes, and holes in arrays as JSON.stringify does', () => {
    const value = { a: [], b: undefined, c: null, 'd"e': ['x\u2028"</script>', undefined, () => 1, { f: undefined, g: NaN }], h: { i: [1] }, j: () => 2 };
    const file = join(dir, 'edge.json');
    writeJsonStreamed(file, value as never);
    expect(readFileSync(file, 'utf8')).toBe(JSON.stringify(value) + '\n');
  });

  it('writes multi-byte text and pieces larger than its chunks exactly', () => {
    // Elements of about a third of a chunk, so that pieces meet its end at odd places; one element
    // larger than a chunk; text with 2-, 3- and 4-byte UTF-8 characters.
    const text = (n: number) => 'µ°C – 𝛽 pCa₅₀ '.repeat(n);
    const value = { rows: [text(20_000), { t: text(80_000) }, text(20_001), 'plain'.repeat(70_000), text(3), 'a'.repeat(300_000), 'b'.repeat(300_000), 'c'.repeat(300_000), text(8_000)] };
    const file = join(dir, 'utf8.json');
    writeJsonStreamed(file, value);
    expect(readFileSync(file, 'utf8')).toBe(JSON.stringify(value) + '\n');
  });

  it('writes a file larger than its write buffer', () => {
    const value = { units: Array.from({ length: 30_000 }, (_, i) => ({ i, text: 'x'.repeat(50) })) };
    const file = join(dir, 'big.json');
    writeJsonStreamed(file, value);
    expect(readFileSync(file, 'utf8')).toBe(JSON.stringify(value) + '\n');
  });
});
