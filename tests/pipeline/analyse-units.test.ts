/**
 * Units through the store (one entry per assay × batch) are exactly the units of the analysis
 * without a store, in the same order, cold and warm, and after rows changed only the batches of
 * the changed file are analysed again. Study: the benchmark generator's (synthetic, invented values).
 */
import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ASSAYS } from '../../src/assays/registry.js';
import { syntheticStudy } from '../../src/bench/synthetic.js';
import { activeModules } from '../../src/assays/assay-common.js';
import { analyseUnits } from '../../src/pipeline/analyse-units.js';
import { Store } from '../../src/pipeline/store.js';
import { loadStudy } from '../../src/study/load.js';
import type { UnitResult } from '../../src/results/types.js';
import type { Study } from '../../src/study/types.js';
import type { TurnoverRow } from '../../src/assays/turnover/inputs.js';

const dir = mkdtempSync(join(tmpdir(), 'myofolio-analyse-units-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const plain = (study: Study) => activeModules(study, ASSAYS).flatMap((m) => m.analyse(study));

function benchStudy(): Study {
  const s = syntheticStudy({ variants: 10, perBatch: 3, filaments: 30, turnoverPoints: 60, maxRowsPerFile: 2000 });
  return loadStudy({ manifest: JSON.stringify(s.manifest), files: s.files }).study!;
}

/** Units and counts once the store's writes are done. */
async function analysed(study: Study, store?: Store): Promise<{ units: UnitResult[]; counts: { analysed: number; stored: number } }> {
  return analyseUnits(study, ASSAYS, store);
}

describe('analyseUnits with a store', () => {
  const study = benchStudy();
  const expected = plain(study);
  const batches = new Set(expected.map((u) => JSON.stringify([u.assay, u.batch]))).size;

  it('cold: analyses every batch and gives the plain units; warm: takes every batch from the store, same units', async () => {
    const store = new Store(join(dir, 'cold-warm'), 'test');
    const cold = await analysed(study, store);
    expect(cold.counts).toEqual({ analysed: batches, stored: 0 });
    expect(cold.units).toEqual(expected);
    const warm = await analysed(study, new Store(join(dir, 'cold-warm'), 'test'));
    expect(warm.counts).toEqual({ analysed: 0, stored: batches });
    expect(warm.units).toEqual(expected);
  }, 120_000);

  it('after one reading of one file changed, analyses that file\'s batches of that assay only and matches a fresh analysis', async () => {
    const store = new Store(join(dir, 'changed'), 'test');
    await analysed(study, store);
    const rows = study.rows.turnover as TurnoverRow[];
    const target = rows.find((r) => r.variant !== study.variants.find((v) => v.isWT)?.id && r.batch === rows[rows.length - 1]!.batch) as TurnoverRow;
    // As loadStudy gives it after the file was edited: one reading differs, and so does the file's SHA-256.
    const changed: Study = {
      ...study,
      files: study.files.map((f) => (f.path === target.at.file ? { ...f, sha256: 'edited' } : f)),
      rows: { ...study.rows, turnover: rows.map((r) => (r === target ? { ...r, fluorescence: r.fluorescence * 1.5 } : r)) },
    };
    const fresh = plain(changed);
    expect(fresh).not.toEqual(expected);
    const inFile = new Set(rows.filter((r) => r.at.file === target.at.file).map((r) => r.batch)).size;
    const got = await analysed(changed, store);
    expect(got.counts).toEqual({ analysed: inFile, stored: batches - inFile });
    expect(got.units).toEqual(fresh);
    // The edit undone: the entries of before are still there.
    expect((await analysed(study, store)).counts).toEqual({ analysed: 0, stored: batches });
  }, 120_000);

  it('a file read differently (its manifest entry changed, its bytes not) is never served the old units', async () => {
    const store = new Store(join(dir, 'reread'), 'test');
    await analysed(study, store);
    const rows = study.rows.turnover as TurnoverRow[];
    const file = rows[0]!.at.file;
    const raw = study.manifestRaw as { files: Array<Record<string, unknown>> };
    const reread: Study = {
      ...study,
      manifestRaw: { ...raw, files: raw.files.map((f) => (f.path === file ? { ...f, note: 'units declared differently' } : f)) },
      rows: { ...study.rows, turnover: rows.map((r) => (r.at.file === file ? { ...r, fluorescence: r.fluorescence * 2 + 1 } : r)) },
    };
    const got = await analysed(reread, store);
    expect(got.counts.analysed).toBeGreaterThan(0);
    expect(got.units).toEqual(plain(reread));
  }, 120_000);

  it('a changed setting or fingerprint misses every batch; no store means no store', async () => {
    const store = new Store(join(dir, 'settings'), 'test');
    await analysed(study, store);
    const tuned: Study = { ...study, settings: { ...study.settings, forceMinPoints: 5 } };
    expect((await analysed(tuned, store)).counts.stored).toBe(0);
    expect((await analysed(study, new Store(join(dir, 'settings'), 'other code'))).counts.stored).toBe(0);
    const none = await analysed(study);
    expect(none.units).toEqual(expected);
    expect(readdirSync(dir)).not.toContain('none');
  }, 120_000);

  it('modules outside the registry (code the fingerprint does not cover) are never stored', async () => {
    const own = ASSAYS.map((m) => ({ ...m }));
    const store = new Store(join(dir, 'own'), 'test');
    const got = analyseUnits(study, own, store);
    expect(got.units).toEqual(expected);
    expect(() => readdirSync(join(dir, 'own'))).toThrow();
  });
});
