/**
 * The store serves only what it stored under that very key: edits that leave valid content (a
 * cached chart's "increased" made "decreased", one digit of a fitted value changed), an entry
 * copied over another key's, a header rewritten to match edited bytes, special files (a link to
 * /dev/zero, a device node, a FIFO), a huge file and an unreadable entry are all discarded with
 * one note and computed again; the build then equals a cold build, and never hangs or throws.
 * Study: three files of the demo study (synthetic data).
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { chmodSync, closeSync, existsSync, mkdirSync, mkdtempSync, openSync, readFileSync, readdirSync, rmSync, symlinkSync, truncateSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { deserialize, serialize } from 'node:v8';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildStudy } from '../../src/pipeline/build-study.js';
import { Store } from '../../src/pipeline/store.js';
import { REPO, copyDemo, hashTree } from '../robustness/helpers.js';

const root = mkdtempSync(join(tmpdir(), 'myofolio-store-verify-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));
const study = copyDemo(join(root, 'study'));

async function build(store: string | false, out: string) {
  const outcome = await buildStudy(study, out, { store, sourceDateEpoch: 1_740_787_200, fingerprint: 'test' });
  expect(outcome.ok).toBe(true);
  return { tree: hashTree(out), outcome };
}

/** Entry files of a store, by kind. */
function entries(store: string): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const kind of readdirSync(store, { withFileTypes: true }).filter((e) => e.isDirectory())) {
    out[kind.name] = (readdirSync(join(store, kind.name), { recursive: true, encoding: 'utf8' }) as string[]).filter((f) => /^[0-9a-f]\/[0-9a-f]{64}$/.test(f)).map((f) => join(store, kind.name, f));
  }
  return out;
}

/** An entry's header line and payload. */
function split(file: string): { header: string; payload: Buffer } {
  const bytes = readFileSync(file);
  const end = bytes.indexOf(0x0a);
  return { header: bytes.subarray(0, end).toString('ascii'), payload: bytes.subarray(end + 1) };
}

let cold: Awaited<ReturnType<typeof build>>;
const storeOf = (name: string) => join(root, `store-${name}`);

/** A fresh store filled by one build, then damaged by `damage`; returns the next build and how many entries were damaged. */
async function damagedBuild(name: string, damage: (all: Record<string, string[]>) => number) {
  const store = storeOf(name);
  await build(store, join(root, `first-${name}`));
  const count = damage(entries(store));
  expect(count).toBeGreaterThan(0);
  const again = await build(store, join(root, `out-${name}`));
  return { again, count, store };
}

beforeAll(async () => {
  cold = await build(false, join(root, 'cold'));
}, 120_000);

describe('entries edited to other valid content are never served', () => {
  it('every cached chart saying "increased" edited to "decreased" (same length, header kept): discarded, the build equals a cold build', async () => {
    const { again, count } = await damagedBuild('words', (all) => {
      let n = 0;
      for (const f of [...(all.svg ?? []), ...(all.block ?? [])]) {
        const text = readFileSync(f, 'latin1');
        if (!text.includes('increased')) continue;
        writeFileSync(f, text.replaceAll('increased', 'decreased'), 'latin1');
        n++;
      }
      return n;
    });
    expect(again.tree).toEqual(cold.tree);
    expect(again.outcome.notes).toEqual([`${count} damaged cache ${count === 1 ? 'entry was' : 'entries were'} discarded and computed again (cache folder ${storeOf('words')}).`]);
  }, 120_000);

  it('one digit of a fitted value changed in every stored unit entry, with a header whose plain SHA-256 matches the new bytes: discarded', async () => {
    const { again, count } = await damagedBuild('digit', (all) => {
      let n = 0;
      for (const f of all.units ?? []) {
        const { header, payload } = split(f);
        const entry = deserialize(payload) as { units: Array<{ metrics: Record<string, number | null> }>; digests: string[] };
        const unit = entry.units.find((u) => Object.values(u.metrics).some((v) => typeof v === 'number' && v !== 0));
        if (!unit) continue;
        const [metric, value] = Object.entries(unit.metrics).find(([, v]) => typeof v === 'number' && v !== 0) as [string, number];
        // One digit of its decimal form changed (the first one that is not 9 becomes one more).
        const text = String(value);
        const at = [...text].findIndex((c) => /[0-8]/.test(c));
        unit.metrics[metric] = Number(text.slice(0, at) + String(Number(text[at]) + 1) + text.slice(at + 1));
        const edited = serialize(entry);
        // Someone "fixing" the header: the SHA-256 of the new payload alone, and its length.
        const [magic, format] = header.split(' ');
        writeFileSync(f, Buffer.concat([Buffer.from(`${magic} ${format} ${createHash('sha256').update(edited).digest('hex')} ${edited.byteLength}\n`), edited]));
        n++;
      }
      return n;
    });
    expect(again.tree).toEqual(cold.tree);
    expect(again.outcome.notes[0]).toMatch(new RegExp(`^${count} damaged cache entr(y was|ies were) discarded`));
  }, 120_000);

  it("valid entries copied over other keys' entries of the same kind (every SVG shifted by one): discarded, the build equals a cold build", async () => {
    const { again, count } = await damagedBuild('swapped', (all) => {
      const svgs = all.svg ?? [];
      const bytes = svgs.map((f) => readFileSync(f));
      svgs.forEach((f, i) => writeFileSync(f, bytes[(i + 1) % svgs.length] as Buffer));
      return svgs.length;
    });
    expect(again.tree).toEqual(cold.tree);
    expect(again.outcome.notes[0]).toMatch(new RegExp(`^${count} damaged cache entries were discarded`));
  }, 120_000);
});

