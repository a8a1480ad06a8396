/**
 * Objects that keep the JSON text they were read from (as UTF-8 bytes), so that text can be
 * written out again without decoding it, parsing it and serialising it back.
 *
 * The analysis cache (src/build/analysis-cache.ts) stores the parts of each unit that a rebuild
 * does not read (its `plot`, the readings and curves its charts draw, most of a unit's bytes; its
 * `fit` and `metricSe`) as JSON text. A rebuild reads the study's units from the cache, but draws
 * the charts of a few variants only; every unit is written to results.json, though. Left as bytes
 * of the cache file, such a part costs two small objects instead of dozens (whose deserialisation
 * and garbage collection were the larger part of a 1,000-variant rebuild), and results.json
 * copies the bytes as they are (writeJsonStreamed).
 *
 *   lazyJsonObject(bytes) ──any property or key read──▶ JSON.parse(UTF-8 text) once, answers from it
 *                         ──rawJsonOf──▶ bytes (until a property is assigned, defined or deleted)
 *
 * The text must be JSON.stringify's own output for the object, and nothing may change the parsed
 * values in place (these parts are not changed after the fit): then JSON.stringify of the object,
 * read or not, gives the text back byte for byte. The objects are proxies: util.inspect shows
 * their state, not their properties (spread one first), and structuredClone refuses them.
 */

/** Key under which a lazy object answers with its state while its bytes stand for it (never an own key it lists). */
const RAW_JSON: unique symbol = Symbol('myofolio.rawJson');

/**
 * What a lazy object holds, and the target of its proxy: where its text is, and the parsed
 * object once a property is read. Its own properties are plain (configurable) ones, so the
 * proxy may report other properties instead of them.
 */
interface LazyState {
  source: Uint8Array | TextSource;
  start: number;
  end: number;
  /** False once a property was assigned, defined or deleted: the bytes no longer stand for it. */
  raw: boolean;
  parsed: Record<string | symbol, unknown> | undefined;
}

/**
 * Where a lazy object's JSON text is when it is not in memory (a file, say): its bytes are read
 * each time they are wanted, so a study's worth of text need not be held.
 */
export interface TextSource {
  /** The bytes `start`..`end`, in a buffer that the next `peek` (of any source) may overwrite. */
  peek(start: number, end: number): Uint8Array;
}

/** The bytes of a state's text: a view of its buffer, or a peek at its source. */
function peekState(s: LazyState): Uint8Array {
  if (!(s.source instanceof Uint8Array)) return s.source.peek(s.start, s.end);
  return s.start === 0 && s.end === s.source.byteLength ? s.source : s.source.subarray(s.start, s.end);
}

function parsedOf(s: LazyState): Record<string | symbol, unknown> {
  if (s.parsed === undefined) {
    const bytes = peekState(s);
    s.parsed = JSON.parse(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString('utf8')) as Record<string, unknown>;
  }
  return s.parsed;
}

/**
 * One handler for every lazy object: each trap works on the parsed object, so the proxy behaves
 * as that object does (keys in their order, spread, JSON.stringify, toEqual). The target's
 * prototype, Object.prototype, is what the proxy reports; every property it reports is
 * configurable, as the proxy invariants require of properties the target does not have.
 */
const HANDLER: ProxyHandler<LazyState> = {
  get(s, key) {
    if (key === RAW_JSON) return s.raw ? s : undefined;
    // JSON gives no symbol keys, so a look for one (Symbol.toStringTag, say) needs no parse.
    if (typeof key === 'symbol' && s.parsed === undefined) return (Object.prototype as Record<symbol, unknown>)[key];
    return parsedOf(s)[key];
  },
  has(s, key) {
    if (typeof key === 'symbol' && s.parsed === undefined) return key in Object.prototype;
    return key in parsedOf(s);
  },
  ownKeys(s) {
    return Reflect.ownKeys(parsedOf(s));
  },
  getOwnPropertyDescriptor(s, key) {
    const d = Reflect.getOwnPropertyDescriptor(parsedOf(s), key);
    return d === undefined ? undefined : { ...d, configurable: true };
  },
  set(s, key, value) {
    parsedOf(s)[key] = value;
    s.raw = false;
    return true;
  },
  defineProperty(s, key, descriptor) {
    s.raw = false;
    return Reflect.defineProperty(parsedOf(s), key, { ...descriptor, configurable: true });
  },
  deleteProperty(s, key) {
    s.raw = false;
    return Reflect.deleteProperty(parsedOf(s), key);
  },
};

