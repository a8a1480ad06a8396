/**
 * The reports in a real browser (Chromium via playwright-core, over file://), for issue 21:
 * (1) a single-file report copied alone into an empty folder opens with no request but its own
 *     and its caveat visible;
 * (2) a report of a non-synthetic study prints to A4 (and Letter) with the research-use line on
 *     page 1 and a footer carrying page numbers and the tool version, read from the PDF's text
 *     (pdftotext, Debian's poppler-utils);
 * (3) every column of the demo's index is visible at 1,366 px without scrolling sideways, and the
 *     first column is sticky for narrower windows;
 * (4) on no page of the demo site does ▼ or the hypo colour mark a hypercontractile reading.
 * Screenshots (index, a variant's first screen, page 1 of its PDF) go to test-output/screenshots.
 * Skips when /usr/bin/chromium is missing, except in CI where it fails.
 */
import { execFileSync } from 'node:child_process';
import { copyFile, mkdir, mkdtemp, readdir, rm, writeFile } from 'node:fs/promises';
import { existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { type Browser, type Page, chromium } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildStudy } from '../../src/pipeline/build-study.js';
import { buildSite } from '../../src/site/build-site.js';
import { RESEARCH_LINE } from '../../src/site/view-common.js';
import { makeFixture } from '../fixtures/results-fixture.js';

const CHROMIUM = '/usr/bin/chromium';
const PDFTOTEXT = '/usr/bin/pdftotext';
const available = existsSync(CHROMIUM);
const inCI = process.env.CI === 'true';
const ARGS = ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'];
const SCREENSHOTS = join(process.cwd(), 'test-output', 'screenshots');
/** The hypo colour of the palette (src/charts/palette.ts, --hypo in templates/assets/site.css). */
const HYPO = { hex: '#2456a6', rgb: 'rgb(36, 86, 166)' };

/**
 * Run in the page: every place where ▼ or the hypo colour marks something that is not a hypo
 * reading (HTML marks carry data-direction; charts must name the hypo colour hypocontractile).
 */
const findOffences = ({ hypoRgb, hypoHex }: { hypoRgb: string; hypoHex: string }): string[] => {
  const out: string[] = [];
  const own = (el: Element) => [...el.childNodes].filter((n) => n.nodeType === 3).map((n) => n.textContent ?? '').join('').trim();
  // HTML: ▼ and the hypo colour only inside a mark whose direction is hypo, never beside 'hypercontractile'.
  for (const el of document.querySelectorAll('body *')) {
    if (el.closest('svg')) continue;
    const text = own(el);
    if (!text) continue;
    const mark = el.closest('[data-direction]');
    const hypoColour = getComputedStyle(el).color === hypoRgb;
    if ((text.includes('▼') || hypoColour) && mark?.getAttribute('data-direction') !== 'hypo') out.push(`${text.includes('▼') ? '▼' : 'hypo colour'} outside a hypo mark: "${text.slice(0, 60)}"`);
    if (mark?.getAttribute('data-direction') === 'hypo' && /hypercontractile/.test(mark.textContent ?? '')) out.push(`hypo mark reads "${mark.textContent}"`);
  }
  // Charts: the hypo colour only where a legend or lane names it hypocontractile; never on a label saying hypercontractile.
  for (const svg of document.querySelectorAll('svg')) {
    const painted = [...svg.querySelectorAll('*')].filter((e) => [e.getAttribute('fill'), e.getAttribute('stroke')].some((c) => c?.toLowerCase() === hypoHex));
    const texts = [...svg.querySelectorAll('text')];
    if (painted.length && !texts.some((t) => /hypocontractile/.test(t.textContent ?? ''))) out.push(`chart "${svg.querySelector('title')?.textContent}" uses the hypo colour without naming it hypocontractile`);
    for (const t of texts) if (/hypercontractile/.test(t.textContent ?? '') && t.getAttribute('fill')?.toLowerCase() === hypoHex) out.push(`chart label "${t.textContent}" in the hypo colour`);
    if (texts.some((t) => (t.textContent ?? '').includes('▼'))) out.push(`chart "${svg.querySelector('title')?.textContent}" writes ▼`);
  }
  return [...new Set(out)];
};

it.runIf(!available && inCI)('Chromium is installed in CI', () => {
  expect.fail(`${CHROMIUM} not found; browser tests cannot run (install Debian's chromium package).`);
});

