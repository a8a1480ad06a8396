/**
 * Files whose batches are all in the store are not parsed on a rebuild: their stored readings
 * stand in for their rows (src/study/load.ts, src/pipeline/analyse-units.ts). Whatever is left out,
 * the issues, the study's description of its files and the analysis must be exactly those of a
 * study read whole. Study: the benchmark generator's (synthetic, invented values).
 */
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { syntheticStudy, writeStudy } from '../../src/bench/synthetic.js';
import { loadAndAnalyse } from '../../src/pipeline/build-study.js';
import { Store } from '../../src/pipeline/store.js';
import { type ParsedDigest, labelsResolveAlike, loadStudy, variantFacts } from '../../src/study/load.js';
import type { FileDigest } from '../../src/study/types.js';
import { writeJsonStreamed } from '../../src/results/json.js';

const tmp = mkdtempSync(join(tmpdir(), 'myofolio-load-reuse-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

const made = syntheticStudy({ variants: 10, perBatch: 3, filaments: 30, turnoverPoints: 60, maxRowsPerFile: 2000 });
const input = (files: Record<string, string>, manifest: unknown = made.manifest) => ({ manifest: JSON.stringify(manifest), files });

/** An in-memory digest store, and a load that saves what it parsed. */
function memoryStore() {
  const kept = new Map<string, FileDigest>();
  const reuse = { context: 'test', get: (key: string) => kept.get(key) };
  const load = (files: Record<string, string>, manifest: unknown = made.manifest) => {
    const out = loadStudy(input(files, manifest), { reuse });
    for (const d of out.digests ?? ([] as ParsedDigest[])) kept.set(d.key, d.digest);
    return out;
  };
  return { kept, load };
}

describe('loadStudy with digests', () => {
  it('leaves out every file it has a digest for, with the same issues and file list as a whole load', () => {
    const whole = loadStudy(input(made.files));
    const store = memoryStore();
    const first = store.load(made.files);
    expect(first.study?.omitted).toBeUndefined();
    expect(store.kept.size).toBe(Object.keys(made.files).length);
    const again = store.load(made.files);
    expect(again.study?.omitted?.size).toBe(Object.keys(made.files).length);
    expect(Object.values(again.study!.rows).every((rows) => rows?.length === 0)).toBe(true);
    expect(again.issues).toEqual(whole.issues);
    expect(again.study!.files).toEqual(whole.study!.files);
    expect(again.digests).toEqual([]);
  });

  it('reports a batch without WT at the same line whether its files were parsed or left out', () => {
    // Drop the WT rows of batch B3 from the turnover files: the variants of B3 have no WT there.
    const files = { ...made.files };
    for (const path of Object.keys(files).filter((p) => p.startsWith('turnover'))) {
      files[path] = (files[path] ?? '').split('\n').filter((line) => !/^WT,[^,]*,B3,/.test(line)).join('\n');
    }
    const whole = loadStudy(input(files));
    const noWt = whole.issues.filter((i) => i.severity === 'error');
    expect(noWt.length).toBe(1);
    expect(noWt[0]?.at).toMatchObject({ file: expect.stringMatching(/^turnover/), column: 'batch' });
    const store = memoryStore();
    store.load(files);
    const again = store.load(files);
    // Each file is fine on its own, so all were left out; the check across files still fires.
    expect(store.kept.size).toBe(Object.keys(files).length);
    expect(again.issues).toEqual(whole.issues);
    expect(again.study).toBeUndefined();
  });

  it('a variant declared: no file is parsed; a label that now names another variant: the files using it are parsed', () => {
    const store = memoryStore();
    store.load(made.files);
    const variants = made.manifest.variants as Array<Record<string, unknown>>;
    const first = variants.findIndex((v) => v.wt !== true);
    const [, ref, pos, alt] = /^p\.([A-Z])(\d+)([A-Z])$/.exec(variants[first]?.hgvs as string) as RegExpExecArray;
    const other = `p.${ref}${pos}${ref === 'W' || alt === 'W' ? 'Y' : 'W'}`;
    // Declared first, so that every other variant's place in the manifest moves; used by no file.
    const added = { ...made.manifest, variants: [{ hgvs: other }, ...variants] };
    const whole = loadStudy(input(made.files, added));
    const again = store.load(made.files, added);
    expect(again.study?.omitted?.size).toBe(Object.keys(made.files).length);
    expect(again.issues).toEqual(whole.issues);
    expect(again.issues.map((i) => i.code)).toContain('manifest.variant-unused');
    expect(again.study!.files).toEqual(whole.study!.files);

    // The label of that variant now names a variant with another id: the same bytes give other rows.
    const label = `${ref}${pos}${alt}`;
    const remapped = { ...made.manifest, variants: variants.map((v, i) => (i === first ? { ...v, hgvs: other, label } : v)) };
    const using = Object.keys(made.files).filter((p) => made.files[p]?.includes(`\n${label},`));
    expect(using.length).toBeGreaterThan(1);
    const whole2 = loadStudy(input(made.files, remapped));
    const again2 = store.load(made.files, remapped);
    expect([...again2.study!.omitted!.keys()].sort()).toEqual(Object.keys(made.files).filter((p) => !using.includes(p)).sort());
    expect(again2.issues).toEqual(whole2.issues);
    expect(again2.study!.files).toEqual(whole2.study!.files);
    for (const [kind, rows] of Object.entries(whole2.study!.rows)) {
      expect((again2.study!.rows as Record<string, unknown[]>)[kind]).toEqual((rows as Array<{ at: { file: string } }>).filter((r) => using.includes(r.at.file)));
    }
    expect(whole2.study!.variants[first]?.id).not.toBe(whole.study!.variants[first + 1]?.id);
  });

  it('a label whose variant keeps its id but not its WT flag or gene does not resolve alike', () => {
    const v = loadStudy(input(made.files)).study!.variants.find((x) => !x.isWT)!;
    const labels: FileDigest['labels'] = [[v.label, variantFacts(v)]];
    expect(labelsResolveAlike(labels, new Map([[v.label, v]]))).toBe(true);
    expect(labelsResolveAlike(labels, new Map([[v.label, { ...v, isWT: true }]]))).toBe(false);
    expect(labelsResolveAlike(labels, new Map([[v.label, { ...v, gene: 'OTHER' }]]))).toBe(false);
    expect(labelsResolveAlike(labels, new Map())).toBe(false);
    // A digest stored without labels (an older format) is never taken.
    expect(labelsResolveAlike(undefined as never, new Map([[v.label, v]]))).toBe(false);
  });

  it('parses a file again when its bytes change', () => {
    const store = memoryStore();
    store.load(made.files);
    const path = 'turnover-part2.csv';
    const edited = { ...made.files, [path]: (made.files[path] ?? '').replace(/,(\d+)\.(\d)(\d*)\n/, ',$1.$2$31\n') };
    expect(edited[path]).not.toBe(made.files[path]);
    const again = store.load(edited);
    expect([...again.study!.omitted!.keys()]).not.toContain(path);
    expect(again.study!.omitted!.size).toBe(Object.keys(made.files).length - 1);
    expect(again.study!.rows.turnover!.every((r) => r.at.file === path)).toBe(true);
  });
});

describe('loadAndAnalyse with the store', () => {
  const dir = join(tmp, 'study');
  const cache = join(tmp, 'cache');
  /** Units entries of the last build with the store: found and not found. */
  let lookups = { hits: 0, misses: 0 };
  const run = async (withStore: boolean) => {
    const store = withStore ? new Store(cache, 'test') : undefined;
    const got = loadAndAnalyse(dir, { sourceDateEpoch: 1_700_000_000 }, store);
    expect(got.results).toBeDefined();
    if (store) lookups = { hits: store.counts.hits, misses: store.counts.misses };
    // results.json as the build writes it is JSON.stringify of the results.
    const file = join(tmp, 'results.json');
    writeJsonStreamed(file, got.results as never);
    const written = readFileSync(file, 'utf8');
    expect(written === `${JSON.stringify(got.results)}\n`).toBe(true);
    // SHA-256 of the results JSON: a failure then prints two hashes, not two copies of the results.
    return createHash('sha256').update(written).digest('hex');
  };
  /** Edit the first reading of a variant (not WT) in a file: its last number × 1.3. */
  const editReading = (name: string) => {
    const path = join(dir, name);
    const lines = readFileSync(path, 'utf8').split('\n');
    const i = lines.findIndex((l) => /^[A-Z]\d+A,/.test(l));
    lines[i] = (lines[i] ?? '').replace(/,([0-9.]+)$/, (_m, f: string) => `,${(Number(f) * 1.3).toFixed(3)}`);
    writeFileSync(path, lines.join('\n'));
  };
  /** Edit a reading of `name`: the results change, and the build with the cache gives those of a build without. */
  const editAndCompare = async (name: string) => {
    const before = await run(false);
    editReading(name);
    const fresh = await run(false);
    expect(fresh).not.toBe(before);
    expect(await run(true)).toBe(fresh);
    return fresh;
  };

  it('cold, warm (every batch from the store) and after one file changed: the results of a build without cache', async () => {
    writeStudy(dir, made);
    const reference = await run(false);
    expect(await run(true)).toBe(reference);
    expect(lookups.hits).toBe(0);
    const batches = lookups.misses;
    expect(batches).toBeGreaterThan(1);
    expect(await run(true)).toBe(reference);
    expect(lookups).toEqual({ hits: batches, misses: 0 });
    // One turnover reading of a variant edited: the turnover batches of its file are fitted
    // again (stored per assay and batch), but not every batch.
    const fresh = await editAndCompare('turnover-part2.csv');
    expect(lookups.misses).toBeGreaterThan(0);
    expect(lookups.hits).toBeGreaterThan(0);
    expect(lookups.hits + lookups.misses).toBe(batches);
    expect(await run(true)).toBe(fresh);
    expect(lookups).toEqual({ hits: batches, misses: 0 });
  }, 180_000);

  it('after one NADH trace changed: the results of a build without cache (its batch is analysed whole)', async () => {
    // Continues from the study and cache of the test above.
    await editAndCompare('atpase-nadh-part4.csv');
    expect(lookups.misses).toBeGreaterThan(0);
    expect(lookups.hits).toBeGreaterThan(0);
  }, 180_000);

  it('a new batch of a new variant in a new file, then a label naming another variant (the old one withdrawn): only the batches concerned are fitted again, and the results are those of a build without cache', async () => {
    // Continues from the study and cache of the tests above.
    const manifestPath = join(dir, 'study.json');
    const manifest = JSON.parse(readFileSync(manifestPath, 'utf8')) as { variants: Array<Record<string, unknown>>; files: Array<Record<string, unknown>> };
    const turnover = manifest.files.filter((f) => f.kind === 'turnover').map((f) => readFileSync(join(dir, f.path as string), 'utf8'));
    const lines = turnover.flatMap((t) => t.split('\n'));
    const preamble = (turnover[0] ?? '').split('\n').filter((l) => l.startsWith('#') || l.startsWith('variant,'));
    const inB1 = lines.filter((l) => l.split(',')[2] === 'B1');
    const oldLabel = (inB1.find((l) => !l.startsWith('WT,')) as string).split(',')[0] as string; // split gives at least one part
    const at = manifest.variants.findIndex((v) => typeof v.hgvs === 'string' && v.hgvs.endsWith(oldLabel));
    const [, ref, pos, alt] = /^p\.([A-Z])(\d+)([A-Z])$/.exec(manifest.variants[at]?.hgvs as string) as RegExpExecArray;
    const newLabel = `${ref}${pos}${ref === 'W' || alt === 'W' ? 'Y' : 'W'}`;
    const rows = inB1
      .filter((l) => l.startsWith('WT,') || l.startsWith(`${oldLabel},`))
      .map((l) => {
        const [label, unit = '', , ...rest] = l.split(',');
        const to = label === 'WT' ? 'WT' : newLabel;
        return [to, `${unit.replace(oldLabel, to)}-new`, 'BNEW', ...rest].join(',');
      });
    const text = `${[...preamble, ...rows].join('\n')}\n`;
    writeFileSync(join(dir, 'turnover-new.csv'), text);
    manifest.variants.push({ hgvs: `p.${newLabel}` });
    manifest.files.push({ path: 'turnover-new.csv', kind: 'turnover' });
    writeFileSync(manifestPath, JSON.stringify(manifest, null, 1));
    const fresh = await run(false);
    expect(await run(true)).toBe(fresh);
    // The new batch's turnover units are fitted; every other batch comes from the store.
    expect(lookups.misses).toBe(1);

    // The old label now names the new variant (the old variant is withdrawn: a label may not be
    // another declared variant's short form): the same bytes give other rows. An entry's key covers
    // the labels of each of its files with the variants they resolve to, so every entry with rows
    // in the files using the label is fitted again.
    manifest.variants[manifest.variants.length - 1] = { hgvs: `p.${newLabel}`, label: oldLabel };
    manifest.variants.splice(at, 1);
    writeFileSync(manifestPath, JSON.stringify(manifest, null, 1));
    const swapped = await run(false);
    expect(swapped).not.toBe(fresh);
    expect(await run(true)).toBe(swapped);
    expect(lookups.misses).toBeGreaterThan(0);
    expect(lookups.hits).toBeGreaterThan(0);
  }, 180_000);

  it('the demo study (one unit excluded in its manifest): the same results cold and warm', async () => {
    const demo = fileURLToPath(new URL('../../data-demo/', import.meta.url));
    const store = () => new Store(join(tmp, 'demo-cache'), 'test');
    const first = store();
    const cold = loadAndAnalyse(demo, { sourceDateEpoch: 1_700_000_000 }, first);
    const second = store();
    const warm = loadAndAnalyse(demo, { sourceDateEpoch: 1_700_000_000 }, second);
    expect(cold.results!.units.filter((u) => u.excluded).length).toBe(1);
    expect(second.counts.misses).toBe(0);
    expect(second.counts.hits).toBe(first.counts.misses);
    expect(JSON.stringify(warm.results)).toBe(JSON.stringify(cold.results));
  }, 180_000);
});
