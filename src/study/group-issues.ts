/**
 * One message per problem: findings of one kind in one column of one file (a decimal comma in
 * every cell of 'rate', actin in mM flagged on 396 rows, one misspelt label on 32 rows) become
 * one issue, with the first finding's text, how many there are and the lines they are on. Pure.
 *
 * Issues are grouped by severity, code, file, column and `group` (a finer key some findings set,
 * e.g. the unknown label itself, so that two different misspellings stay two problems). Only issues
 * located on a CSV line are grouped; manifest issues (JSON paths) and file-level issues stay as they
 * are. The grouped issue keeps the first finding's location, message and fix, spans to the last
 * line (`at.lineEnd`), carries `count` and the union of the variants the findings touch, and adds
 * one sentence with the count and the line ranges. Issues keep the order of their first finding.
 */
import type { Issue } from './types.js';

/** Line ranges shown in a grouped message; more are summarised as "and N more ranges". */
export const SHOWN_RANGES = 6;

/**
 * Sorted, distinct line numbers as ranges.
 * @example lineRanges([3, 4, 5, 9, 12, 13]) // [[3, 5], [9, 9], [12, 13]]
 */
export function lineRanges(lines: readonly number[]): Array<[number, number]> {
  const sorted = [...new Set(lines)].sort((a, b) => a - b);
  const out: Array<[number, number]> = [];
  for (const l of sorted) {
    const last = out[out.length - 1];
    if (last && l === last[1] + 1) last[1] = l;
    else out.push([l, l]);
  }
  return out;
}

/**
 * Ranges as text, at most `max` of them.
 * @example rangesText([[3, 5], [9, 9]]) // 'lines 3–5, 9'
 */
export function rangesText(ranges: ReadonlyArray<[number, number]>, max = SHOWN_RANGES): string {
  const one = ([a, b]: [number, number]) => (a === b ? String(a) : `${a}–${b}`);
  const shown = ranges.slice(0, max).map(one).join(', ');
  const rest = ranges.length - max;
  const [only] = ranges;
  const word = ranges.length === 1 && only !== undefined && only[0] === only[1] ? 'line' : 'lines';
  return `${word} ${shown}${rest > 0 ? ` and ${rest} more range${rest === 1 ? '' : 's'}` : ''}`;
}

const count = (n: number) => n.toLocaleString('en-GB');

/** Group repeated findings (see the module comment). Issues without `group` or `count` come out unchanged. */
export function groupIssues(issues: readonly Issue[]): Issue[] {
  const groups = new Map<string, Issue[]>();
  const order: Array<Issue | Issue[]> = [];
  for (const i of issues) {
    if (i.at.line === undefined || i.at.jsonPath !== undefined) {
      order.push(i);
      continue;
    }
    const key = JSON.stringify([i.severity, i.code, i.at.file, i.at.column ?? null, i.group ?? null]);
    let list = groups.get(key);
    if (!list) {
      groups.set(key, (list = []));
      order.push(list);
    }
    list.push(i);
  }
  return order.map((entry) => (Array.isArray(entry) ? merge(entry) : strip(entry)));
}

function strip(i: Issue): Issue {
  if (i.group === undefined) return i;
  const { group: _group, ...rest } = i;
  return rest;
}

/** One issue for a group of issues (groups are made from at least one issue each). */
function merge(list: Issue[]): Issue {
  const first = strip(list[0]!);
  const total = list.reduce((n, i) => n + (i.count ?? 1), 0);
  if (list.length === 1) return first;
  const lines: number[] = [];
  for (const i of list) {
    lines.push(i.at.line!);
    if (i.at.lineEnd !== undefined) for (let l = i.at.line! + 1; l <= i.at.lineEnd; l++) lines.push(l);
  }
  const ranges = lineRanges(lines);
  const variants = [...new Set(list.flatMap((i) => i.variants ?? []))];
  const where = first.at.column !== undefined ? `cells of '${first.at.column}'` : 'rows';
  const more = total - (first.count ?? 1);
  const message = `${first.message} The same on ${count(more)} more ${more === 1 ? where.replace(/s( of|$)/, '$1') : where} (${count(total)} in all, ${rangesText(ranges)}).`;
  const at = { ...first.at, lineEnd: ranges[ranges.length - 1]![1] }; // at least two issues, so at least one range
  return { ...first, message, at, count: total, ...(variants.length > 0 ? { variants } : {}) };
}