describe.skipIf(!available)(`reports in Chromium${available ? '' : ' (skipped: /usr/bin/chromium not found)'}`, () => {
  let browser: Browser;
  let work = '';
  let demo = '';
  let real = '';

  beforeAll(async () => {
    work = await mkdtemp(join(tmpdir(), 'myofolio-reports-browser-'));
    demo = join(work, 'demo');
    const built = await buildStudy('data-demo', demo, { sourceDateEpoch: 1_767_225_600 });
    if (!built.ok) throw new Error(`demo build failed: ${JSON.stringify(built.issues.slice(0, 3))}`);
    // A study that is not synthetic (no banner): the fixture's invented panel, flagged as real, in a temporary folder only.
    const fx = makeFixture();
    fx.study.synthetic = false;
    fx.study.title = 'SYNM1 variant panel';
    real = join(work, 'real');
    await buildSite(fx, real, { sourceDateEpoch: 1_700_000_000 });
    browser = await chromium.launch({ executablePath: CHROMIUM, args: ARGS });
    await mkdir(SCREENSHOTS, { recursive: true });
  }, 300_000);

  afterAll(async () => {
    await browser?.close();
    if (work) await rm(work, { recursive: true, force: true });
  });

  async function open(url: string, viewport = { width: 1366, height: 768 }): Promise<{ page: Page; requests: string[]; problems: string[] }> {
    const page = await browser.newPage({ viewport });
    const requests: string[] = [];
    const problems: string[] = [];
    page.on('request', (r) => requests.push(r.url()));
    page.on('console', (m) => m.type() === 'error' && problems.push(`console: ${m.text()}`));
    page.on('pageerror', (e) => problems.push(`pageerror: ${e.message}`));
    page.on('requestfailed', (r) => problems.push(`failed: ${r.url()}`));
    await page.goto(url, { waitUntil: 'load' });
    return { page, requests, problems };
  }

  it('(1) opens a single-file report alone in an empty folder with no request but its own, its caveats visible', async () => {
    const alone = join(work, 'alone');
    await mkdir(alone);
    const file = join(alone, 'report.html');
    await copyFile(join(demo, 'downloads', 'reports', 'zzmyo1-n147l.html'), file);
    expect(await readdir(alone)).toEqual(['report.html']);
    const url = pathToFileURL(file).href;
    const { page, requests, problems } = await open(url);
    expect(requests).toEqual([url]);
    expect(problems).toEqual([]);
    await expect.poll(() => page.locator('.glance-caveat').isVisible()).toBe(true);
    expect(await page.locator('.glance-caveat').innerText()).toContain(RESEARCH_LINE);
    expect(await page.locator('.caveats').isVisible()).toBe(true);
    expect(await page.locator('figure.chart svg').count()).toBeGreaterThan(0);
    // Styled by its own inline CSS: the summary has its border and background.
    expect(await page.locator('.glance').evaluate((el) => getComputedStyle(el).borderLeftWidth)).toBe('6px');
    await page.close();
  });

  it.runIf(!existsSync(PDFTOTEXT) && inCI)('pdftotext is installed in CI', () => {
    expect.fail(`${PDFTOTEXT} not found; install Debian's poppler-utils.`);
  });

  it.skipIf(!existsSync(PDFTOTEXT)).each([['A4'], ['Letter']])('(2) prints a non-synthetic report on %s: research-use line on page 1, page numbers and tool version in every footer', async (format) => {
    const { page } = await open(pathToFileURL(join(real, 'variants', 'synm1-g120s.html')).href);
    const pdf = join(work, `g120s-${format}.pdf`);
    await page.pdf({ path: pdf, format, printBackground: true });
    await page.close();
    const pages = execFileSync(PDFTOTEXT, [pdf, '-'], { encoding: 'utf8' }).split('\f').filter((p) => p.trim() !== '');
    expect(pages.length).toBeGreaterThanOrEqual(2);
    const flat = (s: string) => s.replace(/\s+/g, ' ');
    expect(flat(pages[0]!)).not.toContain('Synthetic demonstration data');
    expect(flat(pages[0]!)).toContain(RESEARCH_LINE);
    expect(flat(pages[0]!)).toContain('Overall call');
    pages.forEach((text, i) => {
      expect(flat(text), `page ${i + 1}`).toContain(`Page ${i + 1} of ${pages.length}`);
      expect(flat(text), `page ${i + 1}`).toContain('myofolio 0.1.0-test · built 2023-11-14T22:13:20Z');
      expect(flat(text), `page ${i + 1}`).toContain('SYNM1 variant panel · G120S (SYNM1 p.Gly120Ser)');
    });
    // The caveats in full at the end.
    expect(flat(pages[pages.length - 1]!)).toContain('Classifying a variant is the work of a qualified clinical laboratory');
    if (format === 'A4') execFileSync('pdftoppm', ['-r', '70', '-png', '-f', '1', '-l', '1', '-singlefile', pdf, join(SCREENSHOTS, 'report-pdf-page1')]);
  });

  it.skipIf(!existsSync(PDFTOTEXT)).each([['A4'], ['Letter']])('prints the tall forest plot whole and at full size on %s (no page shrunk to fit a wide table)', async (format) => {
    const url = pathToFileURL(join(demo, 'variants', 'zzmyo1-n147l.html')).href;
    const { page } = await open(url);
    const title = 'Normalised metrics of N147L against paired WT';
    const axis = 'Ratio to paired WT (log scale)';
    const last = 'Slow-phase fraction: difference from paired WT';
    // On screen the chart is drawn at its own size: the distance from its title to its ratio axis title, in px.
    const onScreen = await page.evaluate(
      ([t, a]) => {
        const texts = [...document.querySelectorAll('#chart-forest-zzmyo1-n147l svg text')];
        const x = (s: string) => texts.find((e) => e.textContent === s)!.getBoundingClientRect().left;
        return x(a!) - x(t!);
      },
      [title, axis],
    );
    expect(onScreen).toBeGreaterThan(200);
    const pdf = join(work, `n147l-${format}.pdf`);
    await page.pdf({ path: pdf, format, printBackground: true });
    await page.close();
    // Lines of the PDF with their page and left edge (pdftotext -bbox-layout: pages, lines, words in pt).
    const xml = execFileSync(PDFTOTEXT, ['-bbox-layout', pdf, '-'], { encoding: 'utf8' });
    const lines: Array<{ page: number; text: string; x: number }> = [];
    xml.split('<page ').slice(1).forEach((p, i) => {
      for (const l of p.split('<line ').slice(1)) {
        const words = [...l.matchAll(/<word xMin="([\d.]+)"[^>]*>([^<]*)<\/word>/g)];
        if (words.length) lines.push({ page: i + 1, text: words.map((w) => w[2]).join(' '), x: Number(words[0]![1]) });
      }
    });
    const find = (s: string) => lines.filter((l) => l.text === s);
    expect(find(title), 'forest title').toHaveLength(1);
    expect(find(axis), 'ratio axis').toHaveLength(1);
    expect(find(last), 'last difference axis').toHaveLength(1);
    // Whole: its title, first axis and last axis on one page.
    expect(find(axis)[0]!.page).toBe(find(title)[0]!.page);
    expect(find(last)[0]!.page).toBe(find(title)[0]!.page);
    // Full size: the same distance on paper (pt → CSS px at 96 px per inch), within 2%.
    const onPaper = ((find(axis)[0]!.x - find(title)[0]!.x) * 96) / 72;
    expect(onPaper / onScreen).toBeGreaterThan(0.98);
    expect(onPaper / onScreen).toBeLessThan(1.02);
  });

  it('lays out no printed page wider than its paper: A4 portrait for reports and assay pages, landscape for the index', async () => {
    // A4's width between the print margins (210 − 2 × 12 mm, at 96 px per inch); the index prints across (297 − 24 mm).
    const portrait = Math.floor((186 * 96) / 25.4);
    const landscape = Math.floor((273 * 96) / 25.4);
    const wide: string[] = [];
    for (const [path, width] of [['variants/zzmyo1-n147l.html', portrait], ['variants/zzmyo1-e333v.html', portrait], ['downloads/reports/zzmyo1-n147l.html', portrait], ['assays/force.html', portrait], ['methods.html', portrait], ['index.html', landscape]] as const) {
      const { page } = await open(pathToFileURL(join(demo, path)).href, { width, height: 900 });
      await page.emulateMedia({ media: 'print' });
      const scroll = await page.evaluate(() => document.documentElement.scrollWidth);
      if (scroll > width) wide.push(`${path}: ${scroll} px on a ${width} px page`);
      await page.close();
    }
    expect(wide).toEqual([]);
    // The index's pages are printed across the paper.
    const { page } = await open(pathToFileURL(join(demo, 'index.html')).href);
    const boxes = [...(await page.pdf({ format: 'A4' })).toString('latin1').matchAll(/\/MediaBox\s*\[\s*0 0 ([\d.]+) ([\d.]+)\s*\]/g)];
    await page.close();
    expect(boxes.length).toBeGreaterThan(0);
    for (const b of boxes) expect(Number(b[1])).toBeGreaterThan(Number(b[2]));
  });

  it('(3) shows every index column at 1,366 px without sideways scrolling, the first column sticky', async () => {
    const { page, problems } = await open(pathToFileURL(join(demo, 'index.html')).href);
    const wrap = page.locator('.index-wrap');
    const { scroll, client } = await wrap.evaluate((el) => ({ scroll: el.scrollWidth, client: el.clientWidth }));
    expect(scroll).toBeLessThanOrEqual(client);
    const viewport = 1366;
    const headers = page.locator('#variant-table thead th');
    const n = await headers.count();
    expect(n).toBe(5 + 4); // variant, residue, overall, evidence, 4 assays, flags
    for (let i = 0; i < n; i++) {
      const box = await headers.nth(i).boundingBox();
      expect(box, `column ${i}`).not.toBeNull();
      expect(box!.x + box!.width, `column ${i}`).toBeLessThanOrEqual(viewport);
    }
    expect(await page.locator('#variant-table tbody th').first().evaluate((el) => getComputedStyle(el).position)).toBe('sticky');
    expect(problems).toEqual([]);
    await page.screenshot({ path: join(SCREENSHOTS, 'index-1366.png') });
    await page.close();
  });

  it("takes a screenshot of a variant report's first screen, with the summary at a glance in it", async () => {
    const { page } = await open(pathToFileURL(join(demo, 'variants', 'zzmyo1-n147l.html')).href);
    const box = await page.locator('.glance').boundingBox();
    expect(box!.y + box!.height).toBeLessThanOrEqual(768);
    await page.screenshot({ path: join(SCREENSHOTS, 'variant-first-screen.png') });
    await page.close();
  });

  it('(4) nowhere marks a hypercontractile reading with ▼ or the hypo colour', async () => {
    const pages = (await readdir(demo, { recursive: true })).filter((f) => f.endsWith('.html'));
    expect(pages.length).toBeGreaterThan(40);
    const offences: string[] = [];
    for (const path of pages) {
      const { page } = await open(pathToFileURL(join(demo, path)).href);
      const found = await page.evaluate(findOffences, { hypoRgb: HYPO.rgb, hypoHex: HYPO.hex });
      offences.push(...found.map((f) => `${path}: ${f}`));
      await page.close();
    }
    expect(offences).toEqual([]);
  }, 300_000);

  it('the check of (4) finds ▼ or the hypo colour on a hypercontractile reading when there is one', async () => {
    const file = join(work, 'bad.html');
    await writeFile(
      file,
      '<!DOCTYPE html><html lang="en"><head><title>t</title><style>.x{color:#2456a6}</style></head><body>' +
        '<p><span class="x">decreased</span> slow-phase fraction</p><p><span data-direction="hyper">▼ decreased</span></p>' +
        '<p><span data-direction="hypo"><span class="x">▼</span> hypercontractile</span></p>' +
        '<svg><title>c</title><path fill="#2456A6"></path><text fill="#2456a6">towards hypercontractile</text></svg></body></html>',
    );
    const { page } = await open(pathToFileURL(file).href);
    const found = await page.evaluate(findOffences, { hypoRgb: HYPO.rgb, hypoHex: HYPO.hex });
    await page.close();
    expect(found).toEqual([
      'hypo colour outside a hypo mark: "decreased"',
      '▼ outside a hypo mark: "▼ decreased"',
      'hypo mark reads "▼ hypercontractile"',
      'chart "c" uses the hypo colour without naming it hypocontractile',
      'chart label "towards hypercontractile" in the hypo colour',
    ]);
  });
});
