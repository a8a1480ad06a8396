/**
 * The analysis cache (per module and batch) gives exactly the units of the uncached analysis, in
 * the same order, cold and warm, and after one batch's rows changed re-analyses that batch of
 * that assay only.
 * Study: the benchmark generator's (synthetic, invented values).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { activeModules } from '../../src/analysis/parallel.js';
import { ASSAYS } from '../../src/assays/registry.js';
import { syntheticStudy } from '../../src/bench/synthetic.js';
import { analyseUnitsCached } from '../../src/build/analysis-cache.js';
import { codeFingerprint } from '../../src/fingerprint.js';
import { loadStudy } from '../../src/study/load.js';
import type { Study, TurnoverRow } from '../../src/study/types.js';

const dir = mkdtempSync(join(tmpdir(), 'myofolio-analysis-cache-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const serial = (study: Study) => activeModules(study, ASSAYS).flatMap((m) => m.analyse(study));

function benchStudy(): Study {
  const s = syntheticStudy({ variants: 10, perBatch: 3, filaments: 30, turnoverPoints: 60, maxRowsPerFile: 2000 });
  return loadStudy({ manifest: JSON.stringify(s.manifest), files: s.files }).study!;
}

describe('analyseUnitsCached', () => {
  const study = benchStudy();
  const expected = serial(study);
  // Cache entries: one per (assay, batch).
  const batches = new Set(expected.map((u) => `${u.assay} ${u.batch}`)).size;

  it('cold: analyses every batch and gives the serial units; warm: serves every batch from the cache, same units', async () => {
    const cold = await analyseUnitsCached(study, ASSAYS, { cacheDir: dir, workers: 0 });
    expect(cold.batches).toEqual({ analysed: batches, cached: 0 });
    expect(cold.units).toEqual(expected);
    const warm = await analyseUnitsCached(study, ASSAYS, { cacheDir: dir, workers: 0 });
    expect(warm.batches).toEqual({ analysed: 0, cached: batches });
    expect(warm.units).toEqual(expected);
  }, 120_000);

  it('after one reading of one batch changed, re-analyses that batch only and matches a fresh analysis', async () => {
    const rows = study.rows.turnover as TurnoverRow[];
    const target = rows.find((r) => r.variant !== study.variants.find((v) => v.isWT)?.id && r.batch === rows[rows.length - 1].batch) as TurnoverRow;
    // As loadStudy gives it after the file was edited: one reading differs, and so does the file's SHA-256.
    const changed: Study = {
      ...study,
      files: study.files.map((f) => (f.path === target.at.file ? { ...f, sha256: 'edited' } : f)),
      rows: { ...study.rows, turnover: rows.map((r) => (r === target ? { ...r, fluorescence: r.fluorescence * 1.5 } : r)) },
    };
    // Other batches have rows in the same file: they are found by their content, not re-fitted.
    expect(new Set(rows.filter((r) => r.at.file === target.at.file).map((r) => r.batch)).size).toBeGreaterThan(1);
    const fresh = serial(changed);
    expect(fresh).not.toEqual(expected);
    const got = await analyseUnitsCached(changed, ASSAYS, { cacheDir: dir, workers: 0 });
    expect(got.batches).toEqual({ analysed: 1, cached: batches - 1 });
    expect(got.units).toEqual(fresh);
  }, 120_000);

  it('a file read differently (its manifest entry changed, its bytes not) is never served by the file key', async () => {
    // As loadStudy gives it after a unit declared in the manifest changed: same file bytes (same
    // SHA-256), rows scaled. The cache must fall back to the rows and re-fit the batches they changed.
    const rows = study.rows.turnover as TurnoverRow[];
    const file = rows[0].at.file;
    const raw = study.manifestRaw as { files: Array<Record<string, unknown>> };
    const reread: Study = {
      ...study,
      manifestRaw: { ...raw, files: raw.files.map((f) => (f.path === file ? { ...f, note: 'units declared differently' } : f)) },
      rows: { ...study.rows, turnover: rows.map((r) => (r.at.file === file ? { ...r, fluorescence: r.fluorescence * 2 + 1 } : r)) },
    };
    const got = await analyseUnitsCached(reread, ASSAYS, { cacheDir: dir, workers: 0 });
    expect(got.batches.analysed).toBeGreaterThan(0);
    expect(got.units).toEqual(serial(reread));
  }, 120_000);

  it('a changed setting misses every batch; no cache folder means no cache', async () => {
    const tuned: Study = { ...study, settings: { ...study.settings, forceMinPoints: 5 } };
    expect((await analyseUnitsCached(tuned, ASSAYS, { cacheDir: dir, workers: 0 })).batches.cached).toBe(0);
    expect((await analyseUnitsCached(study, ASSAYS, { cacheDir: false, workers: 0 })).units).toEqual(expected);
  }, 120_000);

  it('fingerprints the source code (64 hex digits, stable within a process)', () => {
    expect(codeFingerprint()).toMatch(/^[0-9a-f]{64}$/);
    expect(codeFingerprint()).toBe(codeFingerprint());
  });
});
