/**
 * Determinism: two builds of the same study (a copy of data-demo with its three
 * smallest files, to keep the test short; the full demo was compared the same way by hand) with
 * SOURCE_DATE_EPOCH set, into differently named output folders, give byte-identical files
 * (SHA-256 of every file).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { sourceDateEpoch } from '../../src/cli/commands/build.js';
import { cleanup, copyDemo, hashTree, runCli, tempRoot } from './helpers.js';

const root = tempRoot('determinism');
afterAll(() => cleanup(root));

describe('two builds of the demo study', () => {
  it('with the same SOURCE_DATE_EPOCH are byte-identical, file by file', async () => {
    const study = copyDemo(join(root, 'study'));
    const saved = process.env.SOURCE_DATE_EPOCH;
    process.env.SOURCE_DATE_EPOCH = '1700000000';
    try {
      for (const out of ['site-a', 'site-b']) {
        const r = await runCli(['build', study, '--out', join(root, out)], root);
        expect(r.code, r.out + r.err).toBe(0);
      }
    } finally {
      if (saved === undefined) delete process.env.SOURCE_DATE_EPOCH;
      else process.env.SOURCE_DATE_EPOCH = saved;
    }
    const ha = hashTree(join(root, 'site-a'));
    const hb = hashTree(join(root, 'site-b'));
    expect(Object.keys(ha).length).toBeGreaterThan(20);
    const differ = Object.keys({ ...ha, ...hb }).filter((k) => ha[k] !== hb[k]);
    expect(differ).toEqual([]);
    // The build time comes from SOURCE_DATE_EPOCH (1700000000 s = 2023-11-14T22:13:20Z, computed by hand).
    expect(readFileSync(join(root, 'site-a', 'downloads', 'results.json'), 'utf8')).toContain('2023-11-14T22:13:20');
  }, 120_000);

  it('SOURCE_DATE_EPOCH is read as whole seconds only', () => {
    expect(sourceDateEpoch({ SOURCE_DATE_EPOCH: '1700000000' })).toBe(1700000000);
    expect(sourceDateEpoch({ SOURCE_DATE_EPOCH: '17e8' })).toBeUndefined();
    expect(sourceDateEpoch({ SOURCE_DATE_EPOCH: '' })).toBeUndefined();
    expect(sourceDateEpoch({})).toBeUndefined();
  });
});
