/**
 * Rows in columns, for the trip to an analysis worker (parallel.ts → analyse-worker.ts).
 *
 *   row objects ──encodeRows──▶ RowColumns (typed arrays, string tables) ──postMessage──▶ decodeRows ──▶ equal row objects
 *
 * A structured clone of the row objects themselves serialises every string of every row and
 * rebuilds them object by object, property by property: for the 3 million rows of a
 * 1,000-variant benchmark study that took 8 s to encode and 47 s to decode in one thread, and
 * left a separate copy of each variant, unit, batch and file name per row in worker memory.
 * In columns each distinct string travels once, numbers and string indexes travel as typed
 * arrays on SharedArrayBuffers (posting them shares the memory: copying the 170 MB of that
 * study's columns cost about 0.7 s to send and 1 s to receive), and the decoded rows share the
 * strings. Decoding uses one generated function per table that builds
 * each row as one object literal (the way src/study/rows.ts builds rows), so decoded rows have
 * the same keys in the same order as the originals. Pure: no I/O.
 */

/** The values of one property over the rows that have it, in row order. */
export type Column =
  | { type: 'number'; values: Float64Array }
  | { type: 'string'; strings: string[]; index: Uint32Array }
  | { type: 'object'; table: RowColumns }
  | { type: 'any'; values: unknown[] };

/**
 * Plain objects stored by property: each row's key list (its shape: own enumerable keys in
 * order) and one column per key. Numbers go in a Float64Array (every double, −0 and NaN kept),
 * strings as an index into a table of distinct strings, nested plain objects (SourceRef) as a
 * nested table, anything else (mixed types, arrays, null, undefined) as a plain list. Typed
 * arrays are views of SharedArrayBuffers and are never written after encodeRows returns.
 */
export interface RowColumns {
  count: number;
  keys: string[];
  /** Key lists, as indexes into `keys`. */
  shapes: number[][];
  /** Shape of each row (index into `shapes`). */
  shapeOf: Uint32Array;
  columns: Column[];
}

const isPlainObject = (v: unknown): boolean => typeof v === 'object' && v !== null && Object.getPrototypeOf(v) === Object.prototype;

/**
 * Rows (plain objects) → columns; decodeRows gives back equal objects with the same key order.
 * @example decodeRows(encodeRows([{ a: 1, at: { file: 'f.csv', line: 2 } }])) // → [{ a: 1, at: { file: 'f.csv', line: 2 } }]
 */
export function encodeRows(rows: readonly object[]): RowColumns {
  const count = rows.length;
  const keys: string[] = [];
  const keyIndex = new Map<string, number>();
  const shapes: number[][] = [];
  const shapeIndex = new Map<string, number>();
  const shapeOf = new Uint32Array(new SharedArrayBuffer(4 * count));
  // Shapes: a row with the previous row's keys (checked by for…in, no allocation) has its shape;
  // any other row is looked up by Object.keys (own enumerable keys, what decodeRows restores).
  let last = -1;
  let lastNames: string[] = [];
  for (let i = 0; i < count; i++) {
    const row = rows[i];
    if (last >= 0) {
      let j = 0;
      let same = true;
      for (const name in row) {
        if (j >= lastNames.length || name !== lastNames[j]) {
          same = false;
          break;
        }
        j++;
      }
      if (same && j === lastNames.length) {
        shapeOf[i] = last;
        continue;
      }
    }
    const names = Object.keys(row);
    const shapeKey = JSON.stringify(names);
    let s = shapeIndex.get(shapeKey);
    if (s === undefined) {
      s = shapes.length;
      shapeIndex.set(shapeKey, s);
      shapes.push(
        names.map((name) => {
          let k = keyIndex.get(name);
          if (k === undefined) {
            k = keys.length;
            keyIndex.set(name, k);
            keys.push(name);
          }
          return k;
        }),
      );
    }
    shapeOf[i] = s;
    last = s;
    lastNames = names;
  }
  // Columns, one key at a time (the same property of every row: a monomorphic load).
  const columns = keys.map((name, k) => {
    const has = shapes.map((shape) => shape.includes(k));
    if (has.every(Boolean)) return encodeColumn(rows, name);
    const holders: object[] = [];
    for (let i = 0; i < count; i++) if (has[shapeOf[i]]) holders.push(rows[i]);
    return encodeColumn(holders, name);
  });
  return { count, keys, shapes, shapeOf, columns };
}

/**
 * The values of property `name` of `holders` as a column of the narrowest type that holds them
 * all, written straight into a typed array for the type of the first value (numbers, strings)
 * and collected again as a plain list when a later value does not fit.
 */
