/** Every chart of the site is also a standalone SVG file in charts/, the same drawing as on its page. */
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { chartFileWriter, findBlocks, standaloneSvg } from '../../src/site/chart-files.js';
import { buildFixture, cleanup, listFiles, readPages } from './helpers.js';

afterAll(cleanup);

describe('chart files', () => {
  it('finds chart blocks wherever they sit in page data, and names repeats apart', async () => {
    const block = (id: string) => ({ id, title: `T ${id}`, description: '', svg: '<svg xmlns="http://www.w3.org/2000/svg"></svg>', table: { columns: [], rows: [] } });
    const page = { forest: block('chart-forest-a'), assays: [{ charts: [block('chart-x'), block('chart-x')] }], other: { svg: 'not a chart', id: 'y', title: 'z' } };
    expect(findBlocks(page).map((b) => b.id)).toEqual(['chart-forest-a', 'chart-x', 'chart-x']);
    const dir = await mkdtemp(join(tmpdir(), 'myofolio-chart-files-'));
    try {
      const w = chartFileWriter(dir);
      await w.write('variants/a.html', page);
      expect(w.list()).toEqual([
        { file: 'charts/forest-a.svg', title: 'T chart-forest-a', page: 'variants/a.html' },
        { file: 'charts/x.svg', title: 'T chart-x', page: 'variants/a.html' },
        { file: 'charts/x-2.svg', title: 'T chart-x', page: 'variants/a.html' },
      ]);
      expect(page.forest).toHaveProperty('file', 'charts/forest-a.svg');
      expect(await readFile(join(dir, 'charts/x-2.svg'), 'utf8')).toBe(standaloneSvg(block('x').svg));
    } finally {
      await rm(dir, { recursive: true, force: true });
    }
  });

  it('writes one file per chart on the site, each the SVG its page shows', async () => {
    const { dir } = await buildFixture(undefined, 'chart-files');
    const files = (await listFiles(dir)).filter((f) => f.startsWith('charts/'));
    const pages = await readPages(dir);
    let figures = 0;
    for (const [path, html] of pages) {
      // Single-file reports (downloads/reports/) carry their variant page's charts inline; they have no files of their own.
      if (path.startsWith('downloads/')) continue;
      for (const [, id = '', svg = ''] of html.matchAll(/<figure class="chart" id="([^"]+)">\s*<div class="chart-svg">(<svg[\s\S]*?<\/svg>)<\/div>/g)) {
        figures++;
        const file = `charts/${id.replace(/^chart-/, '')}.svg`;
        expect(files, `${path} ${id}`).toContain(file);
        const text = await readFile(join(dir, file), 'utf8');
        expect(text.startsWith('<?xml version="1.0" encoding="UTF-8"?>\n<svg')).toBe(true);
        expect(svg).not.toBe('');
        expect(text.trim().endsWith(svg)).toBe(true);
      }
    }
    expect(figures).toBeGreaterThan(10);
    expect(files).toHaveLength(figures);
  }, 60_000);
});
