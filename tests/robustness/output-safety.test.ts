/**
 * Output safety: a build writes a new version of the site and swaps the output
 * link to it; a failed, crashed or killed build leaves the previous site byte-identical; the tool
 * refuses the study folder and foreign non-empty folders (unless --force, which moves them aside);
 * it deletes only what it made. (Faults and kills at every step: tests/robustness/output-faults.test.ts.)
 */
import { existsSync, mkdirSync, readdirSync, readFileSync, readlinkSync, symlinkSync, writeFileSync } from 'node:fs';
import { basename, join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildStudy } from '../../src/pipeline/build-study.js';
import { OUTPUT_MARKER, VERSIONS_MARKER, cleanStale } from '../../src/pipeline/output.js';
import { CRASH, cleanup, copyDemo, hashTree, runCli, spawnChild, tempRoot } from './helpers.js';

const root = tempRoot('output');
const study = join(root, 'study');
const site = join(root, 'site');
let good: Record<string, string>;

beforeAll(async () => {
  copyDemo(study);
  const r = await runCli(['build', study, '--out', site], root);
  expect(r.code, r.out + r.err).toBe(0);
  good = hashTree(site);
}, 120_000);
afterAll(() => cleanup(root));

/**
 * What is next to the site link other than its versions folder, and in that folder other than its
 * marker and the version the link leads to.
 */
function leftovers(base = 'site'): string[] {
  let current = '';
  try {
    current = basename(readlinkSync(join(root, base)));
  } catch {
    // no link
  }
  const versions = `${base}.versions`;
  const inside = existsSync(join(root, versions)) ? readdirSync(join(root, versions)).filter((n) => n !== VERSIONS_MARKER && n !== current).map((n) => `${versions}/${n}`) : [];
  return [...readdirSync(root).filter((n) => n.startsWith(`${base}.`) && n !== versions), ...inside];
}

/** leftovers() once the CLI's background removal of the previous version is done (polled up to 20 s). */
async function leftoversSettled(base = 'site'): Promise<string[]> {
  for (let i = 0; i < 200 && leftovers(base).length > 0; i++) await new Promise((r) => setTimeout(r, 100));
  return leftovers(base);
}

describe('a successful build', () => {
  it('carries the marker, leaves no staging or previous folder, and does not touch the study', async () => {
    expect(good[OUTPUT_MARKER]).toBeDefined();
    expect(good['index.html']).toBeDefined();
    expect(good['downloads/results.csv']).toBeDefined();
    expect(leftovers()).toEqual([]);
    const studyBefore = hashTree(study);
    const r = await runCli(['build', study, '--out', site], root);
    expect(r.code).toBe(0);
    // The previous version is left by the link (never mixed with the new one) and deleted by a
    // process of its own: at most that folder is left for a moment, and then nothing.
    expect(leftovers().every((n) => /^site\.versions\/\d+-[0-9a-f]{8}$/.test(n))).toBe(true);
    expect(await leftoversSettled()).toEqual([]);
    expect(hashTree(study)).toEqual(studyBefore);
    good = hashTree(site);
  }, 60_000);
});

describe('a failing build leaves the previous site intact', () => {
  it('broken input: exit 1, site byte-identical', async () => {
    const broken = join(root, 'broken');
    copyDemo(broken);
    writeFileSync(join(broken, 'force-pca.csv'), 'variant,preparation,batch,pCa,force (uN),area (um2)\nWT,"w1,B1,9,1,400\n');
    const r = await runCli(['build', broken, '--out', site], root);
    expect(r.code).toBe(1);
    expect(r.out).toContain('the previous output, if any, is unchanged');
    expect(hashTree(site)).toEqual(good);
    expect(await leftoversSettled()).toEqual([]);
  });

  it('an exception injected midway (after pages, before the swap): site byte-identical, staging removed', async () => {
    let staged = false;
    await expect(
      buildStudy(study, site, {
        onPhase: (p) => {
          if (p === 'write') {
            staged = leftovers().some((n) => n.startsWith(`site.versions/${process.pid}-`));
            throw new Error('injected failure');
          }
        },
      }),
    ).rejects.toThrow('injected failure');
    expect(staged).toBe(true);
    expect(hashTree(site)).toEqual(good);
    expect(leftovers()).toEqual([]);
  }, 60_000);

  it('a KILLED build (SIGKILL once the staging folder appears) leaves the site unchanged; the next build removes the stale staging folder', async () => {
    const child = spawnChild(['build', study, '--out', site], root);
    let stderr = '';
    child.stderr!.on('data', (d) => (stderr += d));
    const exited = new Promise<number | null>((resolve) => child.on('exit', (code) => resolve(code)));
    let sawStaging = false;
    for (let i = 0; i < 3000 && child.exitCode === null; i++) {
      if (leftovers().some((n) => n.startsWith(`site.versions/${child.pid}-`))) {
        sawStaging = true;
        child.kill('SIGKILL');
        break;
      }
      await new Promise((r) => setTimeout(r, 10));
    }
    await exited;
    expect(sawStaging, `the child finished before its staging folder was seen: ${stderr}`).toBe(true);
    expect(hashTree(site)).toEqual(good);
    const stale = leftovers().filter((n) => n.startsWith(`site.versions/${child.pid}-`));
    expect(stale).toHaveLength(1);
    // Next to it: a folder with an older myofolio's staging name but no marker, and a version of a live process.
    const foreign = join(root, 'site.building-999999-userdata');
    mkdirSync(foreign);
    writeFileSync(join(foreign, 'notes.txt'), 'not written by myofolio');
    const live = join(root, 'site.versions', `${process.ppid}-0123abcd`);
    mkdirSync(live);
    writeFileSync(join(live, OUTPUT_MARKER), '');
    const removed = cleanStale(site);
    expect(removed.map((p) => `site.versions/${basename(p)}`)).toEqual(stale);
    expect(readFileSync(join(foreign, 'notes.txt'), 'utf8')).toBe('not written by myofolio');
    expect(existsSync(live)).toBe(true);
    cleanup(foreign);
    cleanup(live);
    expect(leftovers()).toEqual([]);
  }, 90_000);
});

