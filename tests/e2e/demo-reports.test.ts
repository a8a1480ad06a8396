/**
 * The demo's reports against its own results and input files (the demo is invented data):
 * the single-file reports quote the SHA-256 of the results.json written beside them, each
 * calibration's list of controls adds up to its counts, every flag code in the results has plain
 * words, the rows a report cites are the rows of its variant in the CSV files, WT is the
 * reference, and no page writes a hyphen-minus for a negative number.
 */
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildStudy } from '../../src/pipeline/build-study.js';
import { flagWords } from '../../src/analysis/flag-words.js';
import type { StudyResults } from '../../src/results/types.js';
import { uniqueSlugs } from '../../src/site/paths.js';
import { controlRows } from '../../src/site/view-study.js';
import { sourceRows } from '../../src/site/view-variant.js';

const work = mkdtempSync(path.join(os.tmpdir(), 'myofolio-demo-reports-'));
const out = path.join(work, 'site');
let results: StudyResults;
let json = '';

beforeAll(async () => {
  const built = await buildStudy('data-demo', out, { sourceDateEpoch: 1_767_225_600 });
  expect(built.ok).toBe(true);
  json = readFileSync(path.join(out, 'downloads/results.json'), 'utf8');
  results = JSON.parse(json) as StudyResults;
}, 240_000);
afterAll(() => rmSync(work, { recursive: true, force: true }));

describe('demo reports', () => {
  it("single-file reports quote the SHA-256 of the results.json beside them, one report per variant", () => {
    const sha = createHash('sha256').update(readFileSync(path.join(out, 'downloads/results.json'))).digest('hex');
    const reports = readdirSync(path.join(out, 'downloads/reports'));
    expect(reports.length).toBe(results.variants.length);
    for (const r of reports) expect(readFileSync(path.join(out, 'downloads/reports', r), 'utf8'), r).toContain(`<code class="hash">${sha}</code>`);
  });

  it('lists every known control under each calibration, and the list adds up to its counts', () => {
    const slugs = uniqueSlugs(results.variants.map((v) => v.id));
    for (const cal of results.calibration) {
      const rows = controlRows(results, cal.scope, slugs);
      const count = (cls: RegExp, readout: string) => rows.filter((r) => cls.test(r.knownClass) && r.readout === readout).length;
      expect(count(/pathogenic/, 'abnormal'), cal.scope).toBe(cal.counts.pathogenicAbnormal);
      expect(count(/pathogenic/, 'normal'), cal.scope).toBe(cal.counts.pathogenicNormal);
      expect(count(/benign/, 'abnormal'), cal.scope).toBe(cal.counts.benignAbnormal);
      expect(count(/benign/, 'normal'), cal.scope).toBe(cal.counts.benignNormal);
      expect(rows.filter((r) => !r.counted).length, cal.scope).toBe(cal.counts.notCounted);
      for (const r of rows.filter((x) => !x.counted)) expect(r.why, `${cal.scope} ${r.name}`).toMatch(/^not counted: /);
    }
    // The benign control H35W reads indeterminate overall: listed, not counted, with the reason (issue 21).
    const h35w = controlRows(results, 'overall', slugs).find((r) => r.name === 'H35W')!;
    expect(h35w).toMatchObject({ knownClass: 'benign', counted: false });
    expect(h35w.why).toContain('indeterminate');
    expect(readFileSync(path.join(out, 'variants/zzmyo1-n147l.html'), 'utf8')).toContain('not counted: indeterminate');
  });

  it('has plain words for every flag code in the results', () => {
    const codes = new Set([...results.units, ...results.comparisons, ...results.variants].flatMap((x) => x.flags.map((f) => f.code)));
    expect(codes.size).toBeGreaterThan(2);
    expect([...codes].filter((c) => !flagWords(c))).toEqual([]);
  });

  it("cites exactly its variant's rows of each data file, as counts and line ranges", () => {
    const n147l = results.units.filter((u) => u.variant === 'zzmyo1-n147l');
    const rows = sourceRows(n147l);
    // Independent count: the CSV lines whose variant column names N147L (after comment lines and the header).
    for (const r of rows) {
      const lines = readFileSync(path.join('data-demo', r.file), 'utf8').split(/\r?\n/);
      const headerAt = lines.findIndex((l) => !l.startsWith('#'));
      const col = lines[headerAt]!.split(',').indexOf('variant');
      const mine = lines.map((l, i) => ({ l, n: i + 1 })).filter(({ l, n }) => n > headerAt + 1 && l.split(',')[col] === 'N147L');
      expect(r.rows, r.file).toBe(mine.length);
      expect(r.lines, r.file).toBe(`${mine[0]!.n}–${mine[mine.length - 1]!.n}`);
    }
    expect(rows.map((r) => r.file)).toEqual(['atpase-rates.csv', 'force-pca.csv', 'motility-tracks.csv', 'turnover.csv']);
    const html = readFileSync(path.join(out, 'variants/zzmyo1-n147l.html'), 'utf8');
    expect(html).toContain(`<code>atpase-rates.csv</code></td><td class="num">${rows[0]!.rows}</td><td class="lines">${rows[0]!.lines}</td>`);
  });

  it('gives WT the reference call in results.json and on its page', () => {
    const wt = results.variants.find((v) => v.isWT)!;
    expect(wt.overall.call).toBe('reference');
    const html = readFileSync(path.join(out, 'variants/zzmyo1-wt.html'), 'utf8');
    expect(html.slice(0, html.indexOf('<div class="legend"'))).not.toContain('not measured');
  });

  it('writes negative numbers with the minus sign on every page (outside charts, their tables and code)', () => {
    const pages = readdirSync(out, { recursive: true }).map(String).filter((f) => f.endsWith('.html'));
    for (const p of pages) {
      const html = readFileSync(path.join(out, p), 'utf8')
        .replace(/<svg[\s\S]*?<\/svg>/g, '')
        // Chart tables are the charts' own (src/charts, src/assays chart functions).
        .replace(/<details class="chart-data">[\s\S]*?<\/details>/g, '')
        .replace(/<(code|pre|style|script)[\s\S]*?<\/\1>/g, '')
        .replace(/<[^>]+>/g, ' ');
      const bad = html.match(/(?<![\w.-])-\d/g) ?? [];
      expect(bad, p).toEqual([]);
    }
  });
});
