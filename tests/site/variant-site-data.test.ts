/**
 * Variant pages are rendered from variantSiteData(site) alone (and kept in the page cache under
 * a key of that data): every `site.<field>` the variant template, its layout and its macros
 * read must be in it, or the field would silently render empty.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { variantSiteData } from '../../src/site/build-site.js';

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
