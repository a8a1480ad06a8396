/**
 * Pooled and cached chart rendering gives the same site, byte for byte, as rendering in this
 * thread without a cache; a rebuild after one variant's data changes re-renders only charts
 * whose spec changed. Data: a small invented study from the benchmark generator (synthetic).
 */
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyseStudy } from '../../src/analysis/analyse-study.js';
import { ASSAYS } from '../../src/assays/registry.js';
import { changeOneVariant, syntheticStudy } from '../../src/bench/synthetic.js';
import { type AssayChart, chartsFromModules } from '../../src/charts/assay-charts.js';
import { cacheEntryKey } from '../../src/charts/cache.js';
import { variantNames } from '../../src/charts/chart-def.js';
import { forestChart, forestInputKey } from '../../src/charts/forest.js';
import { createChartRenderer } from '../../src/charts/pool.js';
import { canonical, canonicalSlow, chartKey } from '../../src/charts/render.js';
import type { StudyResults } from '../../src/results/types.js';
import { buildSite } from '../../src/site/build-site.js';
import { Q_SLOT_STEM } from '../../src/site/view-variant.js';
import { loadStudy } from '../../src/study/load.js';
import { listFiles } from '../site/helpers.js';

const tmp: string[] = [];
async function fresh(tag: string): Promise<string> {
  const d = await mkdtemp(join(tmpdir(), `myofolio-scale-${tag}-`));
  tmp.push(d);
  return d;
}
afterAll(async () => {
  await Promise.all(tmp.map((d) => rm(d, { recursive: true, force: true })));
});

function analyse(study: { manifest: Record<string, unknown>; files: Record<string, string> }): StudyResults {
  const loaded = loadStudy({ manifest: JSON.stringify(study.manifest), files: study.files });
  expect(loaded.issues.filter((i) => i.severity === 'error')).toEqual([]);
  return analyseStudy(loaded.study!, { toolVersion: 'test', builtAt: '2025-01-01T00:00:00Z' });
}

async function snapshot(dir: string): Promise<Map<string, string>> {
  const files = await listFiles(dir);
  return new Map(await Promise.all(files.map(async (f) => [f, await readFile(join(dir, f), 'utf8')] as [string, string])));
}

const small = { variants: 5, filaments: 30, turnoverPoints: 60 };
let base: StudyResults;
let changed: StudyResults;
let serial: Map<string, string>;
let changedHgvs: string;
let made: ReturnType<typeof syntheticStudy>;

beforeAll(async () => {
  const study = syntheticStudy(small);
  made = study;
  base = analyse(study);
  const label = (study.manifest.variants as Array<{ hgvs?: string }>)[2].hgvs as string;
  changedHgvs = label;
  // Simulator labels are the short form of the HGVS (p.X12Y → X12Y).
  changed = analyse({ manifest: study.manifest, files: changeOneVariant(study.files, label.replace(/^p\./, '')) });
  const out = await fresh('serial');
  await buildSite(base, out, { chartsFor: chartsFromModules(base, ASSAYS), sourceDateEpoch: 1_700_000_000, workers: 0, chartCache: false });
  serial = await snapshot(out);
}, 240_000);

