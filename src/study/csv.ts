/**
 * CSV reading (RFC 4180 via papaparse) with file line numbers, and strict number cells.
 *
 * Rules:
 * - UTF-8, with or without BOM; invalid UTF-8 is an error.
 * - Lines starting with '#' are comments; empty and whitespace-only lines are skipped.
 * - The delimiter is sniffed from the header line only: ';' when it has more semicolons
 *   than commas outside quotes, else ','. It is then passed to papaparse explicitly.
 * - Rows are reported with the 1-based file line where they start.
 */
import Papa from 'papaparse';
import { MSG, issue, type MessageText } from './messages.js';
import type { Issue } from './types.js';

export interface CsvRow {
  cells: string[];
  /** 1-based file line where the row starts. */
  line: number;
}

export interface CsvTable {
  delimiter: ',' | ';';
  header?: CsvRow;
  rows: CsvRow[];
  issues: Issue[];
}

/** Decode file bytes as UTF-8 (BOM removed); undefined when the bytes are not UTF-8. */
export function decodeUtf8(data: Uint8Array | string): string | undefined {
  let text: string;
  if (typeof data === 'string') text = data;
  else {
    try {
      text = new TextDecoder('utf-8', { fatal: true }).decode(data);
    } catch {
      return undefined;
    }
  }
  return text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
}

/** Decoded text, or the encoding problem with the 1-based line and column where it starts. */
export type DecodeResult = { ok: true; text: string } | { ok: false; problem: MessageText; line?: number; col?: number };

/** 1-based line and column (in characters) of a byte offset whose preceding bytes are valid UTF-8. */
function bytePosition(bytes: Uint8Array, offset: number): { line: number; col: number } {
  let line = 1;
  let lineStart = 0;
  for (let k = 0; k < offset; k++) {
    if (bytes[k] === 10 || (bytes[k] === 13 && bytes[k + 1] !== 10)) {
      line++;
      lineStart = k + 1;
    }
  }
  const before = new TextDecoder('utf-8').decode(bytes.subarray(lineStart, offset)).replace(/^\uFEFF/, '');
  return { line, col: [...before].length + 1 };
}

/**
 * Offset of the first byte that is not part of a well-formed UTF-8 sequence (Unicode 15, Table 3-7:
 * shortest form, no surrogates, at most U+10FFFF), or -1 when the bytes are valid UTF-8.
 * @example firstInvalidUtf8(new Uint8Array([0x61, 0xb5])) // 1 (Latin-1 µ)
 */
export function firstInvalidUtf8(b: Uint8Array): number {
  let i = 0;
  while (i < b.length) {
    const c = b[i]!;
    if (c < 0x80) {
      i++;
      continue;
    }
    let need: number;
    let lo = 0x80;
    let hi = 0xbf;
    if (c >= 0xc2 && c <= 0xdf) need = 1;
    else if (c >= 0xe0 && c <= 0xef) {
      need = 2;
      if (c === 0xe0) lo = 0xa0;
      if (c === 0xed) hi = 0x9f;
    } else if (c >= 0xf0 && c <= 0xf4) {
      need = 3;
      if (c === 0xf0) lo = 0x90;
      if (c === 0xf4) hi = 0x8f;
    } else return i;
    for (let k = 1; k <= need; k++) {
      const d = b[i + k];
      if (d === undefined || d < (k === 1 ? lo : 0x80) || d > (k === 1 ? hi : 0xbf)) return i;
    }
    i += need + 1;
  }
  return -1;
}

/**
 * Decode file bytes as UTF-8 text for the loader, or say precisely why not: a UTF-16 byte-order
 * mark, the first byte that is not UTF-8 (with its line and column, and the Latin-1 reading of
 * that byte), or NUL characters (binary data, UTF-16 without BOM).
 */
