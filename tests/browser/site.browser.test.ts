/**
 * The built site in a real browser (Chromium via playwright-core, over file://): no console errors,
 * no failed or external requests, filter/sort/search work, axe-core finds no serious or critical
 * violations, and a variant report prints to A4 and Letter within the expected page count.
 * Skips (with the reason in its name) when /usr/bin/chromium is missing, except in CI where it fails.
 */
import { existsSync } from 'node:fs';
import { mkdir, mkdtemp, rm } from 'node:fs/promises';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { type BrowserContext, type Page, chromium } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildFixture, cleanup } from '../site/helpers.js';

const CHROMIUM = '/usr/bin/chromium';
const available = existsSync(CHROMIUM);
const inCI = process.env.CI === 'true';
const ARGS = ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'];
const SCREENSHOTS = join(process.cwd(), 'test-output', 'screenshots');
const axePath = createRequire(import.meta.url).resolve('axe-core/axe.min.js');

it.runIf(!available && inCI)('Chromium is installed in CI', () => {
  expect.fail(`${CHROMIUM} not found; browser tests cannot run (install Debian's chromium package).`);
});

describe.skipIf(!available)(`site in Chromium${available ? '' : ' (skipped: /usr/bin/chromium not found)'}`, () => {
  let ctx: BrowserContext;
  let profile = '';
  let site = '';
  const url = (p: string) => pathToFileURL(join(site, p)).href;

  beforeAll(async () => {
    site = (await buildFixture(undefined, 'browser')).dir;
    profile = await mkdtemp(join(tmpdir(), 'myofolio-chromium-'));
    ctx = await chromium.launchPersistentContext(profile, { executablePath: CHROMIUM, args: ARGS, viewport: { width: 1280, height: 900 } });
    await mkdir(SCREENSHOTS, { recursive: true });
  });

  afterAll(async () => {
    await ctx?.close();
    if (profile) await rm(profile, { recursive: true, force: true });
    await cleanup();
  });

  /** Open a page and record console errors, page errors, failed and non-file requests. */
  async function open(path: string): Promise<{ page: Page; problems: string[] }> {
    const page = await ctx.newPage();
    const problems: string[] = [];
    page.on('console', (m) => m.type() === 'error' && problems.push(`console: ${m.text()}`));
    page.on('pageerror', (e) => problems.push(`pageerror: ${e.message}`));
    page.on('requestfailed', (r) => problems.push(`failed: ${r.url()}`));
    page.on('request', (r) => !r.url().startsWith('file://') && !r.url().startsWith('data:') && problems.push(`external: ${r.url()}`));
    await page.goto(url(path), { waitUntil: 'load' });
    return { page, problems };
  }

  async function axeViolations(page: Page): Promise<string[]> {
    await page.addScriptTag({ path: axePath });
    const result = (await page.evaluate(async () => {
      const axe = (window as unknown as { axe: { run: (ctx: Document) => Promise<{ violations: Array<{ id: string; impact: string; nodes: unknown[] }> }> } }).axe;
      return axe.run(document);
    })) as { violations: Array<{ id: string; impact: string; nodes: unknown[] }> };
    return result.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical').map((v) => `${v.id} (${v.impact}, ${v.nodes.length} nodes)`);
  }

  const visibleRows = (page: Page) => page.locator('#variant-table tbody tr:not([hidden])');

  it.each(['index.html', 'variants/synm1-g120s.html', 'assays/atpase.html', 'residues.html', 'compare.html', 'methods.html', 'provenance.html'])(
    '%s loads over file:// without errors or outside requests, with no serious axe violations',
    async (path) => {
      const { page, problems } = await open(path);
      expect(problems).toEqual([]);
      expect(await axeViolations(page)).toEqual([]);
      await page.screenshot({ path: join(SCREENSHOTS, `${path.replace(/[/.]/g, '_')}.png`), fullPage: true });
      await page.close();
    },
  );

  it('shows charts as SVG on a variant report', async () => {
    const { page } = await open('variants/synm1-g120s.html');
    const svgs = page.locator('figure.chart svg[role="img"]');
    expect(await svgs.count()).toBeGreaterThan(0);
    const box = await svgs.first().boundingBox();
    expect(box?.width ?? 0).toBeGreaterThan(200);
    await page.close();
  });

  it('filters, searches and sorts the index', async () => {
    const { page, problems } = await open('index.html');
    await expect.poll(() => page.locator('#variant-filters').isVisible()).toBe(true);
    expect(await visibleRows(page).count()).toBe(7);

    await page.selectOption('#f-call', 'hypercontractile');
    expect(await visibleRows(page).locator('th a').allTextContents()).toEqual(['G120S', 'R505W']);
    await page.click('button[type="reset"]');
    await expect.poll(() => visibleRows(page).count()).toBe(7);

    await page.fill('#f-search', 'leu260');
    expect(await visibleRows(page).locator('th a').allTextContents()).toEqual(['L260P']);
    await page.fill('#f-search', '');

    await page.selectOption('#f-flag', '*');
    expect(await visibleRows(page).locator('th a').allTextContents()).toEqual(['R505W', 'D870N']);
    await page.selectOption('#f-flag', '');
    await page.selectOption('#f-assay', 'motility');
    // WT (the reference, measured in every assay) and the 5 variants measured in motility.
    expect(await visibleRows(page).count()).toBe(6);
    expect(await page.locator('#filter-status').textContent()).toBe('Showing 6 of 7 variants.');
    await page.selectOption('#f-assay', '');

    const residue = page.getByRole('button', { name: /Residue/ });
    await residue.click();
    await residue.click();
    expect(await page.locator('#variant-table thead th', { hasText: 'Residue' }).getAttribute('aria-sort')).toBe('descending');
    expect(await visibleRows(page).first().locator('th a').textContent()).toBe('D870N');
    expect(problems).toEqual([]);
    await page.close();
  });

  it('reaches the controls by keyboard', async () => {
    const { page } = await open('index.html');
    await page.keyboard.press('Tab');
    expect(await page.evaluate(() => document.activeElement?.className)).toBe('skip-link');
    await page.focus('#f-search');
    await page.keyboard.press('Tab');
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('f-gene');
    await page.close();
  });

  it.each([['A4'], ['Letter']])('prints a variant report on %s with its caveats', async (format) => {
    const { page } = await open('variants/synm1-g120s.html');
    const pdf = await page.pdf({ format, printBackground: true });
    const count = (pdf.toString('latin1').match(/\/Type\s*\/Page(?![s\w])/g) ?? []).length;
    // Expected from the layout of this fixture: summary, evidence, two assay tables, forest plot, caveats.
    expect(count).toBeGreaterThanOrEqual(2);
    expect(count).toBeLessThanOrEqual(4);
    await page.emulateMedia({ media: 'print' });
    expect(await page.locator('.caveats').isVisible()).toBe(true);
    expect(await page.locator('.site-nav').isVisible()).toBe(false);
    expect(await page.locator('.prevnext').isVisible()).toBe(false);
    await page.screenshot({ path: join(SCREENSHOTS, `print-${format}.png`), fullPage: true });
    await page.close();
  });
});
