import { describe, expect, it } from 'vitest';
import { type JsonPiece, type TextSource, jsonPieces, lazyJsonObject, peekRawJson, rawJsonOf } from '../../src/results/raw-json.js';

// A plot as the assay modules make it: points and a curve of plain numbers and strings.
const plot = { points: [{ t: 0, f: 1.25, state: 'moving' }, { t: 0.5, f: -0.0625, state: 'stuck "x" µ–≥' }], curve: [{ t: 1e-7, f: 12345.678 }] };
const text = JSON.stringify(plot);
const bytes = Buffer.from(text, 'utf8');
/** Calls of JSON.parse while `fn` runs. */
function countingParses(fn: () => void): number {
  const parse = JSON.parse;
  let parsed = 0;
  JSON.parse = ((t: string) => {
    parsed++;
    return parse(t) as unknown;
  }) as typeof JSON.parse;
  try {
    fn();
  } finally {
    JSON.parse = parse;
  }
  return parsed;
}

/** The pieces joined as the writer joins them (strings as UTF-8). */
const joined = (pieces: JsonPiece[] | undefined) => (pieces === undefined ? undefined : Buffer.concat(pieces.map((p) => (typeof p === 'string' ? Buffer.from(p, 'utf8') : Buffer.from(peekRawJson(p) as Uint8Array)))).toString('utf8'));

describe('lazyJsonObject', () => {
  it('reads as the object its text was made from, parsing only when a property is read', () => {
    const calls: string[] = [];
    const parse = JSON.parse;
    JSON.parse = ((t: string) => {
      calls.push(t);
      return parse(t) as unknown;
    }) as typeof JSON.parse;
    try {
      const o = lazyJsonObject<typeof plot>(bytes);
      expect(Object.keys(o)).toEqual(['points', 'curve']);
      expect({ ...o }.points).toBeDefined(); // a spread reads the values
      expect(calls).toEqual([text]);
      expect(o).toEqual(plot);
      expect(JSON.stringify(o)).toBe(text);
      expect(calls.length).toBe(1);
    } finally {
      JSON.parse = parse;
    }
  });

  it('keeps its text, even after reading, until a property is assigned', () => {
    const o = lazyJsonObject<typeof plot>(bytes);
    expect(rawJsonOf(o)).toBe(bytes);
    void o.points;
    expect(rawJsonOf(o)).toBe(bytes);
    o.curve = [];
    expect(rawJsonOf(o)).toBeUndefined();
    expect(JSON.stringify(o)).toBe(JSON.stringify({ ...plot, curve: [] }));
    expect(rawJsonOf(plot)).toBeUndefined();
    expect(rawJsonOf(null)).toBeUndefined();
  });
});

describe('jsonPieces', () => {
  it('gives JSON.stringify of a unit whose plot is lazy, copying its bytes without reading them', () => {
    const unit = { assay: 'turnover', variant: 'v', metrics: { fast: 0.2, slow: null }, plot: plot as unknown, fit: undefined, source: [] };
    const expected = JSON.stringify(unit);
    const lazy = { ...unit, plot: lazyJsonObject(bytes) };
    const parsed = countingParses(() => {
      const pieces = jsonPieces(lazy);
      expect(pieces?.includes(lazy.plot)).toBe(true);
      expect(peekRawJson(lazy.plot)).toBe(bytes);
      expect(joined(pieces)).toBe(expected);
    });
    expect(parsed).toBe(0);
  });

  it('is JSON.stringify for everything else', () => {
    for (const v of [undefined, null, 3, 'x', [1, undefined], { a: undefined, b: () => 1, c: [NaN] }, { toJSON: () => 'j' }, new Date(0)]) {
      expect(joined(jsonPieces(v))).toBe(JSON.stringify(v));
    }
  });
});

