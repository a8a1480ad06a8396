/**
 * Objects that keep the JSON text they were read from (as UTF-8 bytes), so that text can be
 * written out again without decoding it, parsing it and serialising it back.
 *
 * The analysis cache (src/build/analysis-cache.ts) stores each unit's `plot` (the readings and
 * curves its charts draw: most of a unit's bytes) as JSON text. A rebuild reads the study's
 * units from the cache, but draws the charts of a few variants only; every plot is written to
 * results.json, though. Left as bytes of the cache file, a plot costs no object at all instead
 * of thousands of small ones (whose deserialisation and garbage collection were the larger part
 * of a 1,000-variant rebuild), and results.json copies the bytes as they are (writeJsonStreamed).
 *
 *   lazyJsonObject(keys, bytes) ──any property read──▶ JSON.parse(UTF-8 text) once, values from it
 *                               ──rawJsonOf──▶ bytes (until a property is assigned)
 *
 * The text must be JSON.stringify's own output for an object with those keys, in that order, and
 * nothing may change the parsed values in place (plots are not changed after the fit): then
 * JSON.stringify of the object, read or not, gives the text back byte for byte.
 */

/** Own, non-enumerable marker holding the JSON bytes of an object made by lazyJsonObject. */
const RAW_JSON: unique symbol = Symbol('myofolio.rawJson');

/**
 * An object with enumerable properties `keys` whose values come from `bytes` (UTF-8 JSON of an
 * object with those keys), parsed when a property is first read. Assigning a property keeps the
 * other values and drops the bytes (rawJsonOf then gives undefined).
 * @example const o = lazyJsonObject<{ a: number[] }>(['a'], Buffer.from('{"a":[1,2]}')); o.a[1] // → 2
 */
export function lazyJsonObject<T extends object>(keys: readonly string[], bytes: Uint8Array): T {
  let parsed: Record<string, unknown> | undefined;
  const read = () => (parsed ??= JSON.parse(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString('utf8')) as Record<string, unknown>);
  const target: Record<string | symbol, unknown> = {};
  for (const key of keys) {
    Object.defineProperty(target, key, {
      enumerable: true,
      configurable: true,
      get: () => read()[key],
      set: (value: unknown) => {
        read()[key] = value;
        delete target[RAW_JSON];
      },
    });
  }
  Object.defineProperty(target, RAW_JSON, { value: bytes, enumerable: false, configurable: true, writable: false });
  return target as T;
}

/** The JSON bytes an object was made from (lazyJsonObject), if they still stand for the object. */
export function rawJsonOf(value: unknown): Uint8Array | undefined {
  if (value === null || typeof value !== 'object') return undefined;
  const bytes = (value as Record<symbol, unknown>)[RAW_JSON];
  return bytes instanceof Uint8Array ? bytes : undefined;
}

/**
 * JSON.stringify(value) in pieces, with the bytes of lazy objects among its own properties as
 * pieces of their own: the same text once the pieces are joined (strings as UTF-8), without
 * parsing those objects or serialising them again. Undefined where JSON.stringify gives
 * undefined. Values that are not plain objects, or hold no lazy object, are one JSON.stringify.
 * @example jsonPieces({ a: 1, p: lazyJsonObject(['x'], Buffer.from('{"x":[0.5]}')) }) // → ['{"a":1,"p":', <bytes {"x":[0.5]}>, '}']
 */
export function jsonPieces(value: unknown): Array<string | Uint8Array> | undefined {
  const whole = () => {
    const text = JSON.stringify(value);
    return text === undefined ? undefined : [text];
  };
  if (value === null || typeof value !== 'object' || Array.isArray(value)) return whole();
  const proto = Object.getPrototypeOf(value) as unknown;
  if ((proto !== Object.prototype && proto !== null) || typeof (value as { toJSON?: unknown }).toJSON === 'function') return whole();
  const entries = Object.entries(value as Record<string, unknown>);
  if (!entries.some(([, v]) => rawJsonOf(v) !== undefined)) return whole();
  const pieces: Array<string | Uint8Array> = [];
  let text = '{';
  let first = true;
  for (const [key, v] of entries) {
    const bytes = rawJsonOf(v);
    // As JSON.stringify: a property whose value has no JSON (undefined, a function, a symbol) is left out.
    const json = bytes === undefined ? JSON.stringify(v) : '';
    if (json === undefined) continue;
    text += `${first ? '' : ','}${JSON.stringify(key)}:`;
    first = false;
    if (bytes === undefined) text += json;
    else {
      pieces.push(text, bytes);
      text = '';
    }
  }
  pieces.push(`${text}}`);
  return pieces;
}