function encodeColumn(holders: readonly object[], name: string): Column {
  const n = holders.length;
  const get = (i: number) => (holders[i] as Record<string, unknown>)[name];
  const first = n > 0 ? get(0) : undefined;
  if (typeof first === 'number') {
    const values = new Float64Array(new SharedArrayBuffer(8 * n));
    let i = 0;
    for (; i < n; i++) {
      const v = get(i);
      if (typeof v !== 'number') break;
      values[i] = v;
    }
    if (i === n) return { type: 'number', values };
  } else if (typeof first === 'string') {
    const table: string[] = [];
    const seen = new Map<string, number>();
    const index = new Uint32Array(new SharedArrayBuffer(4 * n));
    // Rows come grouped by unit and file: most values repeat the previous one.
    let previous: unknown;
    let previousIndex = 0;
    let i = 0;
    for (; i < n; i++) {
      const v = get(i);
      if (v !== previous) {
        if (typeof v !== 'string') break;
        let k = seen.get(v);
        if (k === undefined) {
          k = table.length;
          seen.set(v, k);
          table.push(v);
        }
        previous = v;
        previousIndex = k;
      }
      index[i] = previousIndex;
    }
    if (i === n) return { type: 'string', strings: table, index };
  }
  const values = new Array<unknown>(n);
  let objects = n > 0;
  for (let i = 0; i < n; i++) {
    const v = get(i);
    values[i] = v;
    if (objects && !isPlainObject(v)) objects = false;
  }
  return objects ? { type: 'object', table: encodeRows(values as object[]) } : { type: 'any', values };
}

/** A column with nested tables already decoded into their rows. */
type FlatColumn = Exclude<Column, { type: 'object' }>;

/** Above this many shapes in one table decodeRows builds rows key by key instead of by generated literals. */
const MAX_GENERATED_SHAPES = 64;

/** Columns → rows: the inverse of encodeRows (equal rows, keys in the same order). */
export function decodeRows(table: RowColumns): Record<string, unknown>[] {
  const { keys, shapes, shapeOf, count } = table;
  const columns: FlatColumn[] = table.columns.map((c) => (c.type === 'object' ? { type: 'any', values: decodeRows(c.table) } : c));
  if (shapes.length > MAX_GENERATED_SHAPES) return decodeKeyByKey(table, columns);
  // One function per table: locals per column, one object literal per shape. Keys are written as
  // JSON string literals ("__proto__" as a computed key, which makes an own property as the
  // original row had, instead of setting the prototype).
  const prelude: string[] = [];
  columns.forEach((c, k) => {
    prelude.push(c.type === 'string' ? `const s${k} = c[${k}].strings, x${k} = c[${k}].index; let p${k} = 0;` : `const v${k} = c[${k}].values; let p${k} = 0;`);
  });
  const read = (k: number) => (columns[k].type === 'string' ? `s${k}[x${k}[p${k}++]]` : `v${k}[p${k}++]`);
  const literal = (shape: number[]) =>
    `{ ${shape.map((k) => `${keys[k] === '__proto__' ? `[${JSON.stringify(keys[k])}]` : JSON.stringify(keys[k])}: ${read(k)}`).join(', ')} }`;
  const body =
    shapes.length === 1
      ? `for (let i = 0; i < n; i++) out[i] = ${literal(shapes[0])};`
      : `for (let i = 0; i < n; i++) { switch (shapeOf[i]) { ${shapes.map((shape, s) => `case ${s}: out[i] = ${literal(shape)}; break;`).join(' ')} } }`;
  const decode = new Function('c', 'shapeOf', 'n', `${prelude.join('\n')}\nconst out = new Array(n);\n${body}\nreturn out;`) as (
    c: readonly FlatColumn[],
    shapeOf: Uint32Array,
    n: number,
  ) => Record<string, unknown>[];
  return decode(columns, shapeOf, count);
}

/** decodeRows for tables with many shapes: rows built key by key (defineProperty keeps "__proto__" an own key). */
function decodeKeyByKey(table: RowColumns, columns: readonly FlatColumn[]): Record<string, unknown>[] {
  const { keys, shapes, shapeOf, count } = table;
  const cursor = new Uint32Array(keys.length);
  const value = (k: number): unknown => {
    const c = columns[k];
    const i = cursor[k]++;
    return c.type === 'string' ? c.strings[c.index[i]] : c.values[i];
  };
  const rows: Record<string, unknown>[] = new Array(count);
  for (let i = 0; i < count; i++) {
    const row: Record<string, unknown> = {};
    for (const k of shapes[shapeOf[i]]) {
      if (keys[k] === '__proto__') Object.defineProperty(row, keys[k], { value: value(k), enumerable: true, writable: true, configurable: true });
      else row[keys[k]] = value(k);
    }
    rows[i] = row;
  }
  return rows;
}
