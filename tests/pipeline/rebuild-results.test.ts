/**
 * A rebuild through the store gives exactly the results of a build without it: cold, warm, and
 * after files, variants or labels changed; the units of a batch whose inputs are unchanged come
 * from the store, and those of a changed batch are fitted again (src/pipeline/analyse-units.ts).
 * Study: the benchmark generator's (synthetic, invented values).
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
import { writeJsonStreamed } from '../../src/results/json.js';

const tmp = mkdtempSync(join(tmpdir(), 'myofolio-rebuild-results-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

const made = syntheticStudy({ variants: 10, perBatch: 3, filaments: 30, turnoverPoints: 60, maxRowsPerFile: 2000 });

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
