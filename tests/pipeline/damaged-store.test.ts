/**
 * Every kind of store entry (units, SVGs, assay chart blocks) damaged at once, in each of several ways:
 * the build discards them, computes them again, says so in one note, and gives the output of a
 * cold build, without hanging or throwing. Study: three files of the demo study (synthetic data).
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { buildStudy } from '../../src/pipeline/build-study.js';
import { copyDemo, hashTree } from '../robustness/helpers.js';

const root = mkdtempSync(join(tmpdir(), 'myofolio-damaged-store-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

const study = copyDemo(join(root, 'study'));

async function build(store: string | false, out: string) {
  const outcome = await buildStudy(study, out, { store, sourceDateEpoch: 1_740_787_200, fingerprint: 'test' });
  expect(outcome.ok).toBe(true);
  return { tree: hashTree(out), outcome };
}

/** Entry files of the store by kind. */
function entries(store: string): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const kind of readdirSync(store, { withFileTypes: true }).filter((e) => e.isDirectory())) {
    out[kind.name] = (readdirSync(join(store, kind.name), { recursive: true, encoding: 'utf8' }) as string[]).filter((f) => /^[0-9a-f]\/[0-9a-f]{64}$/.test(f)).map((f) => join(store, kind.name, f));
  }
  return out;
}

const damages: Array<[string, (file: string) => void]> = [
  ['a byte flipped', (f) => {
    const b = readFileSync(f);
    b[b.length >> 1]! ^= 0x40; // b is a stored entry's bytes, not empty
    writeFileSync(f, b);
  }],
  ['cut short', (f) => writeFileSync(f, readFileSync(f).subarray(0, readFileSync(f).length >> 1))],
  ['replaced by a FIFO', (f) => {
    rmSync(f);
    execFileSync('mkfifo', [f]);
  }],
];

describe('a damaged store', () => {
  let cold: Awaited<ReturnType<typeof build>>;

  it('a cold build fills the store with every kind of entry', async () => {
    cold = await build(join(root, 'reference-store'), join(root, 'reference-out'));
    const made = entries(join(root, 'reference-store'));
    expect(Object.keys(made).sort()).toEqual(['block', 'svg', 'units']);
    for (const list of Object.values(made)) expect(list.length).toBeGreaterThan(0);
    expect(cold.outcome.notes).toEqual([]);
    expect((await build(false, join(root, 'plain-out'))).tree).toEqual(cold.tree);
  }, 120_000);

  for (const [what, damage] of damages) {
    it(`every entry ${what}: the build equals the cold build and says so in one note`, async () => {
      const store = join(root, `store-${what.replace(/\W+/g, '-')}`);
      await build(store, join(root, 'out-first'));
      const all = Object.values(entries(store)).flat();
      all.forEach(damage);
      const again = await build(store, join(root, `out-${what.replace(/\W+/g, '-')}`));
      expect(again.tree).toEqual(cold.tree);
      expect(again.outcome.notes).toHaveLength(1);
      expect(again.outcome.notes[0]).toMatch(new RegExp(`^${all.length} damaged cache entries were discarded and computed again`));
      // Computed again and stored whole: the next build is served by the store.
      const third = await build(store, join(root, 'out-third'));
      expect(third.tree).toEqual(cold.tree);
      expect(third.outcome.notes).toEqual([]);
      expect(third.outcome.charts?.rendered).toBe(0);
    }, 120_000);
  }
});
