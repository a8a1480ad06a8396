/**
 * Objects that keep the JSON text they were read from, so that text can be written out again
 * without parsing it and serialising it back.
 *
 * The analysis cache (src/build/analysis-cache.ts) stores each unit's `plot` (the readings and
 * curves its charts draw: most of a unit's bytes) as JSON text. A rebuild reads the study's
 * units from the cache, but draws the charts of a few variants only; every plot is written to
 * results.json, though. Read as text and left unparsed, a plot costs one string instead of
 * thousands of small objects (whose deserialisation and garbage collection were the larger part
 * of a 1,000-variant rebuild), and results.json copies the text as it is (writeJsonStreamed).
 *
 *   lazyJsonObject(keys, text) ──any property read──▶ JSON.parse(text) once, values from it
 *                              ──rawJsonOf──▶ text (until a property is assigned)
 *
 * The text must be JSON.stringify's own output for an object with those keys, in that order, and
 * nothing may change the parsed values in place (plots are not changed after the fit): then
 * JSON.stringify of the object, read or not, gives the text back byte for byte.
 */

/** Own, non-enumerable marker holding the JSON text of an object made by lazyJsonObject. */
const RAW_JSON: unique symbol = Symbol('myofolio.rawJson');

/**
 * An object with enumerable properties `keys` whose values come from `text` (JSON of an object
 * with those keys), parsed when a property is first read. Assigning a property keeps the other
 * values and drops the text (rawJsonOf then gives undefined).
 * @example const o = lazyJsonObject<{ a: number[] }>(['a'], '{"a":[1,2]}'); o.a[1] // → 2
 */
export function lazyJsonObject<T extends object>(keys: readonly string[], text: string): T {
  let parsed: Record<string, unknown> | undefined;
  const read = () => (parsed ??= JSON.parse(text) as Record<string, unknown>);
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
  Object.defineProperty(target, RAW_JSON, { value: text, enumerable: false, configurable: true, writable: false });
  return target as T;
}

/** The JSON text an object was made from (lazyJsonObject), if it still stands for the object. */
export function rawJsonOf(value: unknown): string | undefined {
  if (value === null || typeof value !== 'object') return undefined;
  const text = (value as Record<symbol, unknown>)[RAW_JSON];
  return typeof text === 'string' ? text : undefined;
}

/**
 * JSON.stringify(value), with the text of lazy objects among its own properties copied as it is:
 * the same string, without parsing those objects or serialising them again. Values that are not
 * plain objects, or hold no lazy object, go to JSON.stringify whole.
 * @example stringifyKeepingRaw({ a: 1, p: lazyJsonObject(['x'], '{"x":[0.5]}') }) // → '{"a":1,"p":{"x":[0.5]}}'
 */
export function stringifyKeepingRaw(value: unknown): string | undefined {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) return JSON.stringify(value);
  const proto = Object.getPrototypeOf(value) as unknown;
  if ((proto !== Object.prototype && proto !== null) || typeof (value as { toJSON?: unknown }).toJSON === 'function') return JSON.stringify(value);
  const entries = Object.entries(value as Record<string, unknown>);
  if (!entries.some(([, v]) => rawJsonOf(v) !== undefined)) return JSON.stringify(value);
  const parts: string[] = [];
  for (const [key, v] of entries) {
    // As JSON.stringify: a property whose value has no JSON (undefined, a function, a symbol) is left out.
    const text = rawJsonOf(v) ?? JSON.stringify(v);
    if (text !== undefined) parts.push(`${JSON.stringify(key)}:${text}`);
  }
  return `{${parts.join(',')}}`;
}
