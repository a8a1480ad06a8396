/**
 * results.json written piece by piece: the same bytes as `JSON.stringify(results) + '\n'`, but
 * never one string of the whole file. A 10,000-variant study's results run to most of a gigabyte
 * of JSON, past V8's largest string (about 512 MB: JSON.stringify throws "Invalid string
 * length"), and a single string that size would double the build's peak memory.
 *
 * Top-level arrays are written element by element, everything else with JSON.stringify; the
 * text goes out in chunks of about CHUNK_CHARS characters.
 */
import { closeSync, openSync, writeSync } from 'node:fs';

/** Characters collected before a write to the file. */
const CHUNK_CHARS = 1 << 20;

/**
 * Write `value` as compact JSON followed by a newline, streaming the elements of its top-level
 * arrays. Equal to writeFileSync(file, JSON.stringify(value) + '\n') for any plain JSON object
 * (keys whose value JSON.stringify leaves out, such as undefined or functions, are left out here too).
 * @example writeJsonStreamed('r.json', { a: [1, { b: 2 }], c: 'x' }) // file: {"a":[1,{"b":2}],"c":"x"}\n
 */
export function writeJsonStreamed(file: string, value: Record<string, unknown>): void {
  const fd = openSync(file, 'w');
  let pending: string[] = [];
  let size = 0;
  const flush = () => {
    if (size > 0) writeSync(fd, pending.join(''));
    pending = [];
    size = 0;
  };
  const write = (text: string) => {
    pending.push(text);
    size += text.length;
    if (size >= CHUNK_CHARS) flush();
  };
  try {
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
  } finally {
    closeSync(fd);
  }
}