describe('lazyJsonObject over a part of a larger buffer', () => {
  const fit = { modelId: 'hill', parameters: [{ name: 'pCa50', estimate: 5.8, se: 0.02 }], converged: true, stopReason: 'converged-rss', correlation: [[1]] };
  const fitText = JSON.stringify(fit);
  const file = Buffer.concat([Buffer.from('{"x":1}'), Buffer.from(fitText, 'utf8'), Buffer.from(text, 'utf8')]);
  const start = '{"x":1}'.length;
  const end = start + Buffer.byteLength(fitText);

  it('gives exactly its bytes, and behaves as the parsed object in every reflective way', () => {
    const o = lazyJsonObject<typeof fit>(file, start, end);
    expect(Buffer.from(rawJsonOf(o)!).toString('utf8')).toBe(fitText);
    expect(Object.getPrototypeOf(o)).toBe(Object.prototype);
    expect(Array.isArray(o)).toBe(false);
    expect(Object.keys(o)).toEqual(Object.keys(fit));
    expect('converged' in o).toBe(true);
    expect('x' in o).toBe(false);
    expect(Object.prototype.hasOwnProperty.call(o, 'modelId')).toBe(true);
    expect(Object.getOwnPropertyDescriptor(o, 'modelId')).toEqual({ value: 'hill', writable: true, enumerable: true, configurable: true });
    expect({ ...o }).toEqual(fit);
    expect(o).toEqual(fit);
    expect(JSON.stringify(o)).toBe(fitText);
    expect(JSON.stringify({ u: o })).toBe(JSON.stringify({ u: fit }));
    // Still its bytes after being read.
    expect(Buffer.from(rawJsonOf(o)!).toString('utf8')).toBe(fitText);
  });

  it('drops its bytes when changed by assignment, definition or deletion, keeping the other values', () => {
    const assigned = lazyJsonObject<Record<string, unknown>>(file, start, end);
    assigned.converged = false;
    expect(rawJsonOf(assigned)).toBeUndefined();
    expect(JSON.stringify(assigned)).toBe(JSON.stringify({ ...fit, converged: false }));
    const defined = lazyJsonObject<Record<string, unknown>>(file, start, end);
    Object.defineProperty(defined, 'note', { value: 'n', enumerable: true });
    expect(rawJsonOf(defined)).toBeUndefined();
    expect(JSON.stringify(defined)).toBe(JSON.stringify({ ...fit, note: 'n' }));
    const deleted = lazyJsonObject<Record<string, unknown>>(file, start, end);
    delete deleted.correlation;
    expect(rawJsonOf(deleted)).toBeUndefined();
    const { correlation: _c, ...rest } = fit;
    expect(JSON.stringify(deleted)).toBe(JSON.stringify(rest));
  });

  it('in a unit: jsonPieces copies each lazy part as its bytes, without parsing any', () => {
    const unit = { assay: 'force', metrics: { pCa50: 5.8 }, fit, plot };
    const lazy = { ...unit, fit: lazyJsonObject(file, start, end), plot: lazyJsonObject(file, end) };
    expect(countingParses(() => expect(joined(jsonPieces(lazy))).toBe(JSON.stringify(unit)))).toBe(0);
  });
});

describe('lazyJsonObject over a TextSource (text read when wanted, into a reused buffer)', () => {
  /** A source over `file` that reads every peek into one buffer, overwriting the last peek, and counts peeks. */
  const sourceOver = (file: Buffer) => {
    const scratch = Buffer.alloc(file.length);
    const source = {
      peeks: 0,
      peek(start: number, end: number) {
        source.peeks++;
        scratch.fill(0x58);
        file.copy(scratch, 0, start, end);
        return scratch.subarray(0, end - start);
      },
    } satisfies TextSource & { peeks: number };
    return source;
  };
  const fit = { modelId: 'single', parameters: [{ name: 'k', estimate: 0.03 }], converged: true };
  const fitText = JSON.stringify(fit);
  const plotText = JSON.stringify(plot);
  const file = Buffer.from(`${fitText}${plotText}`, 'utf8');
  const fitEnd = Buffer.byteLength(fitText);

  it('reads nothing until wanted; rawJsonOf gives a copy that a later peek does not change', () => {
    const source = sourceOver(file);
    const o = lazyJsonObject<typeof fit>(source, 0, fitEnd);
    const p = lazyJsonObject<typeof plot>(source, fitEnd, file.length);
    expect(source.peeks).toBe(0);
    const kept = rawJsonOf(o)!;
    void rawJsonOf(p);
    expect(Buffer.from(kept).toString('utf8')).toBe(fitText);
    expect(o).toEqual(fit);
    expect(p.points[1].state).toBe(plot.points[1].state);
  });

  it('in a unit: the pieces, each used before the next peek, join to JSON.stringify', () => {
    const source = sourceOver(file);
    const unit = { assay: 'turnover', fit, metrics: { k: 0.03 }, plot };
    const lazy = { ...unit, fit: lazyJsonObject(source, 0, fitEnd), plot: lazyJsonObject(source, fitEnd, file.length) };
    expect(joined(jsonPieces(lazy))).toBe(JSON.stringify(unit));
    expect(source.peeks).toBe(2);
  });
});
