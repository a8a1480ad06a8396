import { existsSync } from 'node:fs';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, posix } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chartsFromModules } from '../../src/charts/assay-charts.js';
import type { UnitResult } from '../../src/results/types.js';
import { buildSite } from '../../src/site/build-site.js';
import { STANDARD_CAVEATS } from '../../src/site/view-common.js';
import { makeFixture } from '../fixtures/results-fixture.js';
import { buildFixture, cleanup, links, listFiles, readPages } from './helpers.js';

let dir = '';
let pageCount = 0;
let pages = new Map<string, string>();
const decode = (s: string) => s.replace(/&#39;/g, "'").replace(/&quot;/g, '"').replace(/&amp;/g, '&');

beforeAll(async () => {
  ({ dir, pages: pageCount } = await buildFixture());
  pages = await readPages(dir);
});
afterAll(cleanup);

describe('buildSite on the synthetic fixture', () => {
  it('writes every page kind', () => {
    const fx = makeFixture();
    const expected = [
      'index.html', 'residues.html', 'compare.html', 'methods.html', 'provenance.html', 'downloads.html', 'glossary.html', 'assays/atpase.html', 'assays/motility.html',
      ...fx.variants.map((v) => `variants/${v.id}.html`),
      ...fx.variants.map((v) => `downloads/reports/${v.id}.html`),
    ];
    for (const p of expected) expect(pages.has(p), p).toBe(true);
    expect(pageCount).toBe(expected.length);
    expect(existsSync(join(dir, 'assets/site.css'))).toBe(true);
    expect(existsSync(join(dir, 'assets/table.js'))).toBe(true);
  });

  it('uses only relative links that resolve (downloads are written by the caller)', () => {
    for (const [page, html] of pages) {
      for (const href of links(html)) {
        expect(href, `${page}: ${href}`).not.toMatch(/^(\/|[a-z]+:)/i);
        if (href.startsWith('#')) continue;
        const target = posix.normalize(posix.join(posix.dirname(page), href.split('#')[0] ?? ''));
        if (target.startsWith('downloads/')) continue;
        expect(existsSync(join(dir, target)), `${page} → ${href}`).toBe(true);
      }
    }
  });

  it('shows the synthetic banner on every page and the caveats on every variant report', () => {
    for (const [page, html] of pages) {
      expect(html, page).toContain('Synthetic demonstration data');
      if (!page.startsWith('variants/') && !page.startsWith('downloads/reports/')) continue;
      for (const c of STANDARD_CAVEATS) expect(decode(html), page).toContain(c);
      expect(html, page).toContain('Study caveat from the manifest');
    }
  });

  it('leaves the banner out when the study is not synthetic', async () => {
    const fx = makeFixture();
    fx.study.synthetic = false;
    const built = await buildFixture(fx, 'real');
    const html = await readFile(join(built.dir, 'index.html'), 'utf8');
    expect(html).not.toContain('Synthetic demonstration data');
  });

  it('escapes user text everywhere, including JSON inside <script>', () => {
    for (const [page, html] of pages) {
      expect(html, page).not.toContain('<script>alert');
      expect(html, page).not.toMatch(/<\/script>alert|alert\("x"\)<\/script>/);
    }
    expect(pages.get('index.html')).toContain('&lt;script&gt;alert');
    expect(pages.get('variants/synm1-d870n.html')).toContain('Lab note &lt;script&gt;');
    expect(pages.get('index.html')).toContain('\\u003cscript>alert');
    expect(pages.get('provenance.html')).toContain('&lt;script&gt;');
  });

  it('renders charts as accessible SVG with title, description and a data table', () => {
    const withCharts = ['variants/synm1-g120s.html', 'assays/atpase.html', 'residues.html', 'compare.html'];
    for (const page of withCharts) {
      const html = pages.get(page) as string;
      const figures = html.split('<figure class="chart"').slice(1);
      expect(figures.length, page).toBeGreaterThan(0);
      for (const f of figures) {
        expect(f).toMatch(/<svg[^>]*role="img"[^>]*aria-labelledby="[^"]+"/);
        expect(f).toMatch(/<title id="[^"]+">[^<]+<\/title><desc id="[^"]+">[^<]+<\/desc>/);
        expect(f).toContain('<details class="chart-data">');
        expect(f).toMatch(/<th scope="col">/);
      }
    }
    // Two Levey–Jennings charts in the fixture, one per assay page.
    expect(pages.get('assays/atpase.html')).toContain('WT control chart: Actin-activated ATPase: kcat');
  });

  it('keeps element ids unique within each page', () => {
    for (const [page, html] of pages) {
      const ids = [...html.matchAll(/\sid="([^"]+)"/g)].map((m) => m[1]);
      expect(new Set(ids).size, page).toBe(ids.length);
    }
  });

  it('has no external references and no CDN', () => {
    for (const [page, html] of pages) for (const l of links(html)) expect(l, page).not.toMatch(/^https?:|^\/\//);
  });

  it('links previous and next variants and lists provenance lines', () => {
    const html = pages.get('variants/synm1-g120s.html') as string;
    expect(html).toContain('rel="prev" href="../variants/synm1-wt.html"');
    expect(html).toContain('rel="next" href="../variants/synm1-l260p.html"');
    expect(html).toContain('data/atpase.csv');
    // The fixture's G120S has 3 ATPase units of 2 single-line sources each (6 rows), and 3 motility units of one.
    expect(html).toMatch(/<code>data\/atpase\.csv<\/code><\/td><td class="num">6<\/td><td class="lines">22, 27–28, 33–34, 39<\/td>/);
    expect(html).toMatch(/<code>data\/motility\.csv<\/code><\/td><td class="num">3<\/td>/);
  });

  it('places assay charts from a chartsFor callback (built from assay modules) with their numbers', async () => {
    const fx = makeFixture();
    const module = {
      id: 'atpase',
      label: 'Actin-activated ATPase',
      chart: ({ variantUnits, wtUnits }: { variantUnits: UnitResult[]; wtUnits: UnitResult[] }) => ({
        data: { values: [...variantUnits, ...wtUnits].flatMap((u) => u.plot.points.map((p) => ({ who: u.variant, ...p }))) },
        mark: 'point',
        encoding: { x: { field: 'actinUM', type: 'quantitative' }, y: { field: 'rate', type: 'quantitative' }, shape: { field: 'who', type: 'nominal' } },
      }),
    };
    const withCharts = await mkdtemp(join(tmpdir(), 'myofolio-assay-charts-'));
    await buildSite(fx, withCharts, { chartsFor: chartsFromModules(fx, [module]), sourceDateEpoch: 0 });
    const html = await readFile(join(withCharts, 'variants/synm1-g120s.html'), 'utf8');
    expect(html).toContain('Actin-activated ATPase: G120S beside paired WT');
    // 3 variant units + 3 WT units of the same batches, 6 points each (fixture).
    const table = html.slice(html.indexOf('<figure class="chart"')).split('</figure>')[0] ?? '';
    expect(table).toContain('<svg');
    expect(table.match(/<tr>/g)?.length).toBe(1 + 36);
    expect(table).toContain('<th scope="col">actinUM</th>');
    const wt = await readFile(join(withCharts, 'variants/synm1-wt.html'), 'utf8');
    expect(wt).not.toContain('beside paired WT');
    await rm(withCharts, { recursive: true, force: true });
  });

  it('is byte-identical across two builds', async () => {
    const second = await buildFixture(makeFixture(), 'again');
    const a = await listFiles(dir);
    const b = await listFiles(second.dir);
    expect(b).toEqual(a);
    for (const f of a) expect(await readFile(join(second.dir, f), 'utf8'), f).toBe(await readFile(join(dir, f), 'utf8'));
  });
});
