import { describe, expect, it } from 'vitest';
import { findDuplicateKeys, pointerToken } from '../../src/archive/json-keys.js';

describe('findDuplicateKeys', () => {
  it('finds a repeated key with the pointer, line and column of the repeat and of the first use', () => {
    // Hand-counted: line 2 is ` "a": 2` → the quote of the repeat is column 2; the first "a" is line 1 column 2.
    expect(findDuplicateKeys('{"a": 1,\n "a": 2}')).toEqual([{ pointer: '/a', key: 'a', line: 2, col: 2, firstLine: 1, firstCol: 2 }]);
  });

  it('gives no result for unique keys, and keys in different objects are not repeats', () => {
    expect(findDuplicateKeys('{"a": {"b": 1}, "c": {"b": 2}, "d": [{"b": 3}, {"b": 4}]}')).toEqual([]);
  });

  it('points into lists and nested objects (RFC 6901 pointer)', () => {
    const text = '{"studies": [\n  {"id": "x", "path": "a"},\n  {"id": "y", "path": "b", "path": "c"}\n]}';
    // The second entry is index 1; its "path" keys start at columns 15 and 28 of line 3 (1-based,
    // counted independently with Python's str.index).
    expect(findDuplicateKeys(text)).toEqual([{ pointer: '/studies/1/path', key: 'path', line: 3, col: 28, firstLine: 3, firstCol: 15 }]);
  });

  it('compares keys after decoding escapes, and escapes ~ and / in the pointer', () => {
    // "\u0074itle" decodes to "title" (U+0074 is 't').
    expect(findDuplicateKeys('{"title": 1, "\\u0074itle": 2}').map((d) => d.key)).toEqual(['title']);
    expect(findDuplicateKeys('{"a/b~": 1, "a/b~": 2}')[0]?.pointer).toBe('/a~1b~0');
    expect(pointerToken('~/')).toBe('~0~1');
  });

  it('is not confused by braces, commas and escaped quotes inside strings', () => {
    expect(findDuplicateKeys('{"a": "}, \\"a\\": {", "b": [1, "{\\"a\\":1}"]}')).toEqual([]);
  });

  it('reports every repeat, and counts CR LF as one line end', () => {
    const found = findDuplicateKeys('{"a": 1,\r\n"a": 2,\r\n"a": 3}');
    expect(found.map((d) => [d.line, d.firstLine])).toEqual([
      [2, 1],
      [3, 1],
    ]);
  });

  it('handles deep nesting without recursion', () => {
    const depth = 20_000;
    const text = `${'['.repeat(depth)}{"k": 1, "k": 2}${']'.repeat(depth)}`;
    const found = findDuplicateKeys(text);
    expect(found).toHaveLength(1);
    expect(found[0]?.pointer).toBe(`${'/0'.repeat(depth)}/k`);
  });
});
