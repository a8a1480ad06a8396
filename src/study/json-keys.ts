/**
 * Duplicate keys in a JSON text. JSON.parse keeps the last of two equal keys without a word
 * (RFC 8259 section 4 only says names "SHOULD be unique"), so `{"path": "a", "path": "b"}` would
 * silently read as "b". This scanner walks the text once and reports every key that repeats a
 * key of the same object, with the JSON Pointer (RFC 6901) of the repeat and where both stand.
 *
 * Method: a single pass over the tokens with an explicit stack of open objects and lists (no
 * recursion, so deep nesting cannot overflow the call stack). Keys are compared after decoding
 * their escapes (`"\u0074itle"` is `"title"`). Lines and columns are 1-based; columns count UTF-16
 * code units; CR LF, LF and a lone CR each end a line (as src/study/json-position.ts counts them).
 * The text must be valid JSON (parse it first; the scanner does not report syntax errors). Pure.
 *
 * @example findDuplicateKeys('{"a": 1,\n "a": 2}')
 * // [{ pointer: '/a', key: 'a', line: 2, col: 2, firstLine: 1, firstCol: 2 }]
 */

export interface DuplicateKey {
  /** JSON Pointer of the repeated member, e.g. '/studies/1/path'. */
  pointer: string;
  /** The key as decoded. */
  key: string;
  /** Where the repeat's key starts (its opening quote). */
  line: number;
  col: number;
  /** Where the first use of the key starts. */
  firstLine: number;
  firstCol: number;
}

interface ObjectFrame {
  kind: 'object';
  pointer: string;
  keys: Map<string, { line: number; col: number }>;
  expectKey: boolean;
  key: string;
}

interface ListFrame {
  kind: 'list';
  pointer: string;
  index: number;
}

/** Escape one reference token of a JSON Pointer (RFC 6901 section 3: '~' → '~0', '/' → '~1'). */
export function pointerToken(token: string): string {
  return token.replace(/~/g, '~0').replace(/\//g, '~1');
}

/** Every repeated key of the (valid) JSON text, in text order. */
export function findDuplicateKeys(text: string): DuplicateKey[] {
  const found: DuplicateKey[] = [];
  const stack: Array<ObjectFrame | ListFrame> = [];
  const n = text.length;
  let line = 1;
  let lineStart = 0;
  let i = 0;

  /** Pointer of the value that starts now, inside the innermost open object or list. */
  const valuePointer = (): string => {
    const top = stack[stack.length - 1];
    if (!top) return '';
    return top.kind === 'object' ? `${top.pointer}/${pointerToken(top.key)}` : `${top.pointer}/${top.index}`;
  };

  while (i < n) {
    const c = text.charCodeAt(i);
    if (c === 10 || c === 13) {
      if (c === 13 && text.charCodeAt(i + 1) === 10) i++;
      i++;
      line++;
      lineStart = i;
      continue;
    }
    if (c === 32 || c === 9 || c === 58 /* : */) {
      i++;
      continue;
    }
    const top = stack[stack.length - 1];
    if (c === 123 /* { */) {
      stack.push({ kind: 'object', pointer: valuePointer(), keys: new Map(), expectKey: true, key: '' });
      i++;
    } else if (c === 91 /* [ */) {
      stack.push({ kind: 'list', pointer: valuePointer(), index: 0 });
      i++;
    } else if (c === 125 /* } */ || c === 93 /* ] */) {
      stack.pop();
      i++;
    } else if (c === 44 /* , */) {
      if (top?.kind === 'list') top.index++;
      else if (top?.kind === 'object') top.expectKey = true;
      i++;
    } else if (c === 34 /* " */) {
      const start = i;
      i++;
      while (i < n) {
        const d = text.charCodeAt(i);
        if (d === 92 /* \ */) i += 2;
        else if (d === 34) break;
        else i++;
      }
      i++; // the closing quote
      if (top?.kind === 'object' && top.expectKey) {
        const key = JSON.parse(text.slice(start, i)) as string;
        const here = { line, col: start - lineStart + 1 };
        const first = top.keys.get(key);
        if (first) found.push({ pointer: `${top.pointer}/${pointerToken(key)}`, key, line: here.line, col: here.col, firstLine: first.line, firstCol: first.col });
        else top.keys.set(key, here);
        top.key = key;
        top.expectKey = false;
      }
    } else {
      // A number, true, false or null: skip to the next delimiter.
      while (i < n && !/[\s,\]}]/.test(text.charAt(i))) i++;
    }
  }
  return found;
}
