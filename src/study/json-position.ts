/**
 * Where is the JSON syntax error? JSON.parse messages differ between Node versions and often
 * give no position, so this scanner walks the text by the JSON grammar (RFC 8259, sections 2–7)
 * and returns the 1-based line and column of the first character that breaks it, with a reason
 * in plain words. Iterative (explicit stack), so deeply nested input cannot overflow the call stack.
 * Pure. Method: a deterministic push-down scanner; columns count UTF-16 code units.
 * @example locateJsonError('{\n  "a": 1,\n}') // { offset: 12, line: 3, col: 1, reason: "a comma before '}' …" }
 * @example locateJsonError('{"a": 1}') // undefined (valid JSON)
 */
export interface JsonSyntaxProblem {
  offset: number;
  line: number;
  col: number;
  reason: string;
}

type State = 'value' | 'firstValue' | 'firstKey' | 'key' | 'colon' | 'afterValue';

const NUMBER = /-?(0|[1-9]\d*)(\.\d+)?([eE][+-]?\d+)?/y;
const LITERAL = /true|false|null/y;

function describeChar(ch: string): string {
  if (ch === "'") return "a single quote (JSON needs double quotes)";
  if (/\s/.test(ch)) return `the character U+${ch.charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')}`;
  return `'${ch}'`;
}

/** Locate the first JSON syntax error in `text`; undefined when the text is valid JSON. */
export function locateJsonError(text: string): JsonSyntaxProblem | undefined {
  const n = text.length;
  const stack: Array<'o' | 'a'> = [];
  let i = 0;
  let state: State = 'value';
  const fail = (reason: string, at = i): JsonSyntaxProblem => {
    let line = 1;
    let lineStart = 0;
    for (let k = 0; k < at && k < n; k++) {
      const c = text.charCodeAt(k);
      if (c === 10 || (c === 13 && text.charCodeAt(k + 1) !== 10)) {
        line++;
        lineStart = k + 1;
      }
    }
    return { offset: at, line, col: at - lineStart + 1, reason };
  };
  const skipWs = () => {
    while (i < n) {
      const c = text.charCodeAt(i);
      if (c === 32 || c === 9 || c === 10 || c === 13) i++;
      else break;
    }
  };
  const scanString = (): JsonSyntaxProblem | undefined => {
    const start = i;
    i++;
    while (i < n) {
      const c = text.charCodeAt(i);
      if (c === 34) {
        i++;
        return undefined;
      }
      if (c === 92) {
        const e = text[i + 1];
        if (e !== undefined && '"\\/bfnrt'.includes(e)) i += 2;
        else if (e === 'u' && /^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6))) i += 6;
        else return fail('invalid escape sequence in a string (use \\\\ for a backslash, as in Windows paths)');
        continue;
      }
      if (c < 0x20) return fail('a line break or control character inside a string (strings must close on the same line)');
      i++;
    }
    return fail('a string is never closed (missing ")', start);
  };
  for (;;) {
    skipWs();
    const top = stack[stack.length - 1];
    if (state === 'afterValue' && top === undefined) {
      if (i < n) return fail(`unexpected ${describeChar(text.charAt(i))} after the end of the JSON value`);
      return undefined;
    }
    if (i >= n) return fail(stack.length ? `the text ends before every '${top === 'o' ? '{' : '['}' is closed` : 'the text is empty');
    const ch = text.charAt(i); // i < n
    switch (state) {
      case 'firstValue':
      case 'value': {
        if (ch === ']' && state === 'firstValue') {
          stack.pop();
          i++;
          state = 'afterValue';
        } else if (ch === ']' && top === 'a') return fail("a comma before ']' is not allowed (remove the trailing comma)");
        else if (ch === '{') {
          stack.push('o');
          i++;
          state = 'firstKey';
        } else if (ch === '[') {
          stack.push('a');
          i++;
          state = 'firstValue';
        } else if (ch === '"') {
          const err = scanString();
          if (err) return err;
          state = 'afterValue';
        } else if (ch === '-' || (ch >= '0' && ch <= '9')) {
          NUMBER.lastIndex = i;
          const m = NUMBER.exec(text);
          if (!m) return fail(`invalid number`);
          i += m[0].length;
          state = 'afterValue';
        } else {
          LITERAL.lastIndex = i;
          const m = LITERAL.exec(text);
          if (!m) return fail(`unexpected ${describeChar(ch)} where a value is expected (a string in double quotes, a number, true, false, null, an object or a list)`);
          i += m[0].length;
          state = 'afterValue';
        }
        break;
      }
      case 'firstKey':
      case 'key': {
        if (ch === '}' && state === 'firstKey') {
          stack.pop();
          i++;
          state = 'afterValue';
        } else if (ch === '}') return fail("a comma before '}' is not allowed (remove the trailing comma)");
        else if (ch === '"') {
          const err = scanString();
          if (err) return err;
          state = 'colon';
        } else return fail(`expected a field name in double quotes, found ${describeChar(ch)}`);
        break;
      }
      case 'colon':
        if (ch !== ':') return fail(`expected ':' after the field name, found ${describeChar(ch)}`);
        i++;
        state = 'value';
        break;
      case 'afterValue': {
        const close = top === 'o' ? '}' : ']';
        if (ch === ',') {
          i++;
          state = top === 'o' ? 'key' : 'value';
        } else if (ch === close) {
          stack.pop();
          i++;
          state = 'afterValue';
        } else return fail(`expected ',' or '${close}' after the value, found ${describeChar(ch)} (a comma may be missing)`);
        break;
      }
    }
  }
}
