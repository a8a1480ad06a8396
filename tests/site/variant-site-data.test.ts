/**
 * Variant pages are rendered from variantSiteData(site) alone (and kept in the page cache under
 * a key of that data): every `site.<field>` the variant template, its layout and its macros
 * read must be in it, or the field would silently render empty.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { escapeAsNunjucks, variantSiteData } from '../../src/site/build-site.js';

const templates = ['templates/variant.njk', 'templates/_includes/base.njk', 'templates/_includes/macros.njk'];

describe('variantSiteData', () => {
  it('holds every site field the variant template, its layout and its macros read', () => {
    const given = new Set(Object.keys(variantSiteData({} as never)));
    const read = new Set<string>();
    for (const t of templates) for (const m of readFileSync(t, 'utf8').matchAll(/\bsite\.([A-Za-z_]\w*)/g)) read.add(m[1]);
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
