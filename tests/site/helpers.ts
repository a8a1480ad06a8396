/** Shared helpers for site tests: build the fixture into a fresh temp folder and read its pages. */
import { mkdtemp, readdir, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { buildSite } from '../../src/site/build-site.js';
import type { StudyResults } from '../../src/results/types.js';
import { makeFixture } from '../fixtures/results-fixture.js';

const made: string[] = [];

/** Remove every folder buildFixture made in this test file (call from afterAll). */
export async function cleanup(): Promise<void> {
  await Promise.all(made.splice(0).map((d) => rm(d, { recursive: true, force: true })));
}

export async function buildFixture(results: StudyResults = makeFixture(), tag = 'site'): Promise<{ dir: string; pages: number }> {
  const dir = await mkdtemp(join(tmpdir(), `myofolio-${tag}-`));
  made.push(dir);
  const { pages } = await buildSite(results, dir, { sourceDateEpoch: 1_700_000_000 });
  return { dir, pages };
}

/** Every file under dir, as forward-slash paths relative to dir, sorted. */
export async function listFiles(dir: string): Promise<string[]> {
  const entries = await readdir(dir, { recursive: true, withFileTypes: true });
  return entries
    .filter((e) => e.isFile())
    .map((e) => relative(dir, join(e.parentPath, e.name)).split('\\').join('/'))
    .sort();
}

export async function readPages(dir: string): Promise<Map<string, string>> {
  const files = (await listFiles(dir)).filter((f) => f.endsWith('.html'));
  return new Map(await Promise.all(files.map(async (f) => [f, await readFile(join(dir, f), 'utf8')] as [string, string])));
}

/** href/src attribute values of HTML (outside inline SVG namespaces). */
export function links(html: string): string[] {
  return [...html.matchAll(/\s(?:href|src)="([^"]*)"/g)].map(([, value = '']) => value);
}