describe('special, huge and unreadable entries are discarded without hanging', () => {
  it('links to /dev/zero, a /dev/zero device node (where mknod is allowed), FIFOs and 4 GB sparse files in place of entries: the build equals a cold build', async () => {
    let mknod = true;
    const { again, count } = await damagedBuild('special', (all) => {
      const files = Object.values(all).flat();
      files.forEach((f, i) => {
        rmSync(f);
        if (i % 4 === 0) symlinkSync('/dev/zero', f);
        else if (i % 4 === 1) {
          try {
            execFileSync('mknod', [f, 'c', '1', '5'], { stdio: 'ignore' });
          } catch {
            mknod = false;
            symlinkSync('/dev/zero', f);
          }
        } else if (i % 4 === 2) execFileSync('mkfifo', [f]);
        else {
          closeSync(openSync(f, 'w'));
          truncateSync(f, 4 * 2 ** 30);
        }
      });
      return files.length;
    });
    expect(again.tree).toEqual(cold.tree);
    expect(again.outcome.notes[0]).toMatch(new RegExp(`^${count} damaged cache entries were discarded`));
    if (!mknod) console.warn('store-verify: mknod not allowed here; device nodes were tested as links to /dev/zero');
  }, 120_000);

  it('an unreadable entry (mode 000, read by a user other than root) is discarded and made again', () => {
    // Root reads every file, so the store is used by a child process running as user 65534 (nobody).
    const dir = join(root, 'unreadable');
    mkdirSync(dir);
    chmodSync(root, 0o755);
    chmodSync(dir, 0o777);
    const script = join(dir, 'use-store.mjs');
    writeFileSync(
      script,
      `import { Store } from ${JSON.stringify(join(REPO, 'dist/pipeline/store.js'))};
const store = new Store(${JSON.stringify(join(dir, 'store'))}, 'f');
const key = store.key('svg', 1);
if (process.argv[2] === 'put') store.put('svg', key, '<svg>1</svg>');
else {
  const got = store.get('svg', key);
  store.put('svg', key, '<svg>1</svg>');
  console.log(JSON.stringify({ got: got?.toString() ?? null, discarded: store.counts.discarded.length, again: store.get('svg', key)?.toString() ?? null }));
}
`,
    );
    const asUser = process.getuid?.() === 0 ? { uid: 65534, gid: 65534 } : {};
    const run = (what: string) => spawnSync(process.execPath, [script, what], { encoding: 'utf8', ...asUser, timeout: 30_000 });
    expect(run('put').status).toBe(0);
    const entry = Object.values(entries(join(dir, 'store'))).flat()[0] as string;
    chmodSync(entry, 0o000);
    const r = run('get');
    expect(r.status, r.stderr).toBe(0);
    expect(JSON.parse(r.stdout)).toEqual({ got: null, discarded: 1, again: '<svg>1</svg>' });
  });

  it('the store folder is readable by its owner only; a folder that belongs to another user is not used, with a note', async () => {
    const store = join(root, 'private');
    new Store(store, 'f').put('svg', 'k'.repeat(64), 'x');
    expect(execFileSync('stat', ['-c', '%a', store], { encoding: 'utf8' }).trim()).toBe('700');
    const theirs = join(root, 'theirs-store');
    mkdirSync(theirs);
    execFileSync('chown', ['65534:65534', theirs]);
    const outcome = await buildStudy(study, join(root, 'out-theirs'), { store: theirs, sourceDateEpoch: 1_740_787_200, fingerprint: 'test' });
    expect(outcome.ok).toBe(true);
    expect(outcome.notes).toEqual([`the cache folder ${theirs} belongs to another user; this build uses no cache.`]);
    expect(readdirSync(theirs)).toEqual([]);
    expect(hashTree(join(root, 'out-theirs'))).toEqual(cold.tree);
  }, 60_000);

  it('a file where the store folder should be: no cache, with a note, and the build equals a cold build', async () => {
    const file = join(root, 'store-is-a-file');
    writeFileSync(file, 'mine');
    const outcome = await buildStudy(study, join(root, 'out-file-store'), { store: file, sourceDateEpoch: 1_740_787_200, fingerprint: 'test' });
    expect(outcome.notes).toEqual([`the cache folder ${file} is not a folder; this build uses no cache.`]);
    expect(readFileSync(file, 'utf8')).toBe('mine');
    expect(hashTree(join(root, 'out-file-store'))).toEqual(cold.tree);
  }, 60_000);
});

