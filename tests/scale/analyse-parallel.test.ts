/**
 * analyseUnitsParallel equals the serial per-unit analysis, element for element and in order,
 * on the demo study and on a benchmark-generator study with every input kind (both synthetic).
 */
import { describe, expect, it } from 'vitest';
import { activeModules, analyseUnitsParallel } from '../../src/analysis/parallel.js';
import { analyseStudy } from '../../src/analysis/analyse-study.js';
import { ASSAYS } from '../../src/assays/registry.js';
import { syntheticStudy } from '../../src/bench/synthetic.js';
import { loadStudy } from '../../src/study/load.js';
import { readStudyFolder } from '../../src/study/read-folder.js';
import type { Study } from '../../src/study/types.js';

function serial(study: Study) {
  return activeModules(study, ASSAYS).flatMap((m) => m.analyse(study));
}

function benchStudy(): Study {
  const s = syntheticStudy({ variants: 12, perBatch: 3, filaments: 30, turnoverPoints: 80, maxRowsPerFile: 2000 });
  const loaded = loadStudy({ manifest: JSON.stringify(s.manifest), files: s.files });
  expect(loaded.issues.filter((i) => i.severity === 'error')).toEqual([]);
  return loaded.study!;
}

describe('analyseUnitsParallel', () => {
  it('matches the serial path on a study with rates, NADH traces, velocities, tracks, force and turnover in several files', async () => {
    const study = benchStudy();
    for (const k of ['atpase-rates', 'atpase-nadh', 'motility-velocities', 'motility-tracks', 'force-pca', 'turnover'] as const) expect(study.rows[k]?.length, k).toBeGreaterThan(0);
    const expected = serial(study);
    expect(expected.length).toBeGreaterThan(100);
    let progress = 0;
    const got = await analyseUnitsParallel(study, ASSAYS, { workers: 2, onProgress: () => progress++ });
    expect(progress).toBeGreaterThan(1);
    expect(got).toEqual(expected);
  }, 120_000);

  it('matches the serial path on the demo study, and analyseStudy gives the same results from precomputed units', async () => {
    const loaded = loadStudy(readStudyFolder('data-demo'));
    const study = loaded.study!;
    const units = await analyseUnitsParallel(study, ASSAYS, { workers: 2 });
    expect(units).toEqual(serial(study));
    // Precomputed units reach analyseStudy through modules whose analyse() returns them.
    const byAssay = new Map(ASSAYS.map((m) => [m.id, units.filter((u) => u.assay === m.id)]));
    const pre = ASSAYS.map((m) => ({ ...m, analyse: () => structuredClone(byAssay.get(m.id) ?? []) }));
    const opts = { toolVersion: 't', builtAt: '2025-01-01T00:00:00Z' };
    expect(analyseStudy(study, { ...opts, assays: pre })).toEqual(analyseStudy(study, opts));
  }, 120_000);

  it('matches the serial path with one worker and many small tasks (this thread takes a share)', async () => {
    const study = benchStudy();
    let last = [0, 0];
    const got = await analyseUnitsParallel(study, ASSAYS, { workers: 1, chunksPerWorker: 8, onProgress: (done, total) => (last = [done, total]) });
    expect(got).toEqual(serial(study));
    expect(last[0]).toBe(last[1]);
    expect(last[1]).toBeGreaterThan(ASSAYS.length);
  }, 120_000);

  it('workers: 0 is the serial path', async () => {
    const study = benchStudy();
    expect(await analyseUnitsParallel(study, ASSAYS, { workers: 0 })).toEqual(serial(study));
  }, 60_000);
});
