/**
 * The analysis cache (per module and batch, or per unit for modules whose units are independent)
 * gives exactly the units of the uncached analysis, in the same order, cold and warm, and after
 * one unit's rows changed re-analyses that unit (or that batch) of that assay only.
 * Study: the benchmark generator's (synthetic, invented values).
 */
import { mkdtempSync, readFileSync, readdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { deserialize, serialize } from 'node:v8';
import { afterAll, describe, expect, it } from 'vitest';
import { activeModules } from '../../src/analysis/parallel.js';
import { ASSAYS } from '../../src/assays/registry.js';
import { syntheticStudy } from '../../src/bench/synthetic.js';
import { analyseUnitsCached, slotTextReads } from '../../src/build/analysis-cache.js';
import { writeJsonStreamed } from '../../src/results/json.js';
import { codeFingerprint } from '../../src/fingerprint.js';
import { loadStudy } from '../../src/study/load.js';
import type { AssayModule } from '../../src/assays/types.js';
import type { UnitResult } from '../../src/results/types.js';
import type { RowBase, Study, TurnoverRow } from '../../src/study/types.js';

const dir = mkdtempSync(join(tmpdir(), 'myofolio-analysis-cache-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const serial = (study: Study) => activeModules(study, ASSAYS).flatMap((m) => m.analyse(study));

function benchStudy(): Study {
  const s = syntheticStudy({ variants: 10, perBatch: 3, filaments: 30, turnoverPoints: 60, maxRowsPerFile: 2000 });
  return loadStudy({ manifest: JSON.stringify(s.manifest), files: s.files }).study!;
}

/** Units of a study that holds only the given rows of each kind. */
const analyseOnly = (study: Study, m: AssayModule, keep: (r: RowBase) => boolean) =>
  m.analyse({ ...study, rows: Object.fromEntries(Object.entries(study.rows).map(([k, rows]) => [k, (rows as RowBase[]).filter(keep)])) as Study['rows'] });

describe('AssayModule.independentUnits', () => {
  const study = benchStudy();
  const sameUnit = (u: UnitResult) => (r: RowBase) => r.variant === u.variant && r.unit === u.unit && r.batch === u.batch;

  it('a module that declares it gives each unit from that unit\'s rows alone', () => {
    const flagged = ASSAYS.filter((m) => m.independentUnits);
    expect(flagged.map((m) => m.id).sort()).toEqual(['force', 'motility']);
    for (const m of flagged) {
      const whole = m.analyse(study);
      expect(whole.length).toBeGreaterThan(10);
      for (const u of whole) expect(analyseOnly(study, m, sameUnit(u))).toEqual([u]);
    }
  });

  it('the ATPase does not declare it: a unit from NADH traces needs the actin-only wells of its batch', () => {
    const atpase = ASSAYS.find((m) => m.id === 'atpase') as AssayModule;
    expect(atpase.independentUnits).toBeFalsy();
    const fromTraces = atpase.analyse(study).filter((u) => (study.rows['atpase-nadh'] ?? []).some(sameUnit(u)));
    expect(fromTraces.length).toBeGreaterThan(0);
    const u = fromTraces[0];
    expect(analyseOnly(study, atpase, sameUnit(u))).not.toEqual([u]);
  });
});

describe('analyseUnitsCached', () => {
  const study = benchStudy();
  const expected = serial(study);
  // Cache entries: one per (assay, batch), or per (assay, unit) for modules with independent units.
  const independent = new Set(ASSAYS.filter((m) => m.independentUnits).map((m) => m.id));
  const batches = new Set(expected.map((u) => JSON.stringify(independent.has(u.assay) ? [u.assay, u.batch, u.variant, u.unit] : [u.assay, u.batch]))).size;

  it('cold: analyses every batch and gives the serial units; warm: serves every batch from the cache, same units', async () => {
    const cold = await analyseUnitsCached(study, ASSAYS, { cacheDir: dir, workers: 0 });
    expect(cold.batches).toEqual({ analysed: batches, cached: 0 });
    expect(cold.units).toEqual(expected);
    const warm = await analyseUnitsCached(study, ASSAYS, { cacheDir: dir, workers: 0 });
    expect(warm.batches).toEqual({ analysed: 0, cached: batches });
    expect(warm.units).toEqual(expected);
  }, 120_000);

  it('after one reading of one unit changed, re-analyses that unit only and matches a fresh analysis', async () => {
    const rows = study.rows.turnover as TurnoverRow[];
    const target = rows.find((r) => r.variant !== study.variants.find((v) => v.isWT)?.id && r.batch === rows[rows.length - 1].batch) as TurnoverRow;
    // As loadStudy gives it after the file was edited: one reading differs, and so does the file's SHA-256.
    const changed: Study = {
      ...study,
      files: study.files.map((f) => (f.path === target.at.file ? { ...f, sha256: 'edited' } : f)),
      rows: { ...study.rows, turnover: rows.map((r) => (r === target ? { ...r, fluorescence: r.fluorescence * 1.5 } : r)) },
    };
    // Other units have rows in the same file: they are found by their content, not re-fitted.
    expect(new Set(rows.filter((r) => r.at.file === target.at.file).map((r) => r.batch)).size).toBeGreaterThan(1);
    const fresh = serial(changed);
    expect(fresh).not.toEqual(expected);
    const got = await analyseUnitsCached(changed, ASSAYS, { cacheDir: dir, workers: 0 });
    expect(got.batches).toEqual({ analysed: 1, cached: batches - 1 });
    expect(got.units).toEqual(fresh);
    // The reading changed back (an edit undone): the entry of before is still kept beside the new one.
    const back = await analyseUnitsCached(study, ASSAYS, { cacheDir: dir, workers: 0 });
    expect(back.batches).toEqual({ analysed: 0, cached: batches });
    expect(back.units).toEqual(expected);
  }, 120_000);

  it('a file added to the study (a new run) re-analyses only the units and batches with rows in it', async () => {
    const fresh = mkdtempSync(join(tmpdir(), 'myofolio-analysis-cache-add-'));
    try {
      const path = 'turnover-part2.csv';
      const raw = study.manifestRaw as { files: Array<{ path: string }> };
      const without: Study = {
        ...study,
        files: study.files.filter((f) => f.path !== path),
        manifestRaw: { ...raw, files: raw.files.filter((f) => f.path !== path) },
        rows: { ...study.rows, turnover: (study.rows.turnover as TurnoverRow[]).filter((r) => r.at.file !== path) },
      };
      await analyseUnitsCached(without, ASSAYS, { cacheDir: fresh, workers: 0 });
      const got = await analyseUnitsCached(study, ASSAYS, { cacheDir: fresh, workers: 0 });
      // Turnover units read their batch's WT traces: entries are per batch.
      const touched = new Set((study.rows.turnover as TurnoverRow[]).filter((r) => r.at.file === path).map((r) => r.batch));
      expect(touched.size).toBeGreaterThan(0);
      expect(got.batches).toEqual({ analysed: touched.size, cached: batches - touched.size });
      expect(got.units).toEqual(expected);
    } finally {
      rmSync(fresh, { recursive: true, force: true });
    }
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

  /** The study analysed cold, then warm, in a cache folder of its own: the warm analysis and the cache's slot files. */
  async function warmFromOwnCache(name: string) {
    const own = join(dir, name);
    await analyseUnitsCached(study, ASSAYS, { cacheDir: own, workers: 0 });
    const warm = await analyseUnitsCached(study, ASSAYS, { cacheDir: own, workers: 0 });
    const slots = readdirSync(own, { recursive: true, encoding: 'utf8' }).filter((f) => /(^|\/)s[0-9a-f]+\.bin$/.test(f)).sort();
    return { own, warm, slots };
  }

  it('units served from the cache keep their stored parts after their files are replaced or removed (another build, pruning)', async () => {
    const { own, warm, slots } = await warmFromOwnCache('replaced');
    expect(warm.batches.analysed).toBe(0);
    // Nothing of a unit's plot, fit or metricSe has been read yet: they are in the files.
    expect(slots.length).toBeGreaterThan(2);
    slots.forEach((f, i) => {
      const file = join(own, f);
      if (i % 2 === 0) rmSync(file);
      else {
        // Replaced as storeText replaces (a new file renamed over it), with other bytes.
        writeFileSync(`${file}.x`, Buffer.alloc(readFileSync(file).length, 0x20));
        renameSync(`${file}.x`, file);
      }
    });
    expect(JSON.stringify(warm.units)).toBe(JSON.stringify(expected));
    expect(warm.units).toEqual(expected);
  }, 120_000);

  it('results.json reads each cache file\'s stored parts about once, in windows (parts stored in the order they are written out)', async () => {
    const { own, warm, slots } = await warmFromOwnCache('windows');
    expect(warm.batches.analysed).toBe(0);
    // Bytes of stored parts: each slot file's size less its header (length field and header).
    const textBytes = slots.reduce((n, f) => {
      const bytes = readFileSync(join(own, f));
      return n + bytes.length - 4 - bytes.readUInt32LE(0);
    }, 0);
    expect(textBytes).toBeGreaterThan(0);
    const before = { ...slotTextReads };
    const out = join(dir, 'windows.json');
    writeJsonStreamed(out, { units: warm.units });
    const reads = slotTextReads.reads - before.reads;
    const bytes = slotTextReads.bytes - before.bytes;
    expect(JSON.parse(readFileSync(out, 'utf8'))).toEqual(JSON.parse(JSON.stringify({ units: expected })));
    // Each file's parts once (a window of 256 KiB holds a small file whole): one read per file
    // here. With one window (results order goes back and forth between files) 114 reads; with a
    // unit's parts stored in another order than its keys, 76.
    expect(reads).toBeLessThanOrEqual(slots.length);
    expect(bytes).toBeLessThanOrEqual(textBytes);
  }, 120_000);

  it('a damaged cache file counts as missing: its batches are analysed again, same units', async () => {
    const damaged = join(dir, 'damaged');
    await analyseUnitsCached(study, ASSAYS, { cacheDir: damaged, workers: 0 });
    const slots = readdirSync(damaged, { recursive: true, encoding: 'utf8' }).filter((f) => /(^|\/)s[0-9a-f]+\.bin$/.test(f)).sort();
    expect(slots.length).toBeGreaterThan(3);
    // Cut short in its plot bytes; cut short in its header; a header length past the end; empty.
    const cuts = [(b: Buffer) => b.subarray(0, b.length - 5), (b: Buffer) => b.subarray(0, 12), (b: Buffer) => Buffer.concat([Buffer.from([0xff, 0xff, 0xff, 0x7f]), b.subarray(4)]), () => Buffer.alloc(0)];
    cuts.forEach((cut, i) => {
      const file = join(damaged, slots[i]);
      writeFileSync(file, cut(readFileSync(file)));
    });
    const again = await analyseUnitsCached(study, ASSAYS, { cacheDir: damaged, workers: 0 });
    expect(again.batches.analysed).toBeGreaterThanOrEqual(cuts.length);
    expect(again.units).toEqual(expected);
    // Written again whole: the next run takes everything from the cache.
    expect((await analyseUnitsCached(study, ASSAYS, { cacheDir: damaged, workers: 0 })).batches.analysed).toBe(0);
  }, 120_000);

  it('a cache file whose units name a lazy part the cache does not make counts as missing', async () => {
    const odd = join(dir, 'odd-part');
    await analyseUnitsCached(study, ASSAYS, { cacheDir: odd, workers: 0 });
    const slots = readdirSync(odd, { recursive: true, encoding: 'utf8' }).filter((f) => /(^|\/)s[0-9a-f]+\.bin$/.test(f)).sort();
    // The first unit of the first file that has one with lazy parts: its first lazy part renamed
    // to '__proto__' (whose [start, length] is in range), the file written again as the cache writes it.
    let changed = 0;
    for (const f of slots) {
      const file = join(odd, f);
      const bytes = readFileSync(file);
      const n = bytes.readUInt32LE(0);
      const header = deserialize(bytes.subarray(4, 4 + n)) as { entries: Array<{ units: Array<Record<string, unknown> & { lazy?: string[] }> }> };
      const unit = header.entries.flatMap((e) => e.units).find((u) => Array.isArray(u.lazy) && u.lazy.length > 0);
      if (!unit) continue;
      const field = (unit.lazy as string[])[0];
      Object.defineProperty(unit, '__proto__', { value: unit[field], enumerable: true, configurable: true, writable: true });
      unit.lazy = ['__proto__', ...(unit.lazy as string[]).slice(1)];
      const out = serialize(header);
      const length = Buffer.alloc(4);
      length.writeUInt32LE(out.length, 0);
      writeFileSync(file, Buffer.concat([length, out, bytes.subarray(4 + n)]));
      changed++;
      break;
    }
    expect(changed).toBe(1);
    const again = await analyseUnitsCached(study, ASSAYS, { cacheDir: odd, workers: 0 });
    expect(again.batches.analysed).toBeGreaterThan(0);
    expect(again.units).toEqual(expected);
    for (const u of again.units) expect(Object.getPrototypeOf(u)).toBe(Object.prototype);
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