describe('chart pool and cache', () => {
  it('canonical JSON matches the reference form, also with index-like keys', () => {
    const specs = [{}, { b: 1, a: [1, { d: null, c: 'x' }], z: { y: undefined } }, { '10': 1, '9': 2, b: { '1': [3] } }, [1, undefined, 'a']];
    for (const s of specs) expect(canonical(s)).toBe(canonicalSlow(s));
    // From the doc comment of chartKey (value computed by this implementation, kept stable).
    expect(chartKey({})).toBe('44136fa355b3678a');
  });

  it('pooled, cold-cache and warm-cache builds are byte-identical to the in-thread build', async () => {
    const cacheDir = await fresh('cache');
    const renderer = createChartRenderer({ workers: 2, cacheDir });
    try {
      const cold = await fresh('cold');
      await buildSite(base, cold, { chartsFor: chartsFromModules(base, ASSAYS), sourceDateEpoch: 1_700_000_000, renderer });
      const first = renderer.stats();
      expect(first.rendered).toBeGreaterThan(10);
      expect(await snapshot(cold)).toEqual(serial);

      const warm = await fresh('warm');
      await buildSite(base, warm, { chartsFor: chartsFromModules(base, ASSAYS), sourceDateEpoch: 1_700_000_000, renderer });
      const second = renderer.stats();
      expect(second.rendered).toBe(first.rendered); // nothing new drawn
      // Study-page charts come from the SVG cache; variant pages come whole from the page cache.
      expect(second.cached).toBeGreaterThan(first.cached);
      expect(await snapshot(warm)).toEqual(serial);

      // One variant's velocities change: only charts whose spec changed are drawn again.
      const again = await fresh('again');
      await buildSite(changed, again, { chartsFor: chartsFromModules(changed, ASSAYS), sourceDateEpoch: 1_700_000_000, renderer });
      const third = renderer.stats();
      const redrawn = third.rendered - second.rendered;
      expect(redrawn).toBeGreaterThan(0);
      expect(redrawn).toBeLessThan(first.rendered / 2);
      const ref = await fresh('ref');
      await buildSite(changed, ref, { chartsFor: chartsFromModules(changed, ASSAYS), sourceDateEpoch: 1_700_000_000, workers: 0, chartCache: false });
      expect(await snapshot(again)).toEqual(await snapshot(ref));
    } finally {
      await renderer.close();
    }
  }, 240_000);

  it('buildSite defaults (workers auto, cache folder given) give the same bytes', async () => {
    const out = await fresh('defaults');
    await buildSite(base, out, { chartsFor: chartsFromModules(base, ASSAYS), sourceDateEpoch: 1_700_000_000, chartCache: await fresh('cache2') });
    expect(await snapshot(out)).toEqual(serial);
  }, 240_000);

  it('variant pages come whole from the page cache when nothing they are made from changed', async () => {
    const cacheDir = await fresh('pages');
    const build = async (r: StudyResults, tag: string, sourceDateEpoch = 1_700_000_000) => {
      const out = await fresh(tag);
      await buildSite(r, out, { chartsFor: chartsFromModules(r, ASSAYS), sourceDateEpoch, workers: 0, chartCache: cacheDir });
      return snapshot(out);
    };
    const cold = await build(base, 'pages-cold');
    expect(cold).toEqual(serial);
    const kept = (await listFiles(cacheDir)).filter((f) => f.endsWith('.html'));
    expect(kept.length).toBe(base.variants.length);
    // Mark every kept page: a build that serves them shows the mark, one that renders them does not.
    for (const f of kept) await writeFile(join(cacheDir, f), `${await readFile(join(cacheDir, f), 'utf8')}<!-- kept -->`);
    const warm = await build(base, 'pages-warm');
    const variantPages = [...warm.keys()].filter((f) => f.startsWith('variants/'));
    expect(variantPages.length).toBe(base.variants.length);
    for (const f of variantPages) expect(warm.get(f)).toBe(`${serial.get(f)}<!-- kept -->`);
    for (const f of [...warm.keys()].filter((k) => !k.startsWith('variants/'))) expect(warm.get(f)).toBe(serial.get(f));
    // Built at another time: kept pages still show this build's time.
    const later = await build(base, 'pages-later', 1_800_000_000);
    const laterRef = await fresh('pages-later-ref');
    await buildSite(base, laterRef, { chartsFor: chartsFromModules(base, ASSAYS), sourceDateEpoch: 1_800_000_000, workers: 0, chartCache: false });
    const laterExpected = await snapshot(laterRef);
    for (const f of variantPages) {
      expect(later.get(f)).toBe(`${laterExpected.get(f)}<!-- kept -->`);
      expect(later.get(f)).toContain('2027-01-15');
    }
    for (const f of [...later.keys()].filter((k) => !k.startsWith('variants/'))) expect(later.get(f)).toBe(laterExpected.get(f));
    // One variant's data changed: its page is made again (unmarked) and equals an uncached build's.
    const again = await build(changed, 'pages-changed');
    const ref = await fresh('pages-ref');
    await buildSite(changed, ref, { chartsFor: chartsFromModules(changed, ASSAYS), sourceDateEpoch: 1_700_000_000, workers: 0, chartCache: false });
    const expected = await snapshot(ref);
    const short = changedHgvs.replace(/^p\./, '');
    const page = [...again.keys()].find((f) => f.startsWith('variants/') && (again.get(f) as string).includes(`(${short})`)) as string;
    expect(page).toBeDefined();
    expect(again.get(page)).toBe(expected.get(page));

    // A variant that is not a calibration control changes (that one was a benign control, so
    // every page's evidence sentence changed): every other variant page comes whole from the
    // page cache (marked), with this build's q values filled into its slots. Each equals an
    // uncached build's page but for the mark, also where the change moved a q value
    // (Benjamini–Hochberg runs over all variants).
    const label = (made.manifest.variants as Array<{ hgvs?: string; control?: unknown }>).find((v, i) => i > 0 && v.control === undefined)?.hgvs as string;
    const changedQ = analyse({ manifest: made.manifest, files: changeOneVariant(made.files, label.replace(/^p\./, '')) });
    const qBuild = await build(changedQ, 'pages-q');
    const qRef = await fresh('pages-q-ref');
    await buildSite(changedQ, qRef, { chartsFor: chartsFromModules(changedQ, ASSAYS), sourceDateEpoch: 1_700_000_000, workers: 0, chartCache: false });
    const qExpected = await snapshot(qRef);
    const qPage = variantPages.find((f) => (qBuild.get(f) as string).includes(`(${label.replace(/^p\./, '')})`)) as string;
    expect(qBuild.get(qPage)).toBe(qExpected.get(qPage));
    let movedQ = 0;
    for (const f of variantPages) {
      if (f === qPage) continue;
      expect(qBuild.get(f)).toBe(`${qExpected.get(f)}<!-- kept -->`);
      if (qExpected.get(f) !== serial.get(f)) movedQ++;
    }
    expect(movedQ).toBeGreaterThan(0);
    expect([...qBuild.values()].some((html) => html.includes(Q_SLOT_STEM) || html.includes('myofolio-built-at'))).toBe(false);
    for (const f of [...qBuild.keys()].filter((k) => !k.startsWith('variants/'))) expect(qBuild.get(f)).toBe(qExpected.get(f));
  }, 240_000);

  it('a change to one variant changes the per-variant charts of that variant only', () => {
    // Per-variant charts must not depend on other variants' data (q values, shared scales, …),
    // or a warm rebuild redraws every report. Study-level charts may change.
    const keys = (r: StudyResults) => {
      const out = new Map<string, string>();
      const names = variantNames(r);
      const charts = chartsFromModules(r, ASSAYS);
      for (const v of r.variants) {
        const f = forestChart(r, v, names.get(v.id) ?? v.short);
        if (f) out.set(`forest ${v.id}`, cacheEntryKey(f.spec, { key: f.key, title: f.title, description: f.description }));
        // The forest plot's input key (block cache) too: it must not follow other variants' q values.
        const fi = forestInputKey(r, v, names.get(v.id) ?? v.short);
        if (fi) out.set(`forest ${v.id} input`, fi);
        (charts(v.id) as AssayChart[]).forEach((c, i) => {
          out.set(`${c.assay} ${v.id} ${i}`, cacheEntryKey(c.spec, { title: c.title }));
          // The input key (block cache) changes with the chart's inputs, and only with them.
          out.set(`${c.assay} ${v.id} ${i} input`, c.inputKey as string);
        });
      }
      return out;
    };
    const before = keys(base);
    const after = keys(changed);
    const changedId = changed.variants.find((v) => v.label === changedHgvs.replace(/^p\./, '') || v.short === changedHgvs.replace(/^p\./, ''))!.id;
    const differing = [...before.keys()].filter((k) => before.get(k) !== after.get(k));
    expect(differing.length).toBeGreaterThan(0);
    expect(differing.filter((k) => !k.includes(` ${changedId}`))).toEqual([]);
    expect(differing.filter((k) => k.endsWith(' input')).length).toBeGreaterThan(0);
    for (const k of differing.filter((d) => d.startsWith('motility') && !d.endsWith(' input'))) expect(differing).toContain(`${k} input`);
  });

  it('a failing render rejects instead of hanging', async () => {
    const renderer = createChartRenderer({ workers: 1, cacheDir: false });
    try {
      await expect(renderer.render({ mark: 'not-a-mark', data: { values: [] } })).rejects.toThrow();
    } finally {
      await renderer.close();
    }
  });
});