export function decodeText(data: Uint8Array | string): DecodeResult {
  if (typeof data !== 'string') {
    if (data[0] === 0xff && data[1] === 0xfe) return { ok: false, problem: MSG.encodingUtf16('little-endian'), line: 1, col: 1 };
    if (data[0] === 0xfe && data[1] === 0xff) return { ok: false, problem: MSG.encodingUtf16('big-endian'), line: 1, col: 1 };
  }
  const text = decodeUtf8(data);
  if (text === undefined) {
    const bytes = data as Uint8Array;
    const at = firstInvalidUtf8(bytes);
    if (at < 0) return { ok: false, problem: MSG.encoding() };
    return { ok: false, problem: MSG.encodingByte(bytes[at]!), ...bytePosition(bytes, at) };
  }
  const nul = text.indexOf('\0');
  if (nul >= 0) {
    const before = text.slice(0, nul).split(/\r\n|\n|\r/);
    return { ok: false, problem: MSG.nulCharacter(), line: before.length, col: [...before[before.length - 1]!].length + 1 };
  }
  return { ok: true, text };
}

/** Count ',' and ';' outside double quotes in the first non-comment, non-blank line. */
export function sniffDelimiter(text: string): ',' | ';' {
  // Lines end at CRLF, LF or CR; only the lines up to the first counted one are cut out.
  let pos = 0;
  while (pos <= text.length) {
    let end = pos;
    while (end < text.length && text.charCodeAt(end) !== 10 && text.charCodeAt(end) !== 13) end++;
    const line = text.slice(pos, end);
    pos = end + (text.charCodeAt(end) === 13 && text.charCodeAt(end + 1) === 10 ? 2 : 1);
    if (line.trim() === '' || line.startsWith('#')) continue;
    let commas = 0;
    let semis = 0;
    let quoted = false;
    for (const ch of line) {
      if (ch === '"') quoted = !quoted;
      else if (!quoted && ch === ',') commas++;
      else if (!quoted && ch === ';') semis++;
    }
    return semis > commas ? ';' : ',';
  }
  return ',';
}

/** The delimiter `scanCsv` and `parseCsv` use for this text (BOM skipped, then `sniffDelimiter`). */
export function csvDelimiter(input: string): ',' | ';' {
  return sniffDelimiter(input.charCodeAt(0) === 0xfeff ? input.slice(1) : input);
}

/** Offsets at which each line starts, for offset → line lookups. */
function lineStarts(text: string): Uint32Array {
  let n = 1;
  for (let i = text.indexOf('\n'); i >= 0; i = text.indexOf('\n', i + 1)) n++;
  for (let i = text.indexOf('\r'); i >= 0; i = text.indexOf('\r', i + 1)) if (text.charCodeAt(i + 1) !== 10) n++;
  const starts = new Uint32Array(n);
  let k = 1;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 10) starts[k++] = i + 1;
    else if (c === 13 && text.charCodeAt(i + 1) !== 10) starts[k++] = i + 1;
  }
  return starts;
}

/** 1-based line holding `offset` (binary search over the line starts). */
function lineAt(starts: Uint32Array, offset: number): number {
  let lo = 0;
  let hi = starts.length - 1;
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (starts[mid]! <= offset) lo = mid;
    else hi = mid - 1;
  }
  return lo + 1;
}

/** Number of line breaks (CRLF, LF or CR, CRLF counted once) in a cell. */
function countBreaks(c: string): number {
  if (c.indexOf('\n') < 0 && c.indexOf('\r') < 0) return 0;
  let n = 0;
  for (let i = 0; i < c.length; i++) {
    const ch = c.charCodeAt(i);
    if (ch === 10) n++;
    else if (ch === 13) {
      n++;
      if (c.charCodeAt(i + 1) === 10) i++;
    }
  }
  return n;
}