describe('where a build may write', () => {
  it('refuses the study folder itself and folders inside it', async () => {
    const before = hashTree(study);
    for (const out of [study, join(study, 'site'), join(study, '.')]) {
      const r = await runCli(['build', study, '--out', out], root);
      expect(r.code).toBe(1);
      expect(r.err).toMatch(/is inside the study folder[^]*fix: Choose an output folder outside the study folder/);
      expect(r.err).not.toMatch(CRASH);
    }
    expect(hashTree(study)).toEqual(before);
    expect(readdirSync(study).some((n) => n.includes('building'))).toBe(false);
  });

  it('refuses a link that leads into the study folder, and a folder that contains the study', async () => {
    symlinkSync(study, join(root, 'link-to-study'));
    const r = await runCli(['build', study, '--out', join(root, 'link-to-study', 'out')], root);
    expect(r.code).toBe(1);
    expect(r.err).toContain('is inside the study folder');
    const up = await runCli(['build', study, '--out', root], root);
    expect(up.code).toBe(1);
    expect(up.err).toContain('contains the study folder');
    cleanup(join(root, 'link-to-study'));
  });

  it('refuses a non-empty folder it did not create, and a file, without --force', async () => {
    const foreign = join(root, 'mine');
    mkdirSync(foreign);
    writeFileSync(join(foreign, 'thesis.docx'), 'precious');
    const r = await runCli(['build', study, '--out', foreign], root);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/is not empty and was not made by myofolio\.\n {2}fix: .*--force/);
    expect(readdirSync(foreign)).toEqual(['thesis.docx']);
    writeFileSync(join(root, 'plain-file'), 'x');
    const f = await runCli(['build', study, '--out', join(root, 'plain-file')], root);
    expect(f.code).toBe(1);
    expect(f.err).toContain('is not a folder');
    expect(readFileSync(join(root, 'plain-file'), 'utf8')).toBe('x');
    expect(readdirSync(root).filter((n) => n.startsWith('mine.') || n.startsWith('plain-file.'))).toEqual([]);
  });

  it('with --force moves the foreign folder aside, whole, instead of deleting it', async () => {
    const foreign = join(root, 'theirs');
    mkdirSync(join(foreign, 'sub'), { recursive: true });
    writeFileSync(join(foreign, 'sub', 'data.txt'), 'keep me');
    const before = hashTree(foreign);
    const r = await runCli(['build', study, '--out', foreign, '--force'], root);
    expect(r.code, r.out + r.err).toBe(0);
    const aside = readdirSync(root).filter((n) => n.startsWith('theirs.replaced-'));
    expect(aside).toHaveLength(1);
    expect(r.out).toContain(`moved to ${aside[0]}`);
    expect(hashTree(join(root, aside[0] ?? ''))).toEqual(before);
    expect(existsSync(join(foreign, OUTPUT_MARKER))).toBe(true);
    expect(leftovers('theirs').filter((n) => !n.startsWith('theirs.replaced-'))).toEqual([]);
  }, 60_000);

  it('an empty folder is used without --force; a later build replaces its own output', async () => {
    const empty = join(root, 'empty');
    mkdirSync(empty);
    expect((await runCli(['build', study, '--out', empty], root)).code).toBe(0);
    expect(existsSync(join(empty, 'index.html'))).toBe(true);
    expect((await runCli(['build', study, '--out', empty], root)).code).toBe(0);
    expect(await leftoversSettled('empty')).toEqual([]);
  }, 60_000);
});
