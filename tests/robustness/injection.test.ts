/**
 * Injection: a study with markup/script payloads in every free-text field and formula batch
 * names builds; no page or chart carries a payload un-escaped; results.csv neutralises every
 * formula cell; in Chromium no payload runs (no dialog, no window.__pwned).
 * Payload list: common practice (OWASP XSS filter evasion and CSV injection guidance), no source.
 */
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { pathToFileURL } from 'node:url';
import Papa from 'papaparse';
import { chromium } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { neutraliseFormula, resultsCsv } from '../../src/results/csv.js';
import { makeFixture } from '../fixtures/results-fixture.js';
import { FIELDS, FORMULA_BATCHES, makeHostile } from '../fixtures/hostile/hostile-study.js';
import { cleanup, copyDemo, runCli, tempRoot } from './helpers.js';

const root = tempRoot('inject');
const study = join(root, 'study');
const site = join(root, 'site');
let built = { code: -1, out: '', err: '' };

beforeAll(async () => {
  copyDemo(study);
  makeHostile(study);
  built = await runCli(['build', study, '--out', site], root);
}, 120_000);
afterAll(() => cleanup(root));

function files(dir: string, ext: RegExp): string[] {
  const out: string[] = [];
  const walk = (d: string) => {
    for (const n of readdirSync(d)) {
      const f = join(d, n);
      if (statSync(f).isDirectory()) walk(f);
      else if (ext.test(n)) out.push(f);
    }
  };
  walk(dir);
  return out.sort();
}

/** Every payload as it would appear if not escaped: each starts with a raw '<' (escaped text has '&lt;'). */
const RAW = Object.keys(FIELDS).flatMap((k) => {
  const n = Number(k);
  return [`<img src=x onerror=alert(${n})`, `<script>alert(${n})`, `<svg onload=alert(${n})`, `<iframe src=javascript:alert(${n})`];
});

