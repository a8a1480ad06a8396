import { describe, expect, it } from 'vitest';
import { lazyJsonObject, rawJsonOf, stringifyKeepingRaw } from '../../src/results/raw-json.js';

// A plot as the assay modules make it: points and a curve of plain numbers and strings.
const plot = { points: [{ t: 0, f: 1.25, state: 'moving' }, { t: 0.5, f: -0.0625, state: 'stuck "x"' }], curve: [{ t: 1e-7, f: 12345.678 }] };
const text = JSON.stringify(plot);

describe('lazyJsonObject', () => {
  it('reads as the object its text was made from, parsing only when a property is read', () => {
    const calls: string[] = [];
    const parse = JSON.parse;
    JSON.parse = ((t: string) => {
      calls.push(t);
      return parse(t) as unknown;
    }) as typeof JSON.parse;
    try {
      const o = lazyJsonObject<typeof plot>(Object.keys(plot), text);
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
    const o = lazyJsonObject<typeof plot>(Object.keys(plot), text);
    expect(rawJsonOf(o)).toBe(text);
    void o.points;
    expect(rawJsonOf(o)).toBe(text);
    o.curve = [];
    expect(rawJsonOf(o)).toBeUndefined();
    expect(JSON.stringify(o)).toBe(JSON.stringify({ ...plot, curve: [] }));
    expect(rawJsonOf(plot)).toBeUndefined();
    expect(rawJsonOf(null)).toBeUndefined();
  });
});

describe('stringifyKeepingRaw', () => {
  it('gives JSON.stringify of a unit whose plot is lazy, copying the text without reading it', () => {
    const unit = { assay: 'turnover', variant: 'v', metrics: { fast: 0.2, slow: null }, plot: plot as unknown, fit: undefined, source: [] };
    const expected = JSON.stringify(unit);
    const lazy = { ...unit, plot: lazyJsonObject(Object.keys(plot), text) };
    const parse = JSON.parse;
    let parsed = 0;
    JSON.parse = ((t: string) => {
      parsed++;
      return parse(t) as unknown;
    }) as typeof JSON.parse;
    try {
      expect(stringifyKeepingRaw(lazy)).toBe(expected);
      expect(parsed).toBe(0);
    } finally {
      JSON.parse = parse;
    }
  });

  it('is JSON.stringify for everything else', () => {
    for (const v of [undefined, null, 3, 'x', [1, undefined], { a: undefined, b: () => 1, c: [NaN] }, { toJSON: () => 'j' }, new Date(0)]) {
      expect(stringifyKeepingRaw(v)).toBe(JSON.stringify(v));
    }
  });
});
