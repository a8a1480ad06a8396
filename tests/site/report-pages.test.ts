/**
 * The variant reports on the synthetic fixture (tests/fixtures/results-fixture.ts, invented data):
 * summary at a glance, absolute values, marks by biological direction, flags in plain words,
 * WT as the reference, caveats once, the calibration's controls, the single-file reports, the
 * running header and footer of the print, and the same site from Eleventy's own command line.
 * Expected values are worked from the fixture by hand; rules are ours (common practice, no source).
 */
import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ASSAYS } from '../../src/assays/registry.js';
import { chartsFromModules } from '../../src/charts/assay-charts.js';
import { FLAG_WORDS } from '../../src/analysis/flag-words.js';
import { jsonSha256 } from '../../src/results/json.js';
import type { StudyResults } from '../../src/results/types.js';
import { buildSite } from '../../src/site/build-site.js';
import { RESEARCH_LINE, STANDARD_CAVEATS, metricCall, repeatsStandardCaveat, studyCaveats } from '../../src/site/view-common.js';
import { firstSentence } from '../../src/site/view-variant.js';
import { makeFixture } from '../fixtures/results-fixture.js';
import { cleanup, links, listFiles, readPages } from './helpers.js';

const decode = (s: string) => s.replace(/&#39;/g, "'").replace(/&quot;/g, '"').replace(/&amp;/g, '&').replace(/&lt;/g, '<').replace(/&gt;/g, '>');
const text = (html: string) => decode(html.replace(/<[^>]+>/g, ' ')).replace(/\s+/g, ' ');

/** The fixture with what these tests look at: absolute values, a metric whose hypercontractile direction is down, repeated caveats. */
function fixture(): StudyResults {
  const fx = makeFixture();
  // Fraction immobile made a metric whose decrease is hypercontractile (as a slow-phase fraction is).
  fx.assays[1]!.metrics[1]!.hyper = 'down';
  fx.study.caveats = ['Research data, not a clinical test.', `Study caveat from the manifest`, 'Cells of passage 20 or less. Research use only.'];
  fx.settings.combiningRule = 'Overall call: the test rule in one sentence (q < 0.05). A second sentence with the error bound.';
  for (const c of fx.comparisons) {
    if (c.variant === 'synm1-g120s' && c.metric === 'kcat') Object.assign(c, { variantMean: 7.512, wtMean: 4.9489 });
    if (c.variant === 'synm1-g120s' && c.metric === 'fractionImmobile') Object.assign(c, { variantMean: 0.0412, wtMean: 0.0934 });
  }
  // G120S's fraction immobile decreased: towards hypercontractile under hyper 'down'.
  const fi = fx.comparisons.find((c) => c.variant === 'synm1-g120s' && c.metric === 'fractionImmobile')!;
  Object.assign(fi, { effect: -0.052, ciLow: -0.081, ciHigh: -0.023, q: 0.01, call: 'decreased' });
  fx.units.find((u) => u.variant === 'synm1-g120s' && u.assay === 'atpase')!.flags.push({ code: 'km-above-range', severity: 'warning', message: 'KM (150 µM) is above the highest actin concentration measured (80 µM).' });
  return fx;
}

let dir = '';
let pages = new Map<string, string>();
const fx = fixture();

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'myofolio-reports-'));
  await buildSite(fx, dir, { sourceDateEpoch: 1_700_000_000 });
  pages = await readPages(dir);
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
  await cleanup();
});

const variantPages = () => [...pages.keys()].filter((p) => p.startsWith('variants/') || p.startsWith('downloads/reports/'));