/** papaparse's line-ending guess (5.7.1, ParserHandle.guessLineEndings) for text without quotes. */
function guessNewline(text: string): '\n' | '\r\n' | '\r' {
  const input = text.substring(0, 1024 * 1024);
  const firstR = input.indexOf('\r');
  if (firstR < 0) return '\n';
  const firstN = input.indexOf('\n');
  // n.length > 1 && n[0].length < r[0].length
  if (firstN >= 0 && firstN < firstR) return '\n';
  let pieces = 1;
  let withN = 0;
  for (let i = firstR; i >= 0; i = input.indexOf('\r', i + 1)) {
    pieces++;
    if (input.charCodeAt(i + 1) === 10) withN++;
  }
  return withN >= pieces / 2 ? '\r\n' : '\r';
}

/** Are all cells empty or whitespace (papaparse's skipEmptyLines: 'greedy')? */
function blankRow(cells: string[]): boolean {
  for (const cell of cells) if (cell.length > 0 && cell.trim() !== '') return false;
  return true;
}

/**
 * Called once per CSV row in file order (the header is the first row): the row's cells and the
 * 1-based file line where it starts. The cells array is the caller's to keep.
 */
export type CsvRowSink = (cells: string[], line: number) => void;

/**
 * Parse decoded CSV text row by row without keeping the rows: the streaming core of `parseCsv`.
 * Quoting problems are returned as issues (one per broken row), in file order.
 *
 * Method: text without any double quote is split exactly as papaparse 5.7.1 does in its own
 * "fast mode" (line-ending guess, split on that line ending and the delimiter, '#' comments,
 * greedy blank-line skipping), without papaparse's per-row result objects; any other text goes
 * through papaparse. A row's line is the line of its last character minus the line breaks inside
 * its cells (binary search in a table of line starts, built on first need); in the fast mode,
 * rows without stray CR or LF are simply counted, one file line each. `papaparseOnly` turns the
 * fast mode off (for comparing the two in tests).
 */
export function scanCsv(input: string, file: string, onRow: CsvRowSink, options: { papaparseOnly?: boolean } = {}): { delimiter: ',' | ';'; issues: Issue[] } {
  const text = input.charCodeAt(0) === 0xfeff ? input.slice(1) : input;
  const delimiter = sniffDelimiter(text);
  const issues: Issue[] = [];
  let starts: Uint32Array | undefined; // built on first need
  /** Line where a row starts, from papaparse's cursor (offset just past the row and its line break). */
  const rowLine = (cells: string[], cursor: number): number => {
    starts ??= lineStarts(text);
    const end = Math.max(0, Math.min(cursor, text.length) - 1);
    const endLine = lineAt(starts, end);
    // Line breaks inside the row's cells; a break at the very end of the last cell (a stray CR
    // before the row's own line ending) is on the row's last line and does not count.
    let inner = 0;
    for (const cell of cells) inner += countBreaks(cell);
    const lastCell = cells[cells.length - 1] ?? '';
    const lastCode = lastCell.charCodeAt(lastCell.length - 1);
    if (lastCode === 10 || lastCode === 13) inner--;
    return Math.max(1, endLine - inner);
  };
  if (text.length === 0) return { delimiter, issues };

  // papaparse drops one more BOM from its input (so its offsets shift): such text goes through it.
  if (!options.papaparseOnly && text.indexOf('"') < 0 && text.charCodeAt(0) !== 0xfeff) {
    const newline = guessNewline(text);
    const nl = newline.length;
    // CR and LF other than the line ending itself make a piece "unclean"; clean pieces are one
    // file line each, counted as we go, and only unclean ones need the line-start table.
    const crForeign = newline !== '\r';
    const lfForeign = newline !== '\n';
    let nextCr = crForeign ? text.indexOf('\r') : -1;
    let nextLf = lfForeign ? text.indexOf('\n') : -1;
    let physLine = 1;
    let pos = 0;
    for (;;) {
      const at = text.indexOf(newline, pos);
      const last = at < 0;
      const stop = last ? text.length : at;
      const lineText = text.slice(pos, stop);
      const cursor = last ? text.length : at + nl;
      if (nextCr >= 0 && nextCr < pos) nextCr = text.indexOf('\r', pos);
      if (nextLf >= 0 && nextLf < pos) nextLf = text.indexOf('\n', pos);
      const clean = !((nextCr >= 0 && nextCr < stop) || (nextLf >= 0 && nextLf < stop));
      pos = cursor;
      if (lineText.charCodeAt(0) !== 35) {
        const cells = lineText.split(delimiter);
        if (!blankRow(cells)) onRow(cells, clean ? physLine : rowLine(cells, cursor));
      }
      if (last) break;
      if (clean) physLine++;
      else physLine = lineAt((starts ??= lineStarts(text)), cursor);
    }
    return { delimiter, issues };
  }

  starts = lineStarts(text);
  const table = starts;
  Papa.parse<string[]>(text, {
    delimiter,
    header: false,
    comments: '#',
    skipEmptyLines: 'greedy',
    step(result) {
      const cells = result.data;
      let line = rowLine(cells, result.meta.cursor);
      // One issue per broken row: papaparse often reports the same quote twice.
      for (const err of result.errors.slice(0, 1)) {
        if (typeof err.index === 'number') {
          let offset = Math.min(Math.max(0, err.index), text.length);
          // papaparse points just past an unclosed opening quote: point at the quote itself.
          if (err.code === 'MissingQuotes' && text[offset] !== '"' && text[offset - 1] === '"') offset--;
          const at = lineAt(table, offset);
          if (err.code === 'MissingQuotes') line = Math.min(line, at); // the row starts where its quote opens
          issues.push(issue(MSG.quotes(err.message.toLowerCase()), { file, line: at, col: offset - table[at - 1]! + 1 }));
        } else issues.push(issue(MSG.quotes(err.message.toLowerCase()), { file, line }));
      }
      onRow(cells, line);
    },
  });
  return { delimiter, issues };
}

