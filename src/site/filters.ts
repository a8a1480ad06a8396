/**
 * The templates' filters, registered by .eleventy.js (which imports the compiled copy in dist/):
 * the one place Eleventy learns them, for the build and for Eleventy's own command line alike.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

/** Escaped as Nunjucks escapes text it writes into a template (autoescape; node_modules/nunjucks/src/lib.js). */
const NUNJUCKS_ESCAPES: Record<string, string> = { '&': '&amp;', '"': '&quot;', "'": '&#39;', '<': '&lt;', '>': '&gt;', '\\': '&#92;' };
export function escapeAsNunjucks(text: string): string {
  return text.replace(/[&"'<>\\]/g, (ch) => NUNJUCKS_ESCAPES[ch] ?? ch);
}

/**
 * The body rows of a chart's data table as the chart macro (templates/_includes/macros.njk) writes
 * them: the first cell of a row is its header. Written here, not by a loop in the template: a
 * study-level chart's table has a row per variant, and a Nunjucks loop keeps its loop variables
 * cell by cell. Cells are written as Nunjucks writes `{{ cell }}` (null and undefined as nothing,
 * the rest as text, escaped).
 * @example dataRowsHtml([['A<B', 1]]) // → '      <tr><th scope="row">A&lt;B</th><td>1</td></tr>\n'
 */
export function dataRowsHtml(rows: ReadonlyArray<ReadonlyArray<unknown>> | undefined): string {
  let out = '';
  for (const row of rows ?? []) {
    out += '      <tr>';
    row.forEach((cell, i) => {
      const text = cell === null || cell === undefined ? '' : escapeAsNunjucks(String(cell));
      out += i === 0 ? `<th scope="row">${text}</th>` : `<td>${text}</td>`;
    });
    out += '</tr>\n';
  }
  return out;
}

/** JSON for a <script type="application/json"> block: '<' becomes \u003c so '</script>' cannot close it. */
export function jsonScript(value: unknown): string {
  return (JSON.stringify(value ?? null) ?? 'null').replace(/</g, '\\u003c').replace(/\u2028/g, '\\u2028').replace(/\u2029/g, '\\u2029');
}

/**
 * A CSS string literal for `content:` in a <style> block, safe to write unescaped into HTML:
 * quotes, backslashes and line breaks are CSS-escaped, and '<', '>' and '&' become CSS escapes so
 * the text can never close the <style> element.
 * @example cssString('A "b" </style>') // → '"A \\"b\\" \\3c /style\\3e "'
 */
export function cssString(text: unknown): string {
  const s = String(text ?? '').replace(/[\\"\n\r\f<>&]/g, (ch) => (ch === '\\' || ch === '"' ? `\\${ch}` : `\\${ch.charCodeAt(0).toString(16)} `));
  return `"${s}"`;
}

const TEMPLATES = fileURLToPath(new URL('../../templates/', import.meta.url));
const assetCache = new Map<string, string>();

/**
 * The text of an asset by its site path (site.paths.css: 'assets/site.css'), read from
 * templates/assets, for a single-file report that carries it inline.
 */
export function inlineAsset(path: unknown): string {
  const file = String(path);
  if (!/^assets\/[A-Za-z0-9_.-]+$/.test(file)) throw new Error(`inlineAsset: '${file}' is not a file of templates/assets (e.g. 'assets/site.css').`);
  let text = assetCache.get(file);
  if (text === undefined) {
    text = readFileSync(join(TEMPLATES, file), 'utf8');
    assetCache.set(file, text);
  }
  return text;
}

/** Filters by name, as .eleventy.js registers them. */
export const FILTERS = { dataRows: dataRowsHtml, jsonScript, cssString, inlineAsset } as const;
