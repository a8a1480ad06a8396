import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { writeJsonInSlices, writeJsonStreamed } from '../../src/results/json.js';
import { lazyJsonObject } from '../../src/results/raw-json.js';
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

  it('writes multi-byte text, pieces larger than its buffer and kept JSON bytes exactly', () => {
    // Elements of about a third of the 1 MiB buffer, so that pieces meet its end at odd places;
    // one element larger than the buffer; text with 2-, 3- and 4-byte UTF-8 characters; and
    // 900 KB of ASCII followed by text that would fit the rest of the buffer in UTF-16 code units
    // but not in UTF-8 bytes.
    const text = (n: number) => 'µ°C – 𝛽 pCa₅₀ '.repeat(n);
    const value = { rows: [text(20_000), { t: text(80_000) }, text(20_001), 'plain'.repeat(70_000), text(3), 'a'.repeat(300_000), 'b'.repeat(300_000), 'c'.repeat(300_000), text(8_000)] };
    const file = join(dir, 'utf8.json');
    writeJsonStreamed(file, value);
    expect(readFileSync(file, 'utf8')).toBe(JSON.stringify(value) + '\n');
    // Plots kept as their JSON bytes (src/results/raw-json.ts) are copied as they stand, large or small.
    const big = lazyJsonObject<object>(Buffer.from(JSON.stringify({ t: text(90_000) }), 'utf8'));
    const small = lazyJsonObject<object>(Buffer.from(JSON.stringify({ t: text(2) }), 'utf8'));
    const withBytes = { units: [{ plot: small }, { plot: big }, { plot: small }] };
    writeJsonStreamed(file, withBytes);
    expect(readFileSync(file, 'utf8')).toBe(JSON.stringify({ units: [{ plot: { t: text(2) } }, { plot: { t: text(90_000) } }, { plot: { t: text(2) } }] }) + '\n');
  });

  it('writes a file larger than its write buffer', () => {
    const value = { units: Array.from({ length: 30_000 }, (_, i) => ({ i, text: 'x'.repeat(50) })) };
    const file = join(dir, 'big.json');
    writeJsonStreamed(file, value);
    expect(readFileSync(file, 'utf8')).toBe(JSON.stringify(value) + '\n');
  });
});

describe('writeJsonInSlices', () => {
  it('writes the bytes writeJsonStreamed writes, giving the event loop back between slices', async () => {
    const results = makeFixture();
    const whole = join(dir, 'whole.json');
    const sliced = join(dir, 'sliced.json');
    writeJsonStreamed(whole, results as never);
    // Slices of no time at all: one element per slice, so other work runs in between.
    let ticks = 0;
    const ticker = setInterval(() => ticks++, 0);
    try {
      await writeJsonInSlices(sliced, results as never, { sliceMs: 0 });
    } finally {
      clearInterval(ticker);
    }
    expect(readFileSync(sliced, 'utf8')).toBe(readFileSync(whole, 'utf8'));
    expect(ticks).toBeGreaterThan(0);
  });

  it('stops when its signal is aborted, and says so', async () => {
    const value = { items: Array.from({ length: 1000 }, (_, i) => ({ i })) };
    const stop = new AbortController();
    const writing = writeJsonInSlices(join(dir, 'stopped.json'), value, { sliceMs: 0, signal: stop.signal });
    stop.abort();
    await expect(writing).rejects.toThrow();
    expect(readFileSync(join(dir, 'stopped.json'), 'utf8').length).toBeLessThan(JSON.stringify(value).length);
  });
});