/** Parse decoded CSV text into a header and rows with line numbers (all rows kept; see `scanCsv`). */
export function parseCsv(input: string, file: string): CsvTable {
  const rows: CsvRow[] = [];
  const { delimiter, issues } = scanCsv(input, file, (cells, line) => {
    rows.push({ cells, line });
  });
  const [header, ...data] = rows;
  return { delimiter, header, rows: data, issues };
}

export type NumberParse =
  | { ok: true; value: number }
  | { ok: false; reason: 'not-a-number' | 'decimal-comma' | 'decimal-point' | 'not-an-integer' };

const PLAIN_NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

/**
 * Strict number parsing of one cell (already trimmed).
 * Accepted: optional sign, digits with one decimal separator, optional exponent
 * ('12', '-0.5', '.5', '1e-3', '00123' = 123). Rejected: thousands separators, units,
 * dates, 'NaN', 'Infinity', hex, empty text. With decimal ',' the separator must be ','
 * and a '.' is rejected, so a mixed-up file cannot pass silently.
 * @example parseNumberCell('1,5', ',') // { ok: true, value: 1.5 }
 * @example parseNumberCell('1,5', '.') // { ok: false, reason: 'decimal-comma' }
 */
export function parseNumberCell(text: string, decimal: '.' | ',', integer = false): NumberParse {
  const fast = numberCellValue(text, decimal, integer);
  if (fast === fast) return { ok: true, value: fast };
  let t = text;
  if (decimal === ',') {
    if (t.includes('.')) return { ok: false, reason: PLAIN_NUMBER.test(t) ? 'decimal-point' : 'not-a-number' };
    t = t.replace(',', '.');
  } else if (/^[+-]?\d*,\d+([eE][+-]?\d+)?$/.test(t)) {
    return { ok: false, reason: 'decimal-comma' };
  }
  if (!PLAIN_NUMBER.test(t)) return { ok: false, reason: 'not-a-number' };
  const value = Number(t);
  if (!Number.isFinite(value)) return { ok: false, reason: 'not-a-number' };
  if (integer && !Number.isInteger(value)) return { ok: false, reason: 'not-an-integer' };
  return { ok: true, value };
}

