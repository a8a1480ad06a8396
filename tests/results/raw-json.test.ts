import { describe, expect, it } from 'vitest';
import { jsonPieces, lazyJsonObject, rawJsonOf } from '../../src/results/raw-json.js';

// A plot as the assay modules make it: points and a curve of plain numbers and strings.
const plot = { points: [{ t: 0, f: 1.25, state: 'moving' }, { t: 0.5, f: -0.0625, state: 'stuck "x" µ–≥' }], curve: [{ t: 1e-7, f: 12345.678 }] };
const text = JSON.stringify(plot);
const bytes = Buffer.from(text, 'utf8');
/** The pieces joined as the writer joins them (strings as UTF-8). */
const joined = (pieces: Array<string | Uint8Array> | undefined) => (pieces === undefined ? undefined : Buffer.concat(pieces.map((p) => (typeof p === 'string' ? Buffer.from(p, 'utf8') : p))).toString('utf8'));

describe('lazyJsonObject', () => {
  it('reads as the object its text was made from, parsing only when a property is read', () => {
    const calls: string[] = [];
    const parse = JSON.parse;
    JSON.parse = ((t: string) => {
      calls.push(t);
      return parse(t) as unknown;
    }) as typeof JSON.parse;
    try {
      const o = lazyJsonObject<typeof plot>(Object.keys(plot), bytes);
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
    const o = lazyJsonObject<typeof plot>(Object.keys(plot), bytes);
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
    const lazy = { ...unit, plot: lazyJsonObject(Object.keys(plot), bytes) };
    const parse = JSON.parse;
    let parsed = 0;
    JSON.parse = ((t: string) => {
      parsed++;
      return parse(t) as unknown;
    }) as typeof JSON.parse;
    try {
      const pieces = jsonPieces(lazy);
      expect(pieces).toContain(bytes);
      expect(joined(pieces)).toBe(expected);
      expect(parsed).toBe(0);
    } finally {
      JSON.parse = parse;
    }
  });

  it('is JSON.stringify for everything else', () => {
    for (const v of [undefined, null, 3, 'x', [1, undefined], { a: undefined, b: () => 1, c: [NaN] }, { toJSON: () => 'j' }, new Date(0)]) {
      expect(joined(jsonPieces(v))).toBe(JSON.stringify(v));
    }
  });
});