describe('the hostile study', () => {
  it('builds (payloads are text, not errors)', () => {
    expect(built.code, built.out + built.err).toBe(0);
    expect(Object.keys(FIELDS).length).toBeGreaterThanOrEqual(17);
  });

  it('no page or SVG chart carries a payload un-escaped; the text itself is shown escaped', () => {
    const pages = files(site, /\.(html|svg)$/);
    expect(pages.some((f) => f.endsWith('.svg')) || pages.some((f) => readFileSync(f, 'utf8').includes('<svg'))).toBe(true);
    const leaks: string[] = [];
    for (const f of pages) {
      const text = readFileSync(f, 'utf8');
      for (const raw of RAW) if (text.includes(raw)) leaks.push(`${relative(site, f)}: ${raw}`);
      // javascript: may appear only as escaped text, never as a link target.
      for (const m of text.matchAll(/\b(?:href|src|xlink:href|action)\s*=\s*["']\s*javascript:/gi)) leaks.push(`${relative(site, f)}: ${m[0]}`);
      // A user string must never close a <script> element early: every </script> closes one we opened.
      const opens = (text.match(/<script\b/gi) ?? []).length;
      const closes = (text.match(/<\/script>/gi) ?? []).length;
      if (opens !== closes) leaks.push(`${relative(site, f)}: ${opens} <script> vs ${closes} </script>`);
    }
    expect(leaks, `un-escaped payloads (fields: ${JSON.stringify(FIELDS)})`).toEqual([]);
    const all = pages.map((f) => readFileSync(f, 'utf8')).join('\n');
    expect(all).toContain('&lt;img src=x onerror=alert(');
  });

  it('results.csv has every formula cell neutralised and the batch names kept as text', () => {
    const csv = readFileSync(join(site, 'downloads', 'results.csv'), 'utf8');
    const rows = Papa.parse<string[]>(csv.trimEnd(), { header: false }).data;
    expect(rows.length).toBeGreaterThan(1);
    for (const row of rows) {
      for (const cell of row) {
        const isNumber = cell !== '' && Number.isFinite(Number(cell)) && /^[-+]?[\d.]/.test(cell);
        if (!isNumber) expect(cell, `cell ${JSON.stringify(cell)}`).not.toMatch(/^[=+\-@\t\r]/);
      }
    }
    const batches = rows[0]?.indexOf('batches') ?? -1;
    const seen = new Set(rows.slice(1).flatMap((r) => (r[batches] ?? '').split(' ')));
    expect(seen.has("'=1+2") || [...seen].some((s) => s.includes('=1+2'))).toBe(true);
  });
});

describe('neutraliseFormula and resultsCsv', () => {
  it.each([...FORMULA_BATCHES, '=HYPERLINK("http://x","y")', '@cmd', '-1+1'])('%j gets a leading apostrophe', (text) => {
    expect(neutraliseFormula(text)).toBe(`'${text}`);
  });

  it.each(['B1', 'WT', ' =1', 'a=1', '1-2', ''])('%j is left alone', (text) => {
    expect(neutraliseFormula(text)).toBe(text);
  });

  it('every text cell of a results table with formula text in every field is neutralised', () => {
    const r = makeFixture();
    const evil = ['=1+2', '+1', '-cmd', '@SUM(1)', '\tx', '\rx'];
    r.variants.forEach((v, i) => {
      v.gene = evil[i % evil.length] as string; // evil is not empty
      v.hgvs = evil[(i + 1) % evil.length] as string; // evil is not empty
      v.short = evil[(i + 2) % evil.length] as string; // evil is not empty
    });
    r.comparisons.forEach((c, i) => (c.batches = [evil[i % evil.length] as string, 'B2']));
    const csv = resultsCsv(r);
    const rows = Papa.parse<string[]>(csv.trimEnd(), { header: false, newline: '\r\n' }).data;
    let checked = 0;
    for (const row of rows.slice(1)) {
      for (const cell of row) {
        if (cell !== '' && /^[-+]?(\d|\.\d)/.test(cell) && Number.isFinite(Number(cell))) continue;
        expect(cell, JSON.stringify(cell)).not.toMatch(/^[=+\-@\t\r]/);
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(rows.length * 3);
    expect(csv).toContain("'=1+2");
  });
});

const CHROMIUM = '/usr/bin/chromium';
const available = existsSync(CHROMIUM);
const inCI = process.env.CI === 'true';
const ARGS = ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'];

it.runIf(!available && inCI)('Chromium is installed in CI', () => {
  expect.fail(`${CHROMIUM} not found; the injection browser test cannot run.`);
});

describe.skipIf(!available)(`hostile pages in Chromium${available ? '' : ' (skipped: /usr/bin/chromium not found)'}`, () => {
  it('no payload runs on any page (no dialog, no navigation to javascript:, no window.__pwned)', async () => {
    expect(built.code).toBe(0);
    const profile = await mkdtemp(join(tmpdir(), 'myofolio-chromium-inject-'));
    const ctx = await chromium.launchPersistentContext(profile, { executablePath: CHROMIUM, args: ARGS });
    try {
      // Every page outside variants/, and the variant pages that carry per-variant payloads
      // (notes, control sources); the other variant pages share their template.
      const perVariant = Object.entries(FIELDS).filter(([, f]) => /note|control/.test(f)).map(([n]) => `alert(${n})`);
      const pages = files(site, /\.html$/).filter((f) => !f.includes('variants') || perVariant.some((a) => readFileSync(f, 'utf8').includes(a)));
      expect(pages.filter((f) => f.includes('variants')).length).toBeGreaterThanOrEqual(3);
      const fired: string[] = [];
      for (const f of pages) {
        const page = await ctx.newPage();
        page.on('dialog', async (d) => {
          fired.push(`${relative(site, f)}: ${d.type()} ${d.message()} (field ${FIELDS[Number(d.message())] ?? '?'})`);
          await d.dismiss();
        });
        await page.goto(pathToFileURL(f).href, { waitUntil: 'load' });
        // Give onerror/onload handlers of broken images a moment to fire.
        await page.waitForTimeout(50);
        const pwned = await page.evaluate(() => (window as unknown as { __pwned?: unknown }).__pwned);
        if (pwned !== undefined) fired.push(`${relative(site, f)}: window.__pwned = ${String(pwned)}`);
        const injected = await page.evaluate(() => document.querySelectorAll('img[onerror], svg[onload], iframe, a[href^="javascript:" i]').length);
        if (injected) fired.push(`${relative(site, f)}: ${injected} injected element(s)`);
        await page.close();
      }
      expect(fired).toEqual([]);
    } finally {
      await ctx.close();
      await rm(profile, { recursive: true, force: true });
    }
  }, 120_000);
});