describe('the store is never inside the study or the output folder', () => {
  it('a store asked for inside the study folder is not used: the default folder is, with a note saying which, and the study is unchanged', async () => {
    const before = hashTree(study);
    const home = join(root, 'home');
    mkdirSync(home);
    const inside = join(study, '.cache', 'myofolio');
    const prevHome = process.env.HOME;
    const prevXdg = process.env.XDG_CACHE_HOME;
    process.env.HOME = home;
    process.env.XDG_CACHE_HOME = join(study, '.cache');
    try {
      // Through XDG_CACHE_HOME (the default) and as an explicit folder.
      const viaEnv = await buildStudy(study, join(root, 'out-env'), { sourceDateEpoch: 1_740_787_200, fingerprint: 'test' });
      const viaOption = await buildStudy(study, join(root, 'out-option'), { store: inside, sourceDateEpoch: 1_740_787_200, fingerprint: 'test' });
      // os.homedir() reads HOME: the fallback is under the home folder given here.
      const fallback = join(home, '.cache', 'myofolio');
      expect(viaEnv.notes).toEqual([`the cache folder ${inside} (from XDG_CACHE_HOME) is inside the study folder, which myofolio never writes into; the cache folder ${fallback} is used instead.`]);
      expect(viaOption.notes).toEqual([`the cache folder ${inside} is inside the study folder, which myofolio never writes into; the cache folder ${fallback} is used instead.`]);
      expect(existsSync(join(fallback, 'svg'))).toBe(true);
      expect(hashTree(join(root, 'out-env'))).toEqual(cold.tree);
      // A relative XDG_CACHE_HOME is ignored, as the XDG spec says, and the note says so.
      process.env.XDG_CACHE_HOME = 'relative/cache';
      const relative = await buildStudy(study, join(root, 'out-relative'), { sourceDateEpoch: 1_740_787_200, fingerprint: 'test' });
      expect(relative.notes).toEqual([`XDG_CACHE_HOME is a relative path (relative/cache), which the XDG Base Directory spec says to ignore; the cache folder is ${fallback}.`]);
      // A home folder inside the study: the fallback is inside too, so no cache at all.
      process.env.HOME = join(study, 'home');
      process.env.XDG_CACHE_HOME = join(study, 'xdg');
      const none = await buildStudy(study, join(root, 'out-none'), { sourceDateEpoch: 1_740_787_200, fingerprint: 'test' });
      expect(none.notes).toEqual([`the cache folder ${join(study, 'xdg', 'myofolio')} (from XDG_CACHE_HOME) is inside the study folder, which myofolio never writes into; this build uses no cache.`]);
      expect(hashTree(join(root, 'out-none'))).toEqual(cold.tree);
    } finally {
      process.env.HOME = prevHome;
      if (prevXdg === undefined) delete process.env.XDG_CACHE_HOME;
      else process.env.XDG_CACHE_HOME = prevXdg;
    }
    expect(hashTree(study)).toEqual(before);
    // Nothing made in the study folder, not even an empty folder.
    expect(readdirSync(study).sort()).toEqual(Object.keys(before).sort());
  }, 120_000);

  it('a store asked for inside the output folder (which the next build replaces) is moved to the default, with a note', async () => {
    const out = join(root, 'out-holding-store');
    const prevHome = process.env.HOME;
    process.env.HOME = join(root, 'home2');
    try {
      const outcome = await buildStudy(study, out, { store: join(out, 'cache'), sourceDateEpoch: 1_740_787_200, fingerprint: 'test' });
      expect(outcome.notes).toEqual([`the cache folder ${join(out, 'cache')} is inside the output folder, which the next build replaces; the cache folder ${join(root, 'home2', '.cache', 'myofolio')} is used instead.`]);
      expect(hashTree(out)).toEqual(cold.tree);
    } finally {
      process.env.HOME = prevHome;
    }
  }, 60_000);
});
