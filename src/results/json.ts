/**
 * results.json written piece by piece: the same bytes as `JSON.stringify(results) + '\n'`, but
 * never one string of the whole file. A 10,000-variant study's results run to about a gigabyte
 * of JSON, past V8's largest string (about 512 MB: JSON.stringify throws "Invalid string
 * length"), and a single string that size would double the build's peak memory.
 *
 * Top-level arrays are written element by element, everything else with JSON.stringify; the
 * text goes out through a buffer in chunks of about CHUNK_BYTES. An element's properties that
 * keep their JSON bytes (units' plots, fits and metricSe from the analysis cache, read from its
 * files: src/results/raw-json.ts) are copied as those bytes.
 */
import { closeSync, openSync, writeSync } from 'node:fs';
import { jsonPieces, peekRawJson } from './raw-json.js';

/** Bytes collected before a write to the file. */
const CHUNK_BYTES = 1 << 20;

/**
 * A sink that collects text and bytes (UTF-8) in one buffer, reused from chunk to chunk, and
 * writes it to `fd` when full. A new buffer per chunk cost a page fault per 4 KB page written
 * (the 1,000-variant rebuild's write phase went from 0.94 s to 0.82 s, near the noise).
 */
function chunkedWriter(fd: number) {
  const buf = Buffer.allocUnsafe(CHUNK_BYTES);
  let size = 0;
  const flush = () => {
    for (let at = 0; at < size; at += writeSync(fd, buf, at, size - at));
    size = 0;
  };
  return {
    write(piece: string | Uint8Array) {
      if (typeof piece === 'string') {
        // At most 3 UTF-8 bytes per UTF-16 code unit.
        if (size + piece.length * 3 > CHUNK_BYTES) {
          flush();
          if (piece.length * 3 > CHUNK_BYTES) {
            const bytes = Buffer.from(piece, 'utf8');
            for (let at = 0; at < bytes.length; at += writeSync(fd, bytes, at));
            return;
          }
        }
        size += buf.write(piece, size, 'utf8');
      } else {
        if (size + piece.byteLength > CHUNK_BYTES) {
          flush();
          if (piece.byteLength > CHUNK_BYTES) {
            for (let at = 0; at < piece.byteLength; at += writeSync(fd, piece, at));
            return;
          }
        }
        buf.set(piece, size);
        size += piece.byteLength;
      }
    },
    flush,
  };
}

/**
 * The writing of `value` (see writeJsonStreamed) as steps: each call of the generator's next()
 * writes one top-level element or key, so a caller may pause between steps.
 */
function* jsonSteps(out: ReturnType<typeof chunkedWriter>, value: Record<string, unknown>): Generator<void, void, void> {
  out.write('{');
  let first = true;
  for (const [key, v] of Object.entries(value)) {
    if (Array.isArray(v)) {
      out.write(`${first ? '' : ','}${JSON.stringify(key)}:[`);
      for (let i = 0; i < v.length; i++) {
        if (i > 0) out.write(',');
        const pieces = jsonPieces(v[i]);
        if (pieces === undefined) out.write('null');
        // A lazy object's bytes are written (copied) before the next is peeked.
        else for (const p of pieces) out.write(typeof p === 'string' ? p : (peekRawJson(p) as Uint8Array));
        yield;
      }
      out.write(']');
    } else {
      const text = JSON.stringify(v);
      if (text === undefined) continue; // as JSON.stringify drops the key
      out.write(`${first ? '' : ','}${JSON.stringify(key)}:${text}`);
      yield;
    }
    first = false;
  }
  out.write('}\n');
  out.flush();
}

/**
 * Write `value` as compact JSON followed by a newline, streaming the elements of its top-level
 * arrays. Equal to writeFileSync(file, JSON.stringify(value) + '\n') for any plain JSON object
 * (keys whose value JSON.stringify leaves out, such as undefined or functions, are left out here too).
 * @example writeJsonStreamed('r.json', { a: [1, { b: 2 }], c: 'x' }) // file: {"a":[1,{"b":2}],"c":"x"}\n
 */
export function writeJsonStreamed(file: string, value: Record<string, unknown>): void {
  const fd = openSync(file, 'w');
  try {
    for (const _ of jsonSteps(chunkedWriter(fd), value));
  } finally {
    closeSync(fd);
  }
}

/**
 * writeJsonStreamed in slices of about `sliceMs` of work, giving the event loop back between
 * slices: the build writes results.json while it waits on its chart workers. `value` must not
 * change until the promise settles; `signal` stops the writing (the promise then rejects).
 */
export async function writeJsonInSlices(file: string, value: Record<string, unknown>, options: { sliceMs?: number; signal?: AbortSignal } = {}): Promise<void> {
  const sliceMs = options.sliceMs ?? 4;
  const fd = openSync(file, 'w');
  try {
    const steps = jsonSteps(chunkedWriter(fd), value);
    for (;;) {
      options.signal?.throwIfAborted();
      const until = performance.now() + sliceMs;
      let done = false;
      do done = steps.next().done === true;
      while (!done && performance.now() < until);
      if (done) return;
      await new Promise<void>((resolve) => setImmediate(resolve));
    }
  } finally {
    closeSync(fd);
  }
}
