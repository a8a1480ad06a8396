/**
 * The demo archive's pages in a real browser (Chromium via playwright-core, over file://): its home
 * page and a variant's history (the discordant one, the longest page) read at 1,366 px without
 * scrolling sideways, show the synthetic banner in the first screen, and make no request outside
 * the archive's folder (no network, no file elsewhere), with no console error or failed request.
 * The archive is built from data-demo-archive/ (invented data) into a temporary folder.
 * Skips when /usr/bin/chromium is missing, except in CI where it fails.
 */
import { existsSync } from 'node:fs';
import { cp, mkdir, mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { type Browser, chromium } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { main } from '../../src/cli/main.js';

const CHROMIUM = '/usr/bin/chromium';
const available = existsSync(CHROMIUM);
const inCI = process.env.CI === 'true';
const ARGS = ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'];
const SCREENSHOTS = join(process.cwd(), 'test-output', 'screenshots');
const VIEWPORT = { width: 1366, height: 768 };

it.runIf(!available && inCI)('Chromium is installed in CI', () => {
  expect.fail(`${CHROMIUM} not found; browser tests cannot run (install Debian's chromium package).`);
});

describe.skipIf(!available)(`demo archive in Chromium${available ? '' : ' (skipped: /usr/bin/chromium not found)'}`, () => {
  let browser: Browser;
  let work = '';
  let site = '';
  const savedCache = process.env.XDG_CACHE_HOME;

  beforeAll(async () => {
    work = await mkdtemp(join(tmpdir(), 'myofolio-archive-browser-'));
    process.env.XDG_CACHE_HOME = join(work, 'cache');
    await cp(join(import.meta.dirname, '../../data-demo-archive'), join(work, 'archive'), { recursive: true });
    let err = '';
    const code = await main(['build', 'archive', '--out', 'site'], { stdout: { write: () => undefined }, stderr: { write: (s: string) => (err += s) }, cwd: work });
    if (code !== 0) throw new Error(`demo archive build failed: ${err}`);
    site = join(work, 'site');
    browser = await chromium.launch({ executablePath: CHROMIUM, args: ARGS });
    await mkdir(SCREENSHOTS, { recursive: true });
  }, 300_000);

  afterAll(async () => {
    await browser?.close();
    if (savedCache === undefined) delete process.env.XDG_CACHE_HOME;
    else process.env.XDG_CACHE_HOME = savedCache;
    if (work) await rm(work, { recursive: true, force: true });
  });

  it.each([
    ['index.html', 'archive-index'],
    ['variants/zzmyo1-p-leu236asn.html', 'archive-history'],
  ])('%s: no sideways scrolling at 1,366 px, the synthetic banner in view, no request outside the archive', async (path, shot) => {
    const inside = `${pathToFileURL(site).href}/`;
    const page = await browser.newPage({ viewport: VIEWPORT });
    const requests: string[] = [];
    const problems: string[] = [];
    page.on('request', (r) => requests.push(r.url()));
    page.on('console', (m) => m.type() === 'error' && problems.push(`console: ${m.text()}`));
    page.on('pageerror', (e) => problems.push(`pageerror: ${e.message}`));
    page.on('requestfailed', (r) => problems.push(`failed: ${r.url()}`));
    await page.goto(pathToFileURL(join(site, path)).href, { waitUntil: 'load' });

    const { scroll, client } = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, client: document.documentElement.clientWidth }));
    expect(scroll, 'page width').toBeLessThanOrEqual(client);
    const banner = page.locator('.synthetic-banner');
    expect(await banner.isVisible()).toBe(true);
    expect(await banner.innerText()).toContain('Synthetic demonstration data.');
    const box = await banner.boundingBox();
    expect(box!.y + box!.height).toBeLessThanOrEqual(VIEWPORT.height);
    // The page itself, its style sheets and nothing else: every request inside the archive's folder.
    expect(requests.length).toBeGreaterThanOrEqual(3);
    expect(requests.filter((u) => !u.startsWith(inside))).toEqual([]);
    expect(problems).toEqual([]);
    if (path.startsWith('variants/')) expect(await page.locator('figure.chart svg[role="img"]').count()).toBeGreaterThan(3);
    await page.screenshot({ path: join(SCREENSHOTS, `${shot}-1366.png`) });
    await page.close();
  });
});
