/**
 * Write the archive's own pages (home, genes, variant histories, changes) into an output folder,
 * page by page only where needed: each page's data (with its chart specs) has a key, the SHA-256 of
 * that data and of the code fingerprint; a page whose key equals the key recorded by the previous
 * build is linked from the previous output (a hard link, else a copy), and only the others are drawn
 * and rendered. So a rebuild after one study changed renders the pages that show that study.
 *
 *   page data ──key──▶ same as before? ──yes──▶ link the previous file (and its chart files)
 *                                       └─no──▶ charts drawn (the build's render, through the store)
 *                                               ──▶ one Eleventy run over templates/archive/ for these pages
 *                                               ──▶ each chart also as charts/<history>-<metric>.svg
 *
 * A history page's chart files are named in its data (HistoryMetric.chartFile), so a page and its
 * charts are reused together, or drawn together when any of them is missing from the previous output.
 */
import { createHash } from 'node:crypto';
import { copyFileSync, existsSync, linkSync, mkdirSync } from 'node:fs';
import { cp, writeFile } from 'node:fs/promises';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import Eleventy from '@11ty/eleventy';
import { renderSvg } from '../charts/render.js';
import { standaloneSvg } from '../site/chart-files.js';
import { type ChartBlock, type RenderFn, renderBlocks } from '../site/view-common.js';
import type { ArchivePages, ChangesPage, GenePage, HistoryPage, HomePage } from './views.js';

const templatesDir = fileURLToPath(new URL('../../templates/', import.meta.url));
const archiveTemplates = join(templatesDir, 'archive');
const configPath = fileURLToPath(new URL('../../.eleventy.js', import.meta.url));

export interface ArchivePagesOutcome {
  /** Page keys by path, for the next build. */
  keys: Record<string, string>;
  written: number;
  reused: number;
}

/** Link (or, across file systems, copy) one file; false when the source is missing. */
export function linkOrCopy(from: string, to: string): boolean {
  if (!existsSync(from)) return false;
  mkdirSync(dirname(to), { recursive: true });
  try {
    linkSync(from, to);
  } catch {
    copyFileSync(from, to);
  }
  return true;
}

type Page = HomePage | GenePage | HistoryPage | ChangesPage;

function pageKey(fingerprint: string, frame: unknown, page: Page): string {
  return createHash('sha256').update(JSON.stringify([fingerprint, frame, page])).digest('hex');
}

/** The chart files a page shows (site-relative paths): a history page's, none for the others. */
export function chartFilesOf(p: Page): string[] {
  return p.kind === 'history' ? p.metrics.flatMap((m) => (m.chartFile ? [m.chartFile] : [])) : [];
}

/** A history page with its charts drawn, each block naming its own SVG file (for the page's download link). */
async function drawHistory(p: HistoryPage, render: RenderFn) {
  const blocks = await renderBlocks(p.metrics.map((m) => m.chart), render);
  let i = 0;
  return {
    ...p,
    metrics: p.metrics.map((m) => {
      const block: ChartBlock | null = m.chart ? (blocks[i++] ?? null) : null;
      return { ...m, chart: block ? { ...block, table: m.table, ...(m.chartFile ? { file: m.chartFile } : {}) } : null };
    }),
  };
}

/**
 * Write the pages of `pages` into `outDir`, reusing the files of `previous` (the previous output
 * folder and its page keys) where a page's key is unchanged.
 */
export async function writeArchivePages(
  pages: ArchivePages,
  outDir: string,
  options: { fingerprint: string; render?: RenderFn; previous?: { dir: string; keys: Record<string, string> } },
): Promise<ArchivePagesOutcome> {
  const render = options.render ?? renderSvg;
  const keys: Record<string, string> = {};
  let reused = 0;
  const needed = <P extends Page>(list: P[]): P[] =>
    list.filter((p) => {
      const key = pageKey(options.fingerprint, pages.frame, p);
      keys[p.path] = key;
      const prev = options.previous;
      // Reused only with every file it needs (the page and its charts), or drawn anew.
      const files = [p.path, ...chartFilesOf(p)];
      if (prev && prev.keys[p.path] === key && files.every((f) => existsSync(join(prev.dir, f))) && files.every((f) => linkOrCopy(join(prev.dir, f), join(outDir, f)))) {
        reused++;
        return false;
      }
      return true;
    });
  const homes = needed([pages.home]);
  const genes = needed(pages.genes);
  const histories = needed(pages.histories);
  const changes = needed(pages.changes);
  const written = homes.length + genes.length + histories.length + changes.length;
  if (written > 0) {
    const drawn: Array<Awaited<ReturnType<typeof drawHistory>>> = [];
    for (const h of histories) drawn.push(await drawHistory(h, render));
    const elev = new Eleventy(archiveTemplates, outDir, {
      configPath,
      quietMode: true,
      config(cfg) {
        cfg.addGlobalData('archive', { frame: pages.frame, homes, genes, histories: drawn, changes });
      },
    });
    elev.disableLogger();
    await elev.write();
    // Each drawn chart as a file of its own, the SVG the page shows.
    for (const h of drawn) {
      for (const m of h.metrics) {
        if (!m.chart?.file) continue;
        const to = join(outDir, m.chart.file);
        mkdirSync(dirname(to), { recursive: true });
        await writeFile(to, standaloneSvg(m.chart.svg));
      }
    }
  }
  mkdirSync(join(outDir, 'assets'), { recursive: true });
  await cp(join(templatesDir, 'assets', 'site.css'), join(outDir, 'assets', 'site.css'));
  await cp(join(archiveTemplates, 'archive.css'), join(outDir, 'assets', 'archive.css'));
  return { keys, written, reused };
}
