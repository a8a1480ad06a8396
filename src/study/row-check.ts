/**
 * A fast pre-check of the row schemas: compiled once per file from the JSON Schema and the
 * file's columns, it answers "is this row valid?" from the row's values by column slot, without
 * building an object per row. It decides validity only; when it says no, the caller runs the
 * ajv validator on the row object to get the exact errors. Pure.
 *
 * Supported keywords (those the row schemas use): type, properties, required, enum, const,
 * minimum, maximum, exclusiveMinimum, exclusiveMaximum, minLength, not, if/then/else, and
 * annotations (title, description, $schema, $id, $comment, x-*). A schema with any other
 * keyword compiles to undefined, and the caller then validates every row with ajv.
 */

/** Values of one row by column slot (undefined: no value). */
export type RowValues = ReadonlyArray<string | number | undefined>;
export type RowCheck = (vals: RowValues) => boolean;

const ANNOTATIONS = new Set(['title', 'description', '$schema', '$id', '$comment', 'default', 'examples']);

type Node = Record<string, unknown>;

/** JSON Schema string length: Unicode code points (as ajv counts them). */
function codePoints(s: string): number {
  let n = 0;
  for (const _ of s) n++;
  return n;
}

/** Check of one value against a property subschema; undefined when unsupported. */
function compileValue(node: Node): ((v: string | number) => boolean) | undefined {
  const checks: Array<(v: string | number) => boolean> = [];
  for (const [key, arg] of Object.entries(node)) {
    if (ANNOTATIONS.has(key) || key.startsWith('x-')) continue;
    switch (key) {
      case 'type':
        if (arg === 'string') checks.push((v) => typeof v === 'string');
        else if (arg === 'number') checks.push((v) => typeof v === 'number' && Number.isFinite(v));
        else if (arg === 'integer') checks.push((v) => typeof v === 'number' && Number.isInteger(v));
        else return undefined;
        break;
      case 'enum': {
        if (!Array.isArray(arg) || !arg.every((a) => typeof a === 'string' || typeof a === 'number')) return undefined;
        const allowed = arg as Array<string | number>;
        checks.push((v) => allowed.includes(v));
        break;
      }
      case 'const':
        if (typeof arg !== 'string' && typeof arg !== 'number') return undefined;
        checks.push((v) => v === arg);
        break;
      case 'minimum':
      case 'maximum':
      case 'exclusiveMinimum':
      case 'exclusiveMaximum': {
        if (typeof arg !== 'number') return undefined;
        const lim = arg;
        // Numeric keywords apply to numbers only.
        if (key === 'minimum') checks.push((v) => typeof v !== 'number' || v >= lim);
        else if (key === 'maximum') checks.push((v) => typeof v !== 'number' || v <= lim);
        else if (key === 'exclusiveMinimum') checks.push((v) => typeof v !== 'number' || v > lim);
        else checks.push((v) => typeof v !== 'number' || v < lim);
        break;
      }
      case 'minLength': {
        if (typeof arg !== 'number') return undefined;
        const lim = arg;
        checks.push((v) => typeof v !== 'string' || (v.length >= lim && (lim <= 1 || codePoints(v) >= lim)));
        break;
      }
      default:
        return undefined;
    }
  }
  if (checks.length === 0) return () => true;
  if (checks.length === 1) return checks[0]!;
  return (v) => {
    for (const check of checks) if (!check(v)) return false;
    return true;
  };
}

/** Check of the row object against a schema node; undefined when unsupported. */
function compileObject(node: Node, slotOf: (name: string) => number | undefined): RowCheck | undefined {
  const checks: RowCheck[] = [];
  for (const [key, arg] of Object.entries(node)) {
    if (ANNOTATIONS.has(key) || key.startsWith('x-')) continue;
    switch (key) {
      case 'type':
        if (arg !== 'object') return undefined; // the row is always an object
        break;
      case 'required': {
        if (!Array.isArray(arg)) return undefined;
        const slots: number[] = [];
        for (const name of arg as string[]) {
          const slot = slotOf(name);
          if (slot === undefined) return () => false; // the column is absent: never satisfied
          slots.push(slot);
        }
        checks.push((vals) => {
          for (const slot of slots) if (vals[slot] === undefined) return false;
          return true;
        });
        break;
      }
      case 'properties': {
        const props = arg as Record<string, Node>;
        for (const [name, sub] of Object.entries(props)) {
          const check = compileValue(sub);
          if (!check) return undefined;
          const slot = slotOf(name);
          if (slot === undefined) continue; // never present in this file
          checks.push((vals) => {
            const v = vals[slot];
            return v === undefined || check(v);
          });
        }
        break;
      }
      case 'not': {
        const inner = compileObject(arg as Node, slotOf);
        if (!inner) return undefined;
        checks.push((vals) => !inner(vals));
        break;
      }
      case 'if': {
        const cond = compileObject(arg as Node, slotOf);
        const then = node.then === undefined ? () => true : compileObject(node.then as Node, slotOf);
        const otherwise = node.else === undefined ? () => true : compileObject(node.else as Node, slotOf);
        if (!cond || !then || !otherwise) return undefined;
        checks.push((vals) => (cond(vals) ? then(vals) : otherwise(vals)));
        break;
      }
      case 'then':
      case 'else':
        if (node.if === undefined) continue; // ignored without 'if', as in JSON Schema
        break;
      default:
        return undefined;
    }
  }
  return (vals) => {
    for (const check of checks) if (!check(vals)) return false;
    return true;
  };
}

/**
 * Compile a row schema for one file's columns. `slotOf(name)` gives the slot of a column in the
 * values array, undefined when the file lacks the column. Returns undefined when the schema uses
 * a keyword this pre-check does not know.
 * @example compileRowCheck({ type: 'object', required: ['a'], properties: { a: { type: 'number', minimum: 0 } } }, (n) => (n === 'a' ? 0 : undefined))!([2]) // true
 */
export function compileRowCheck(schema: Record<string, unknown>, slotOf: (name: string) => number | undefined): RowCheck | undefined {
  return compileObject(schema, slotOf);
}