describe('summary at a glance', () => {
  it('comes first on every report: overall call, a cell per assay, the rule in one sentence, the evidence level and the research-use line', () => {
    for (const page of variantPages()) {
      const html = pages.get(page)!;
      const glance = html.indexOf('<section class="glance"');
      expect(glance, page).toBeGreaterThan(0);
      // Before every other section of the body.
      expect(html.indexOf('<section', html.indexOf('<main')), page).toBe(glance);
      const g = html.slice(glance, html.indexOf('</section>', glance));
      expect(g, page).toContain('Overall call');
      expect((g.match(/class="glance-cell /g) ?? []).length, page).toBe(fx.assays.length);
      expect(decode(g), page).toContain(RESEARCH_LINE);
      expect(g, page).toContain('Functional evidence');
      if (!page.endsWith('synm1-wt.html')) expect(decode(g), page).toContain('Overall call: the test rule in one sentence (q < 0.05).');
      expect(g, page).not.toContain('A second sentence');
    }
  });

  it("gives each assay's key effect with its CI and the absolute values", () => {
    const g = text(pages.get('variants/synm1-g120s.html')!.split('<section class="glance"')[1]!.split('</section>')[0]!);
    expect(g).toContain('kcat 1.52× (95% CI 1.31 to 1.76)');
    expect(g).toContain('G120S 7.51 s⁻¹ · WT 4.95 s⁻¹');
    expect(g).toContain('Mean velocity 1.38× (95% CI 1.22 to 1.56)');
  });

  it('states the evidence level, or why there is none', () => {
    expect(text(pages.get('variants/synm1-g120s.html')!)).toContain('Functional evidence at most PS3 moderate');
    expect(text(pages.get('variants/synm1-r505w.html')!)).toContain('Functional evidence not scored (calibration control)');
    expect(text(pages.get('variants/synm1-wt.html')!)).toContain('Functional evidence not applicable (reference)');
  });

  it('takes the first sentence of a text', () => {
    expect(firstSentence('Overall call: a (q < 0.05 after BH). For a variant, at most 0.05.')).toBe('Overall call: a (q < 0.05 after BH).');
    expect(firstSentence('One sentence only.')).toBe('One sentence only.');
  });
});

describe('absolute values beside every effect', () => {
  it('show the variant and WT means in their unit, the effect, CI, band, q and n', () => {
    const html = pages.get('variants/synm1-g120s.html')!;
    const row = html.split('<tr').find((r) => r.startsWith('><th scope="row">kcat'))!;
    const cells = [...row.matchAll(/<td class="num(?: count)?">([^<]*)<\/td>/g)].map((m) => decode(m[1]!));
    expect(cells).toEqual(['7.51 s⁻¹', '4.95 s⁻¹', '1.52×', '1.31 to 1.76', '0.80 to 1.25', '0.0020', '3 / 3']);
    // A difference metric at its band's precision (band ±0.1: 3 decimals), negative ends with the minus sign.
    const fi = html.split('<tr').find((r) => r.includes('<th scope="row">Fraction immobile'))!;
    expect([...fi.matchAll(/<td class="num">([^<]*)<\/td>/g)].map((m) => decode(m[1]!)).slice(0, 5)).toEqual(['0.041', '0.093', '−0.052', '−0.081 to −0.023', '−0.100 to 0.100']);
  });

  it('write the same numbers the same way in the table under the forest plot', () => {
    const html = pages.get('variants/synm1-g120s.html')!;
    const forest = html.slice(html.indexOf('Normalised metrics of G120S against paired WT</caption>'));
    const row = (metric: string) => [...forest.split('<tr').find((r) => r.includes(metric))!.matchAll(/<td[^>]*>([^<]*)<\/td>/g)].map((m) => decode(m[1]!));
    expect(row('In vitro motility: Fraction immobile').slice(0, 4)).toEqual(['difference from WT', '−0.052', '−0.081 to −0.023', '−0.100 to 0.100']);
    expect(row('Actin-activated ATPase: kcat').slice(0, 4)).toEqual(['ratio to WT', '1.52×', '1.31 to 1.76', '0.80 to 1.25']);
  });
});

describe('marks by biological direction', () => {
  it('marks a metric by the direction its change implies, not by its sign', () => {
    expect(metricCall('decreased', 'down')).toMatchObject({ glyph: '▲', direction: 'hyper', implies: 'towards hypercontractile' });
    expect(metricCall('increased', 'down')).toMatchObject({ glyph: '▼', direction: 'hypo' });
    expect(metricCall('increased', 'up')).toMatchObject({ glyph: '▲', direction: 'hyper' });
    expect(metricCall('decreased', 'none')).toMatchObject({ glyph: '▽', direction: 'neutral', implies: 'no disease direction' });
    expect(metricCall('within WT range', 'down')).toMatchObject({ glyph: '●', direction: 'within' });
  });

  it('never shows ▼ or the hypo class for a hypercontractile reading, nor ▲ or the hyper class for a hypocontractile one', () => {
    for (const [page, html] of pages) {
      for (const m of html.matchAll(/<span class="mark mark-([a-z]+)" data-direction="([a-z]+)"><span class="glyph" aria-hidden="true">([^<]*)<\/span>([^<]*)/g)) {
        const [, cls, direction, glyph, words] = m;
        expect(cls, page).toBe(direction);
        if (glyph === '▼') expect(direction, `${page}: ${words}`).toBe('hypo');
        if (glyph === '▲') expect(direction, `${page}: ${words}`).toBe('hyper');
        if (direction === 'hypo') expect(words, page).not.toMatch(/hypercontractile/);
        if (direction === 'hyper') expect(words, page).not.toMatch(/hypocontractile/);
      }
    }
    // G120S's decreased fraction immobile (hypercontractile direction) is ▲, not ▼.
    const fi = pages.get('variants/synm1-g120s.html')!.split('<tr').find((r) => r.includes('<th scope="row">Fraction immobile'))!;
    expect(fi).toContain('data-direction="hyper"><span class="glyph" aria-hidden="true">▲</span> decreased <span class="implies">(towards hypercontractile)</span>');
  });

  it('shows one legend on the index, the reports and the assay pages', () => {
    for (const page of ['index.html', 'variants/synm1-g120s.html', 'downloads/reports/synm1-g120s.html', 'assays/motility.html']) {
      const html = pages.get(page)!;
      expect((html.match(/class="legend"/g) ?? []).length, page).toBe(1);
      expect(text(html), page).toContain('metric changed towards hypercontractile');
    }
  });
});

describe('WT as the reference', () => {
  it('reads "reference" on the index and its own page, not "not measured"', () => {
    const row = pages.get('index.html')!.split('<tr data-id="synm1-wt"')[1]!.split('</tr>')[0]!;
    expect(row).not.toContain('not measured');
    expect((row.match(/◎<\/span> reference/g) ?? []).length).toBe(1 + fx.assays.length);
    expect(text(row)).toContain('3 preparations in 3 batches');
    const page = pages.get('variants/synm1-wt.html')!;
    // Only the legend names 'not measured'.
    expect(page.slice(0, page.indexOf('<div class="legend"'))).not.toContain('not measured');
    expect(page).toContain('◎</span> reference');
  });
});

describe('flags in plain words', () => {
  it('index and reports show words linked to the glossary, which explains every code', () => {
    const glossary = pages.get('glossary.html')!;
    for (const [code, w] of Object.entries(FLAG_WORDS)) {
      expect(glossary).toContain(`<dt id="flag-${code}">`);
      expect(decode(glossary)).toContain(w.explanation);
    }
    const index = pages.get('index.html')!;
    expect(index).toContain('<a class="flag-chip" href="./glossary.html#flag-km-above-range">KM above the actin range</a>');
    expect(text(index.split('<tbody>')[1]!)).not.toContain('km-above-range');
    const report = pages.get('variants/synm1-g120s.html')!;
    expect(report).toContain('href="../glossary.html#flag-km-above-range">KM above the actin range</a>');
  });
});

describe('preparations, in the study\'s words', () => {
  // The study's column is 'preparation'; results.json keeps the exclusion kind 'unit' (schema), pages never say it.
  const visible = (html: string) => text(html.replace(/<svg[\s\S]*?<\/svg>/g, ' ').replace(/<script[\s\S]*?<\/script>/g, ' ').replace(/<style[\s\S]*?<\/style>/g, ' ').replace(/<code>[^<]*<\/code>/g, ' '));

  it('names an excluded preparation "Preparation", on the variant\'s report and the assay pages', () => {
    expect(fx.exclusions.some((e) => e.kind === 'unit')).toBe(true);
    expect(visible(pages.get('variants/synm1-g120s.html')!)).toContain('Preparation synm1-g120s-prep9 excluded: Preparation aggregated.');
    expect(visible(pages.get('assays/atpase.html')!)).toContain('Preparation synm1-g120s-prep9 of G120S excluded: Preparation aggregated.');
    expect(visible(pages.get('assays/motility.html')!)).toContain('Batch B5 excluded: Flow cell leaked');
  });

  it('never calls a preparation a "unit" on any page (physical units aside)', () => {
    // Allowed: flag codes (machine words, in <code>), and the metric's physical unit ("in the metric's unit", "in their units", the metrics table's "Unit" column).
    const physical = /metric’s unit|in their units|own units|unit of measurement|<th scope="col">Unit<\/th>/g;
    const found = [...pages].flatMap(([page, html]) => (visible(html.replace(physical, ' ')).match(/.{0,40}\bunits?\b.{0,40}/gi) ?? []).map((w) => `${page}: ${w}`));
    expect(found).toEqual([]);
  });
});

describe('caveats', () => {
  it('are listed once: a study caveat that only repeats a standard one is left out', () => {
    expect(repeatsStandardCaveat('Research data, not a clinical test.')).toBe(true);
    expect(repeatsStandardCaveat('Functional evidence is one line of evidence; classification belongs to qualified clinical laboratories.')).toBe(true);
    expect(repeatsStandardCaveat('Not a clinical test: cells of passage 20 or less.')).toBe(false);
    expect(studyCaveats(['Research data, not a clinical test.', 'Cells of passage 20 or less. Research use only.', 'Cells of passage 20 or less.'])).toEqual(['Cells of passage 20 or less.']);
    const html = decode(pages.get('variants/synm1-g120s.html')!);
    const caveats = html.slice(html.indexOf('<section class="caveats"'));
    for (const c of STANDARD_CAVEATS) expect(caveats).toContain(c);
    expect(caveats).toContain('Study caveat from the manifest');
    expect(caveats).toContain('Cells of passage 20 or less.');
    expect(caveats).not.toContain('Research data, not a clinical test.');
  });
});

describe('calibration view', () => {
  it("lists each known control with its class, call, readout and whether and why it was counted", () => {
    const html = text(pages.get('assays/atpase.html')!);
    expect(html).toContain('R505W pathogenic (Invented control for the demo) ▲ hypercontractile abnormal counted: abnormal, as expected of a pathogenic control');
    expect(html).toContain('V630I benign (Invented control for the demo) ● within WT range normal counted: normal, as expected of a benign control');
    const motility = text(pages.get('assays/motility.html')!);
    expect(motility).toContain('R505W pathogenic (Invented control for the demo) ■ indeterminate — not counted: indeterminate');
  });
});

describe('print', () => {
  it('carries a running header (study, variant) and footer (tool version, build date, page X of Y) that user text cannot break', () => {
    const html = pages.get('variants/synm1-g120s.html')!;
    const style = html.slice(html.indexOf('<style>'), html.indexOf('</style>') + 8);
    expect(style).toContain('@top-left { content: "Synthetic SYNM1 panel \\3c script\\3e alert(\\"x\\")\\3c /script\\3e  · G120S (SYNM1 p.Gly120Ser)"');
    expect(style).toContain('@bottom-left { content: "myofolio 0.1.0-test · built 2023-11-14T22:13:20Z · research data, not a clinical test"');
    expect(style).toContain('@bottom-right { content: "Page " counter(page) " of " counter(pages)');
    expect(style.match(/<\//g)?.length).toBe(1); // only the closing </style>
  });
});

describe('single-file reports', () => {
  it('need no other file: styles inline, charts inline SVG, no script, links only within the file', () => {
    for (const v of fx.variants) {
      const html = pages.get(`downloads/reports/${v.id}.html`)!;
      expect(html).toMatch(/<style>\n\/\* myofolio report site/);
      expect(html).not.toMatch(/<link|<script|<img|<iframe|@import|url\(/i);
      for (const l of links(html)) expect(l, v.id).toMatch(/^#/);
      const ids = new Set([...html.matchAll(/\sid="([^"]+)"/g)].map((m) => m[1]));
      for (const l of links(html)) expect(ids.has(l.slice(1)), `${v.id} ${l}`).toBe(true);
      if (!v.isWT) expect(html).toContain('<svg');
    }
  });

  it("carry the study's identity (title, lab, dates, tool version, SHA-256 of results.json) and the caveats", () => {
    const html = decode(pages.get('downloads/reports/synm1-g120s.html')!);
    const sha = jsonSha256(fx as unknown as Record<string, unknown>);
    expect(html).toContain(`results.json, SHA-256 ${sha}`.replace('SHA-256 ', 'SHA-256 <code class="hash">'));
    expect(html).toContain('Invented Motor Lab');
    expect(html).toContain('2024-03-01, 2024-03-15');
    expect(html).toContain('myofolio 0.1.0-test, built 2023-11-14T22:13:20Z');
    for (const c of STANDARD_CAVEATS) expect(html).toContain(c);
    expect(html).toContain(RESEARCH_LINE);
    // Flags are explained inside the file, since the glossary page is not there.
    expect(html).toContain('<dt id="flag-km-above-range">');
  });
});

describe("Eleventy's own command line", () => {
  it('builds the same site from a results.json through the data cascade (templates/_data/site.js)', async () => {
    const work = await mkdtemp(join(tmpdir(), 'myofolio-eleventy-cli-'));
    try {
      const file = join(work, 'results.json');
      const json = JSON.stringify(fx) + '\n';
      await writeFile(file, json);
      const cliOut = join(work, 'cli');
      const eleventy = join(process.cwd(), 'node_modules', '@11ty', 'eleventy', 'cmd.cjs');
      execFileSync(process.execPath, [eleventy, '--config=.eleventy.js', '--input=templates', `--output=${cliOut}`, '--quiet'], {
        cwd: process.cwd(),
        env: { ...process.env, MYOFOLIO_RESULTS: file, SOURCE_DATE_EPOCH: '1700000000' },
        stdio: 'pipe',
      });
      const apiOut = join(work, 'api');
      const sha = createHash('sha256').update(json).digest('hex');
      await buildSite(fx, apiOut, { sourceDateEpoch: 1_700_000_000, resultsSha256: sha, chartsFor: chartsFromModules(fx, ASSAYS) });
      const a = await listFiles(apiOut);
      expect(await listFiles(cliOut)).toEqual(a);
      expect(a).toContain('downloads/reports/synm1-g120s.html');
      for (const f of a) expect(await readFile(join(cliOut, f), 'utf8'), f).toBe(await readFile(join(apiOut, f), 'utf8'));
    } finally {
      await rm(work, { recursive: true, force: true });
    }
  });
});
