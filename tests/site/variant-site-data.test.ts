/**
 * Variant pages and single-file reports are rendered from variantSiteData(site) alone: every
 * `site.<field>` their templates, layouts, includes and macros read must be in it, or the field
 * would silently render empty.
 */
import { readFileSync, readdirSync } from 'node:fs';
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { variantSiteData } from '../../src/site/build-site.js';
import { dataRowsHtml, escapeAsNunjucks } from '../../src/site/filters.js';

const templates = [
  'templates/variant.njk',
  'templates/report.njk',
  'templates/_includes/base.njk',
  'templates/_includes/standalone.njk',
  'templates/_includes/print-running.njk',
  'templates/_includes/macros.njk',
  'templates/_includes/variant-page.njk',
  ...readdirSync('templates/_includes/variant').map((f) => `templates/_includes/variant/${f}`),
];

describe('variantSiteData', () => {
  it('holds every site field the variant template, its layout and its macros read', () => {
    const given = new Set(Object.keys(variantSiteData({} as never)));
    const read = new Set<string>();
    for (const t of templates) for (const m of readFileSync(t, 'utf8').matchAll(/\bsite\.([A-Za-z_]\w*)/g)) if (m[1]) read.add(m[1]);
    // The variants list is the pagination data, given beside these fields.
    read.delete('variants');
    expect(read.size).toBeGreaterThan(3);
    expect([...read].filter((f) => !given.has(f))).toEqual([]);
  });
});

describe('q slots of kept variant pages', () => {
  it('fill in q texts escaped exactly as Nunjucks escapes them when it renders a page', () => {
    // Reference: Nunjucks' own escape (the autoescape of every {{ }} in the templates), from npm
    // (Eleventy's template engine).
    const nunjucks = createRequire(import.meta.url)('nunjucks') as { lib: { escape: (s: string) => string } };
    for (const text of ['< 0.001', '0.012', '—', `a&b"c'd<e>f\\g`, 'µ 1.2e-5', '']) {
      expect(escapeAsNunjucks(text)).toBe(nunjucks.lib.escape(text));
    }
  });
});

describe('data rows of chart tables', () => {
  it('are the rows the former loop of the chart macro wrote with Nunjucks, for any cells', () => {
    // Reference: the loop the chart macro (templates/_includes/macros.njk) had, rendered by
    // Nunjucks from npm with the site's options (.eleventy.js).
    const nunjucks = createRequire(import.meta.url)('nunjucks') as { Environment: new (loader: null, o: object) => { renderString: (t: string, c: object) => string } };
    const env = new nunjucks.Environment(null, { autoescape: true, throwOnUndefined: false, trimBlocks: true, lstripBlocks: true });
    const loop =
      '      <tbody>\n      {% for row in rows %}\n      <tr>{% for cell in row %}{% if loop.first %}<th scope="row">{{ cell }}</th>{% else %}<td>{{ cell }}</td>{% endif %}{% endfor %}</tr>\n      {% endfor %}\n      </tbody>';
    const cases: unknown[][][] = [
      [],
      [['S166W', '0.63', '0.561–0.707', '< 0.001', 'decreased']],
      [[`a&b"c'd<e>f\\g`, 0, null, undefined, 1.5e-7, '']],
      [['only']],
      [[], ['x', 'y']],
    ];
    // The macro now writes '      <tbody>\n{{ block.table.rows | dataRows | safe }}      </tbody>'.
    for (const rows of cases) expect(`      <tbody>\n${dataRowsHtml(rows)}      </tbody>`).toBe(env.renderString(loop, { rows }));
  });
});
