/**
 * Every chart of the site as a standalone SVG file, for slides and documents:
 *
 *   page data ──find every chart block ({ id, title, svg, table })──▶ charts/<id>.svg
 *             ──block.file = 'charts/<id>.svg' (the page links it)──▶ list of { file, title, page }
 *
 * Chart blocks are found by their shape wherever they sit in a page's data, so the writer does
 * not depend on how pages arrange their charts. File names come from block ids (unique on the
 * site; a repeat gets -2, -3, …). The SVG is the one drawn on the page, with an XML declaration.
 */
import { mkdir, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { PATHS } from './paths.js';

/** One chart file of the site. */
export interface ChartFile {
  /** Site-relative path, e.g. 'charts/forest-zzmyo1-n147l.svg'. */
  file: string;
  title: string;
  /** Site-relative path of the page that shows the chart. */
  page: string;
}

/** What a chart block must have to be written (src/site/view-common.ts ChartBlock). */
interface BlockLike {
  id: string;
  title: string;
  svg: string;
  file?: string;
}

function isBlock(x: unknown): x is BlockLike {
  if (!x || typeof x !== 'object') return false;
  const o = x as Record<string, unknown>;
  return typeof o.id === 'string' && typeof o.title === 'string' && typeof o.svg === 'string' && o.svg.startsWith('<svg') && 'table' in o;
}

/** Every chart block inside a value (objects and arrays, depth first, in order). */
export function findBlocks(value: unknown, out: BlockLike[] = []): BlockLike[] {
  if (Array.isArray(value)) for (const x of value) findBlocks(x, out);
  else if (isBlock(value)) out.push(value);
  else if (value && typeof value === 'object') for (const x of Object.values(value)) findBlocks(x, out);
  return out;
}

/**
 * A chart as a file of its own: an XML declaration before the SVG the page shows (which already
 * names its namespace, title, description, font and white background).
 * @example standaloneSvg('<svg xmlns="http://www.w3.org/2000/svg"/>') // → '<?xml version="1.0" encoding="UTF-8"?>\n<svg xmlns="http://www.w3.org/2000/svg"/>\n'
 */
export function standaloneSvg(svg: string): string {
  return `<?xml version="1.0" encoding="UTF-8"?>\n${svg}\n`;
}

/** A chart file named for the site, with the text it holds. */
export interface NamedChartFile extends ChartFile {
  content: string;
}

/**
 * Names the chart files of one build: `name(pagePath, data)` finds every chart block in `data`,
 * gives it a unique file under charts/ (`block.file` set), and returns the files with their
 * text; `list()` gives every file named so far, in order. The build writes them as it goes
 * (chartFileWriter); Eleventy's own command line renders them from the site data (charts.njk).
 */
export function chartFileNamer() {
  const used = new Set<string>();
  const files: ChartFile[] = [];
  return {
    name(page: string, data: unknown): NamedChartFile[] {
      return findBlocks(data).map((b) => {
        const base = b.id.replace(/^chart-/, '') || 'chart';
        let name = base;
        for (let i = 2; used.has(name); i++) name = `${base}-${i}`;
        used.add(name);
        const file = PATHS.chartSvg(name);
        b.file = file;
        files.push({ file, title: b.title, page });
        return { file, title: b.title, page, content: standaloneSvg(b.svg) };
      });
    },
    list(): ChartFile[] {
      return files.slice();
    },
  };
}

/**
 * A writer of chart files into a site folder, for one build: `write(pagePath, data)` names every
 * chart block in `data` (chartFileNamer) and writes its file; `list()` gives every file written
 * so far, in order.
 */
export function chartFileWriter(outDir: string) {
  const namer = chartFileNamer();
  let made = false;
  return {
    async write(page: string, data: unknown): Promise<void> {
      const named = namer.name(page, data);
      if (named.length === 0) return;
      if (!made) {
        await mkdir(join(outDir, PATHS.chartsDir), { recursive: true });
        made = true;
      }
      for (const f of named) await writeFile(join(outDir, f.file), f.content);
    },
    list: namer.list,
  };
}
