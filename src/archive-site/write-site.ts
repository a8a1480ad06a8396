/**
 * Write the archive's own pages (home, genes, variant histories, changes) into an output folder,
 * page by page only where needed: each page's data (with its chart specs) has a key, the SHA-256 of
 * that data and of the code fingerprint; a page whose key equals the key recorded by the previous
 * build is linked from the previous output (a hard link, else a copy), and only the others are drawn
 * and rendered. So a rebuild after one study changed renders the pages that show that study.
 *
 *   page data ──key──▶ same as before? ──yes──▶ link the previous file
 *                                       └─no──▶ charts drawn (the build's render, through the store)
 *                                               ──▶ one Eleventy run over templates/archive/ for these pages
 */
import { createHash } from 'node:crypto';
import { copyFileSync, existsSync, linkSync, mkdirSync } from 'node:fs';
import { cp } from 'node:fs/promises';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import Eleventy from '@11ty/eleventy';
import { renderSvg } from '../charts/render.js';
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

/** A history page with its charts drawn. */
async function drawHistory(p: HistoryPage, render: RenderFn) {
  const blocks = await renderBlocks(p.metrics.map((m) => m.chart), render);
  let i = 0;
  return {
    ...p,
    metrics: p.metrics.map((m) => {
      const block: ChartBlock | null = m.chart ? blocks[i++] ?? null : null;
      return { ...m, chart: block ? { ...block, table: m.table } : null };
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
      if (prev && prev.keys[p.path] === key && linkOrCopy(join(prev.dir, p.path), join(outDir, p.path))) {
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
  }
  mkdirSync(join(outDir, 'assets'), { recursive: true });
  await cp(join(templatesDir, 'assets', 'site.css'), join(outDir, 'assets', 'site.css'));
  await cp(join(archiveTemplates, 'archive.css'), join(outDir, 'assets', 'archive.css'));
  return { keys, written, reused };
}
