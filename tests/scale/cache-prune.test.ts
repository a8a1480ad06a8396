/**
 * Cache pruning (src/build/cache-prune.ts): entries no build used for CACHE_KEEP_DAYS are removed, at
 * most once a day; entries a build reads are marked as used; nothing but the caches' own entry
 * files is ever removed. The keep period is this project's choice (common practice for user
 * caches, no source).
 */
import { existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync, statSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { CACHE_KEEP_DAYS, PRUNE_STAMP, pruneCache } from '../../src/build/cache-prune.js';
import { ChartCache } from '../../src/charts/cache.js';
import { buildStudy } from '../../src/build/build-study.js';
import { CACHE } from '../../src/defaults.js';

const tmp = mkdtempSync(join(tmpdir(), 'myofolio-prune-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

const DAY = 24 * 3600 * 1000;
const hex = (c: string) => c.repeat(64);

/** A file with a modification time `daysAgo` days before now. */
function put(path: string, daysAgo: number): string {
  mkdirSync(join(path, '..'), { recursive: true });
  writeFileSync(path, 'x');
  const t = new Date(Date.now() - daysAgo * DAY);
  utimesSync(path, t, t);
  return path;
}

describe('pruneCache', () => {
  it('removes entries unused for the keep period and stale temporary files, and nothing else', () => {
    const dir = join(tmp, 'a');
    const old = CACHE_KEEP_DAYS + 1;
    const gone = [
      put(join(dir, 'aa', `${hex('a')}.svg`), old),
      put(join(dir, 'aa', `${hex('b')}.offsets.json`), old),
      put(join(dir, 'bb', `s${hex('c')}.bin`), old),
      put(join(dir, 'bb', `d${hex('d')}.bin`), old),
      put(join(dir, 'cc', `${hex('e')}.html.1234.tmp`), 2),
    ];
    const kept = [
      put(join(dir, 'aa', `${hex('f')}.html`), CACHE_KEEP_DAYS - 1),
      put(join(dir, 'cc', `${hex('e')}.json.99.tmp`), 0),
      // Not named as the caches name their entries: never removed, however old.
      put(join(dir, 'aa', 'notes.txt'), 400),
      put(join(dir, 'not-hex', `${hex('a')}.svg`), 400),
      put(join(dir, `${hex('a')}.svg`), 400),
      put(join(dir, 'known-files.json'), 400),
    ];
    expect(pruneCache(dir)).toEqual({ removed: gone.length, kept: 2 });
    for (const f of gone) expect(existsSync(f), f).toBe(false);
    for (const f of kept) expect(existsSync(f), f).toBe(true);
    expect(existsSync(join(dir, PRUNE_STAMP))).toBe(true);
  });

  it('prunes a folder at most once a day', () => {
    const dir = join(tmp, 'b');
    const first = put(join(dir, 'aa', `${hex('1')}.svg`), CACHE_KEEP_DAYS + 5);
    expect(pruneCache(dir, { now: Date.now() - DAY / 2 })).toEqual({ removed: 1, kept: 0 });
    const second = put(join(dir, 'aa', `${hex('2')}.svg`), CACHE_KEEP_DAYS + 5);
    expect(pruneCache(dir)).toBeUndefined();
    expect(existsSync(second)).toBe(true);
    expect(pruneCache(dir, { now: Date.now() + DAY })).toEqual({ removed: 1, kept: 0 });
    expect(existsSync(first) || existsSync(second)).toBe(false);
    expect(pruneCache(join(tmp, 'none'))).toBeUndefined();
  });

  it('an entry read from the chart cache counts as used now', () => {
    const dir = join(tmp, 'c');
    const cache = new ChartCache(dir);
    cache.set(hex('3'), '<svg/>');
    const file = join(dir, '33', `${hex('3')}.svg`);
    const t = new Date(Date.now() - (CACHE_KEEP_DAYS + 3) * DAY);
    utimesSync(file, t, t);
    expect(cache.get(hex('3'))).toBe('<svg/>');
    expect(Date.now() - statSync(file).mtimeMs).toBeLessThan(DAY);
    expect(pruneCache(dir)).toEqual({ removed: 0, kept: 1 });
  });
});

describe('kept pages are marked as used at most once per CACHE.markAgainHours', () => {
  it('a page served whole leaves its entries as they are when marked lately, and marks them all when not', async () => {
    const demo = join(import.meta.dirname, '..', '..', 'data-demo');
    const charts = join(tmp, 'marks', 'charts');
    const options = { chartCache: charts, analysisCache: join(tmp, 'marks', 'analysis'), workers: 0, sourceDateEpoch: 1_700_000_000 } as const;
    expect((await buildStudy(demo, join(tmp, 'marks-1'), options)).ok).toBe(true);
    const pageFiles = () => readdirSync(charts, { recursive: true, encoding: 'utf8' }).filter((n) => /[0-9a-f]{64}\.(html|offsets\.json)$/.test(n));
    expect(pageFiles().length).toBeGreaterThan(0);
    const setAll = (hoursAgo: number) => {
      const t = new Date(Date.now() - hoursAgo * 3600 * 1000);
      for (const n of readdirSync(charts, { recursive: true, encoding: 'utf8' })) if (/[0-9a-f]{64}\./.test(n)) utimesSync(join(charts, n), t, t);
    };
    const newest = () => Math.max(...readdirSync(charts, { recursive: true, encoding: 'utf8' }).filter((n) => /[0-9a-f]{64}\.(html|offsets\.json|json)$/.test(n)).map((n) => statSync(join(charts, n)).mtimeMs));
    // Marked an hour ago: a build that serves every page from the cache writes none of them.
    setAll(1);
    expect((await buildStudy(demo, join(tmp, 'marks-2'), { ...options, force: true })).ok).toBe(true);
    expect(Date.now() - newest()).toBeGreaterThan(0.9 * 3600 * 1000);
    // Marked longer ago than CACHE.markAgainHours: pages, their offsets and chart blocks are marked now.
    setAll(CACHE.markAgainHours + 1);
    expect((await buildStudy(demo, join(tmp, 'marks-3'), { ...options, force: true })).ok).toBe(true);
    for (const n of readdirSync(charts, { recursive: true, encoding: 'utf8' }).filter((f) => /[0-9a-f]{64}\.(html|offsets\.json)$/.test(f))) {
      expect(Date.now() - statSync(join(charts, n)).mtimeMs).toBeLessThan(3600 * 1000);
    }
  }, 120_000);
});

describe('a build prunes its caches', () => {
  it('removes an entry left unused in both caches, and keeps what the build used', async () => {
    const demo = join(import.meta.dirname, '..', '..', 'data-demo');
    const charts = join(tmp, 'build', 'charts');
    const analysis = join(tmp, 'build', 'analysis');
    const options = { chartCache: charts, analysisCache: analysis, workers: 0, sourceDateEpoch: 1_700_000_000 } as const;
    expect((await buildStudy(demo, join(tmp, 'site1'), options)).ok).toBe(true);
    const count = (dir: string) => readdirSync(dir, { recursive: true }).filter((n) => /[0-9a-f]{64}/.test(String(n))).length;
    const before = { charts: count(charts), analysis: count(analysis) };
    // Every entry (and the last pruning) looks a long time ago; two orphans join them.
    const long = new Date(Date.now() - (CACHE_KEEP_DAYS + 10) * DAY);
    for (const dir of [charts, analysis]) {
      for (const n of readdirSync(dir, { recursive: true })) utimesSync(join(dir, String(n)), long, long);
    }
    put(join(charts, 'ff', `${hex('f')}.svg`), CACHE_KEEP_DAYS + 10);
    put(join(analysis, 'ff', `s${hex('f')}.bin`), CACHE_KEEP_DAYS + 10);
    expect((await buildStudy(demo, join(tmp, 'site2'), options)).ok).toBe(true);
    expect(existsSync(join(charts, 'ff', `${hex('f')}.svg`))).toBe(false);
    expect(existsSync(join(analysis, 'ff', `s${hex('f')}.bin`))).toBe(false);
    // What the second build read or made is all still there.
    expect({ charts: count(charts), analysis: count(analysis) }).toEqual(before);
  }, 120_000);
});
