/**
 * Rows in columns (src/analysis/analyse-worker-rows.ts): decodeRows(encodeRows(rows)) gives rows
 * equal to the originals, with the same keys in the same order, after a structured clone (the
 * trip to a worker). Values are constructed edge cases (common practice, no source).
 */
import { describe, expect, it } from 'vitest';
import { decodeRows, encodeRows } from '../../src/analysis/analyse-worker-rows.js';

/** Round trip through structuredClone, as postMessage does. */
function roundTrip(rows: object[]): Record<string, unknown>[] {
  return decodeRows(structuredClone(encodeRows(rows)));
}

/** Equal values (Object.is: −0 and NaN distinguished) and equal key order, recursively. */
function expectSame(got: unknown, want: unknown, path = '$'): void {
  if (typeof want !== 'object' || want === null) {
    expect(Object.is(got, want), `${path}: ${String(got)} vs ${String(want)}`).toBe(true);
    return;
  }
  expect(typeof got, path).toBe('object');
  expect(Array.isArray(got), path).toBe(Array.isArray(want));
  expect(Object.getPrototypeOf(got), path).toBe(Object.getPrototypeOf(want));
  expect(Object.keys(got as object), path).toEqual(Object.keys(want));
  for (const k of Object.keys(want)) expectSame((got as Record<string, unknown>)[k], (want as Record<string, unknown>)[k], `${path}.${k}`);
}

describe('encodeRows / decodeRows', () => {
  it('restores rows of one shape, sharing nothing with the originals', () => {
    const rows = [
      { variant: 'wt', unit: 'u1', batch: 'B1', at: { file: 'a.csv', line: 2 }, timeS: 0, fluorescence: 108.314 },
      { variant: 'wt', unit: 'u1', batch: 'B1', at: { file: 'a.csv', line: 3 }, timeS: 4.5, fluorescence: -0 },
      { variant: 'v1', unit: 'u2', batch: 'B1', at: { file: 'b.csv', line: 2 }, timeS: NaN, fluorescence: Infinity },
    ];
    const got = roundTrip(rows);
    expectSame(got, rows);
    expect(got[0]).not.toBe(rows[0]);
    expect(got[0].at).not.toBe(rows[0].at);
  });

  it('keeps per-row key order, missing keys and mixed-type columns', () => {
    const rows: object[] = [
      { a: 1, b: 'x' },
      { b: 'y', a: 2 },
      { a: 3 },
      { a: 'three', b: null, c: undefined },
      { a: [1, 2], b: true, at: { file: 'f', line: 1, column: 'a' } },
      { 2: 'two', 1: 'one', z: 0 },
      {},
      { at: { file: 'f' } },
    ];
    expectSame(roundTrip(rows), rows);
  });

  it('keeps a "__proto__" own key an own key, in the generated decoder and in the key-by-key one', () => {
    const row = JSON.parse('{"a":1,"__proto__":"p","b":2}') as object;
    expect(Object.keys(row)).toEqual(['a', '__proto__', 'b']);
    expectSame(roundTrip([row, row]), [row, row]);
    // More shapes than the generated decoder takes: built key by key.
    const many = Array.from({ length: 100 }, (_, i) => ({ [`k${i}`]: i, ...(i % 2 ? (JSON.parse('{"__proto__":"q"}') as object) : {}) }));
    const got = roundTrip(many);
    expectSame(got, many);
    expect(Object.getPrototypeOf(got[1])).toBe(Object.prototype);
  });

  it('stores numbers and strings in typed columns with each distinct string once', () => {
    const rows = Array.from({ length: 1000 }, (_, i) => ({ unit: `u${i % 7}`, value: i / 3 }));
    const table = encodeRows(rows);
    const [unit, value] = table.columns;
    expect(unit.type === 'string' && unit.strings).toEqual(['u0', 'u1', 'u2', 'u3', 'u4', 'u5', 'u6']);
    expect(value.type).toBe('number');
    expect(table.shapes).toHaveLength(1);
    expectSame(roundTrip(rows), rows);
  });

  it('handles no rows', () => {
    expect(roundTrip([])).toEqual([]);
  });
});
