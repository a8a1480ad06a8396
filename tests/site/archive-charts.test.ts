/**
 * The archive site's charts as files of their own, as the study sites' are (src/site/chart-files.ts):
 * the demo archive (data-demo-archive/, invented data) built through the command line into a
 * temporary folder; every history page links each of its charts to charts/<history>-<metric>.svg,
 * which holds the SVG the page shows; an unchanged rebuild reuses pages and their chart files
 * together, and a page whose chart file is gone from the previous output is drawn again. And a
 * calibration control's latest evidence reads "n/a", as in its table of calls.
 */
import { cpSync, existsSync, mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { main } from '../../src/cli/main.js';

const root = mkdtempSync(join(tmpdir(), 'myofolio-archive-charts-'));
const archive = join(root, 'archive');
const out = join(root, 'site');
const savedCache = process.env.XDG_CACHE_HOME;

async function build(): Promise<{ code: number; out: string; err: string }> {
  let o = '';
  let e = '';
  const code = await main(['build', 'archive', '--out', 'site'], { stdout: { write: (s: string) => (o += s) }, stderr: { write: (s: string) => (e += s) }, cwd: root });
  return { code, out: o, err: e };
}

/** The history pages of the built archive, with each chart's figure SVG and download link. */
function historyCharts(): Array<{ page: string; svg: string; href: string | undefined }> {
  const dir = join(out, 'variants');
  return readdirSync(dir)
    .filter((f) => f.endsWith('.html'))
    .flatMap((f) => {
      const html = readFileSync(join(dir, f), 'utf8');
      return html
        .split('<figure class="chart"')
        .slice(1)
        .map((fig) => ({
          page: `variants/${f}`,
          svg: fig.slice(fig.indexOf('<svg'), fig.indexOf('</svg>') + '</svg>'.length),
          href: /<a href="([^"]+\.svg)" download>Download this chart as SVG<\/a>/.exec(fig)?.[1],
        }));
    });
}

beforeAll(async () => {
  process.env.XDG_CACHE_HOME = join(root, 'cache');
  cpSync(join(import.meta.dirname, '../../data-demo-archive'), archive, { recursive: true });
  const built = await build();
  expect(built.code, built.err).toBe(0);
}, 300_000);

afterAll(() => {
  if (savedCache === undefined) delete process.env.XDG_CACHE_HOME;
  else process.env.XDG_CACHE_HOME = savedCache;
  rmSync(root, { recursive: true, force: true });
});

describe('archive charts as SVG files', () => {
  it('links every chart of every history page to its own SVG file, which holds the SVG the page shows', () => {
    const charts = historyCharts();
    expect(charts.length).toBeGreaterThan(20);
    for (const c of charts) {
      expect(c.href, c.page).toMatch(/^\.\.\/charts\/[a-z0-9-]+\.svg$/);
      const file = resolve(dirname(join(out, c.page)), c.href!);
      expect(existsSync(file), `${c.page} → ${c.href}`).toBe(true);
      const text = readFileSync(file, 'utf8');
      expect(text.startsWith('<?xml version="1.0" encoding="UTF-8"?>\n<svg'), c.href).toBe(true);
      expect(text.trim().endsWith(c.svg), c.href).toBe(true);
    }
    // One file per chart: no two charts share a file, and no file is left without a chart.
    const hrefs = charts.map((c) => resolve(dirname(join(out, c.page)), c.href!));
    expect(new Set(hrefs).size).toBe(charts.length);
    expect(readdirSync(join(out, 'charts')).length).toBe(charts.length);
  });

  it('reuses a page with its chart files when nothing changed, and draws a page again when its chart file is gone', async () => {
    const before = historyCharts();
    const again = await build();
    expect(again.code, again.err).toBe(0);
    expect(again.out).toMatch(/0 written, \d+ unchanged/);
    expect(historyCharts()).toEqual(before);
    for (const c of before) expect(existsSync(resolve(dirname(join(out, c.page)), c.href!)), c.href).toBe(true);

    // One chart file lost from the output: its page (and its charts) are drawn again, not linked to a page with a dead link.
    const lost = resolve(dirname(join(out, before[0]!.page)), before[0]!.href!);
    rmSync(lost);
    const third = await build();
    expect(third.code, third.err).toBe(0);
    expect(third.out).toMatch(/1 written/);
    expect(existsSync(lost)).toBe(true);
    expect(readFileSync(lost, 'utf8').trim().endsWith(before[0]!.svg)).toBe(true);
  });
});

describe('archive pages of a calibration control', () => {
  it('state its latest evidence as not scored (as the table of calls does), never "none"', () => {
    // C122S is a pathogenic control of the demo panel (src/demo/archive-scenario.ts).
    const page = readFileSync(join(out, 'variants', 'zzmyo1-p-cys122ser.html'), 'utf8').replace(/<[^>]+>/g, ' ').replace(/\s+/g, ' ');
    expect(page).toContain('evidence ceiling n/a (calibration control, pathogenic)');
    expect(page).not.toContain('evidence ceiling none');
    const gene = readFileSync(join(out, 'genes', 'zzmyo1.html'), 'utf8');
    const row = gene.split('<tr').find((r) => r.includes('p.Cys122Ser'))!;
    expect(row).toContain('n/a (calibration control, pathogenic)');
  });
});
