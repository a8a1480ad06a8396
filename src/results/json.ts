/**
 * results.json written piece by piece: the same bytes as `JSON.stringify(results) + '\n'`, but
 * never one string of the whole file. A 10,000-variant study's results run to most of a gigabyte
 * of JSON, past V8's largest string (about 512 MB: JSON.stringify throws "Invalid string
 * length"), and a single string that size would double the build's peak memory.
 *
 * Top-level arrays are written element by element, everything else with JSON.stringify; the
 * text goes out in chunks of about CHUNK_CHARS characters.
 */
import { createHash } from 'node:crypto';
import { closeSync, openSync, writeSync } from 'node:fs';

/** Characters collected before a write to the file. */
const CHUNK_CHARS = 1 << 20;

/**
 * Write `value` as compact JSON followed by a newline, streaming the elements of its top-level
 * arrays. Equal to writeFileSync(file, JSON.stringify(value) + '\n') for any plain JSON object
 * (keys whose value JSON.stringify leaves out, such as undefined or functions, are left out here too).
 * Returns the SHA-256 (hex) of the bytes written, as the single-file reports quote it.
 * @example writeJsonStreamed('r.json', { a: [1, { b: 2 }], c: 'x' }) // file: {"a":[1,{"b":2}],"c":"x"}\n
 */
export function writeJsonStreamed(file: string, value: Record<string, unknown>): string {
  const fd = openSync(file, 'w');
  const hash = createHash('sha256');
  try {
    streamJson(value, (text) => {
      writeSync(fd, text);
      hash.update(text, 'utf8');
    });
  } finally {
    closeSync(fd);
  }
  return hash.digest('hex');
}

/** The SHA-256 (hex) of the bytes writeJsonStreamed would write for `value`, without writing them or holding them in one string. */
export function jsonSha256(value: Record<string, unknown>): string {
  const hash = createHash('sha256');
  streamJson(value, (text) => hash.update(text, 'utf8'));
  return hash.digest('hex');
}

/** The JSON text of `value` (as writeJsonStreamed writes it), handed to `out` in chunks of about CHUNK_CHARS characters. */
function streamJson(value: Record<string, unknown>, out: (text: string) => void): void {
  let pending: string[] = [];
  let size = 0;
  const flush = () => {
    if (size > 0) out(pending.join(''));
    pending = [];
    size = 0;
  };
  const write = (text: string) => {
    pending.push(text);
    size += text.length;
    if (size >= CHUNK_CHARS) flush();
  };
  write('{');
  let first = true;
  for (const [key, v] of Object.entries(value)) {
    if (Array.isArray(v)) {
      write(`${first ? '' : ','}${JSON.stringify(key)}:[`);
      // As JSON.stringify writes array elements: undefined, functions and symbols as null.
      v.forEach((item, i) => write(`${i > 0 ? ',' : ''}${JSON.stringify(item) ?? 'null'}`));
      write(']');
    } else {
      const text = JSON.stringify(v);
      if (text === undefined) continue; // as JSON.stringify drops the key
      write(`${first ? '' : ','}${JSON.stringify(key)}:${text}`);
    }
    first = false;
  }
  write('}\n');
  flush();
}