/** Exact powers of ten 1e0 … 1e22 (all exactly representable as doubles). */
const POW10 = Array.from({ length: 23 }, (_, k) => Number(`1e${k}`));

/**
 * Scan a cell against PLAIN_NUMBER with `sep` (46 '.', 44 ',') as the decimal separator:
 * `[+-]?(\d+(SEP\d*)?|SEP\d+)([eE][+-]?\d+)?`, digits ASCII 0–9 only. Returns the value when
 * the fast path below applies, Infinity when the text matches but needs Number(), NaN when it
 * does not match.
 *
 * Fast path (Clinger's, "How to read floating point numbers accurately", PLDI 1990): with at
 * most 15 digits the digit string m is an exact integer (< 2^53), and for a decimal exponent e
 * with |e| ≤ 22, 10^|e| is exact too, so one IEEE multiplication or division m·10^e, m/10^-e
 * is correctly rounded, the same double Number() returns.
 * @example scanNumber('150.13', 46) // 150.13 (15013 / 100)
 * @example scanNumber('1,5', 46) // NaN
 */
function scanNumber(t: string, sep: number): number {
  const n = t.length;
  let i = 0;
  let c = t.charCodeAt(0);
  let neg = false;
  if (c === 43 || c === 45) {
    neg = c === 45;
    c = t.charCodeAt(++i);
  }
  let m = 0;
  let digits = 0;
  let intDigits = 0;
  while (c >= 48 && c <= 57) {
    m = m * 10 + (c - 48);
    intDigits++;
    c = t.charCodeAt(++i);
  }
  digits = intDigits;
  let fracDigits = 0;
  if (c === sep) {
    c = t.charCodeAt(++i);
    while (c >= 48 && c <= 57) {
      m = m * 10 + (c - 48);
      fracDigits++;
      c = t.charCodeAt(++i);
    }
    if (intDigits === 0 && fracDigits === 0) return NaN;
    digits += fracDigits;
  } else if (intDigits === 0) return NaN;
  let exp = 0;
  if (c === 101 || c === 69) {
    c = t.charCodeAt(++i);
    let expNeg = false;
    if (c === 43 || c === 45) {
      expNeg = c === 45;
      c = t.charCodeAt(++i);
    }
    let expDigits = 0;
    while (c >= 48 && c <= 57) {
      if (exp < 1e6) exp = exp * 10 + (c - 48);
      expDigits++;
      c = t.charCodeAt(++i);
    }
    if (expDigits === 0) return NaN;
    if (expNeg) exp = -exp;
  }
  if (i !== n) return NaN;
  if (digits > 15) return Infinity;
  const e = exp - fracDigits;
  let v: number;
  if (e === 0) v = m;
  else if (e > 0 && e <= 22) v = m * POW10[e]!;
  else if (e < 0 && e >= -22) v = m / POW10[-e]!;
  else return Infinity;
  return neg ? -v : v;
}

/**
 * The value of a number cell when `parseNumberCell` would accept it, else NaN (then
 * `parseNumberCell` gives the reason). Same rules, without a result object per cell: a scan of
 * the plain-number pattern that also reads most values exactly (see `scanNumber`), Number() of
 * the text for the rest (decimal ',' first replaced by '.').
 * @example numberCellValue('1,5', ',') // 1.5
 * @example numberCellValue('1,5', '.') // NaN (decimal comma)
 */
export function numberCellValue(text: string, decimal: '.' | ',', integer = false): number {
  let value = scanNumber(text, decimal === ',' ? 44 : 46);
  if (value !== value) return NaN;
  if (value === Infinity) value = Number(decimal === ',' ? text.replace(',', '.') : text);
  if (value - value !== 0) return NaN; // not finite (overflow such as 1e999)
  if (integer && !Number.isInteger(value)) return NaN;
  return value;
}