/**
 * An object whose properties are those of the JSON object in `source` (UTF-8 bytes, or the
 * bytes `start`..`end` of it; or a TextSource, read when needed), parsed when a property or key
 * is first read: a proxy with one shared handler, so an object never read costs two small
 * objects and no copy of its bytes.
 * Changing it (assign, define, delete) keeps the other values and drops the bytes (rawJsonOf
 * then gives undefined). Values JSON cannot hold must not be in the text's object: a key whose
 * value was undefined is missing, and -0 reads as 0.
 * @example const o = lazyJsonObject<{ a: number[] }>(Buffer.from('{"a":[1,2]}')); o.a[1] // → 2
 */
export function lazyJsonObject<T extends object>(source: Uint8Array, start?: number, end?: number): T;
export function lazyJsonObject<T extends object>(source: TextSource, start: number, end: number): T;
export function lazyJsonObject<T extends object>(source: Uint8Array | TextSource, start = 0, end = source instanceof Uint8Array ? source.byteLength : 0): T {
  const state: LazyState = { source, start, end, raw: true, parsed: undefined };
  return new Proxy(state, HANDLER) as unknown as T;
}

function stateOf(value: unknown): LazyState | undefined {
  if (value === null || typeof value !== 'object') return undefined;
  return (value as Record<symbol, unknown>)[RAW_JSON] as LazyState | undefined;
}

/** The JSON bytes an object was made from (lazyJsonObject), if they still stand for the object: kept by the caller (a copy when read from a TextSource). */
export function rawJsonOf(value: unknown): Uint8Array | undefined {
  const s = stateOf(value);
  if (s === undefined) return undefined;
  return s.source instanceof Uint8Array ? peekState(s) : Buffer.from(peekState(s));
}

/**
 * rawJsonOf without a copy: the bytes are valid only until the next `peek` of any TextSource, so
 * they must be used (written, copied) at once.
 */
export function peekRawJson(value: unknown): Uint8Array | undefined {
  const s = stateOf(value);
  return s === undefined ? undefined : peekState(s);
}

/** A piece of JSON text: a string, or a lazy object standing for its kept bytes (peekRawJson). */
export type JsonPiece = string | { readonly [RAW_JSON]?: never };

/**
 * JSON.stringify(value) in pieces, with the lazy objects among its own properties that keep their
 * bytes as pieces of their own: the same text once the pieces are joined (strings as UTF-8, lazy
 * objects as peekRawJson's bytes, each used before the next is peeked), without parsing those
 * objects or serialising them again. Undefined where JSON.stringify gives undefined. Values that
 * are not plain objects, or hold no such lazy object, are one JSON.stringify.
 * @example jsonPieces({ a: 1, p: lazyJsonObject(Buffer.from('{"x":[0.5]}')) }) // → ['{"a":1,"p":', <p>, '}']
 */
export function jsonPieces(value: unknown): JsonPiece[] | undefined {
  const whole = () => {
    const text = JSON.stringify(value);
    return text === undefined ? undefined : [text];
  };
  if (value === null || typeof value !== 'object' || Array.isArray(value)) return whole();
  const proto = Object.getPrototypeOf(value) as unknown;
  if ((proto !== Object.prototype && proto !== null) || typeof (value as { toJSON?: unknown }).toJSON === 'function') return whole();
  const entries = Object.entries(value as Record<string, unknown>);
  if (!entries.some(([, v]) => stateOf(v) !== undefined)) return whole();
  const pieces: JsonPiece[] = [];
  let text = '{';
  let first = true;
  for (const [key, v] of entries) {
    const kept = stateOf(v) !== undefined;
    // As JSON.stringify: a property whose value has no JSON (undefined, a function, a symbol) is left out.
    const json = kept ? '' : JSON.stringify(v);
    if (json === undefined) continue;
    text += `${first ? '' : ','}${JSON.stringify(key)}:`;
    first = false;
    if (!kept) text += json;
    else {
      pieces.push(text, v as JsonPiece);
      text = '';
    }
  }
  pieces.push(`${text}}`);
  return pieces;
}
