/**
 * Output that survives faults (issue 22). Hostile cases, each one clean: exit 1 with one message
 * naming what failed and a fix, and no stack trace, or a correct build; the previous site and
 * everything the user gave unchanged.
 *
 * - the swap: at every instant `--out` leads to the old site or the new one (a reader polling
 *   while builds run; a build killed with SIGKILL at every step of the swap, from every kind of
 *   previous output; real builds killed at points spread over their run); the next build removes
 *   what killed builds left.
 * - the site honours the umask; --out that is empty, the working, home, root, study or cache
 *   folder (or contains one) is refused even with --force.
 * - faults: a full disk (a small tmpfs, and ENOSPC injected into page writes), standard output
 *   on a full device, too few file descriptors (ulimit -n), a promise that never settles, a
 *   read-only or forbidden output folder; init under a file, on a link that leads nowhere, in
 *   a folder it may not write.
 *
 * Studies: subsets of the demo study (synthetic data). Tests that mount a tmpfs need root and
 * permission to mount; they fail when CI=true and cannot mount, and are skipped elsewhere.
 */
import { type ChildProcess, execFileSync, spawn, spawnSync } from 'node:child_process';
import { chmodSync, existsSync, lstatSync, mkdirSync, readFileSync, readdirSync, readlinkSync, rmSync, statSync, statfsSync, symlinkSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { OUTPUT_MARKER, VERSIONS_MARKER } from '../../src/pipeline/output.js';
import { CRASH, LAUNCHER, copyDemo, hashTree, tempRoot } from './helpers.js';

const root = tempRoot('output-faults');
// Other users (the permission cases run as user 65534) must reach the studies and the launcher.
chmodSync(root, 0o755);
const cache = join(root, 'cache');
const home = join(root, 'home');
mkdirSync(home);
/** The environment of every child: a cache and a home folder of this test's own. */
const ENV = { XDG_CACHE_HOME: cache, HOME: home, SOURCE_DATE_EPOCH: '1740787200', MYOFOLIO_DEBUG: '' };
const studyA = copyDemo(join(root, 'study-a'));
const studyB = copyDemo(join(root, 'study-b'), ['atpase-rates.csv', 'motility-velocities.csv']);
const INJECT = pathToFileURL(join(import.meta.dirname, 'fault-injection.mjs')).href;
const SWAP_CHILD = join(import.meta.dirname, 'swap-child.mjs');

/** Tally of the hostile cases, printed at the end (the figures of the closing note). */
const tally = { cases: 0, cleanErrors: 0, acceptances: 0, crashes: 0, damage: 0 };
afterAll(() => {
  console.log(`output faults: ${tally.cases} cases, ${tally.cleanErrors} clean errors, ${tally.acceptances} correct acceptances, ${tally.crashes} crashes, ${tally.damage} with damage`);
  rmSync(root, { recursive: true, force: true });
});

interface Run {
  code: number | null;
  signal: NodeJS.Signals | null;
  out: string;
  err: string;
}

/** The launcher in a child process, optionally behind a shell line (umask, ulimit) or as another user. */
function cli(argv: string[], options: { cwd?: string; env?: Record<string, string>; shell?: string; node?: string[]; uid?: number } = {}): Run {
  const node = [...(options.node ?? []), LAUNCHER, ...argv];
  const [cmd, args] = options.shell ? ['bash', ['-c', `${options.shell}; exec "$0" "$@"`, process.execPath, ...node]] : [process.execPath, node];
  const r = spawnSync(cmd, args as string[], {
    cwd: options.cwd ?? root,
    env: { ...process.env, ...ENV, ...options.env },
    encoding: 'utf8',
    timeout: 120_000,
    ...(options.uid !== undefined ? { uid: options.uid, gid: options.uid } : {}),
  });
  return { code: r.status, signal: r.signal, out: r.stdout ?? '', err: r.stderr ?? '' };
}

/** Count a case: a clean error (exit 1, one located message with a fix, no stack) or a correct acceptance. */
function clean(r: Run, message: RegExp): void {
  tally.cases++;
  const crashed = r.code !== 1 || CRASH.test(r.err) || CRASH.test(r.out);
  if (crashed) tally.crashes++;
  expect(r.code, r.out + r.err).toBe(1);
  expect(r.err).toMatch(message);
  expect(r.err).toMatch(/\n {2}fix: \S/);
  expect(r.err).not.toMatch(CRASH);
  expect(r.out).not.toMatch(CRASH);
  tally.cleanErrors++;
}

function accepted(r: Run): void {
  tally.cases++;
  if (r.code !== 0) tally.crashes++;
  expect(r.code, r.out + r.err).toBe(0);
  expect(r.err).not.toMatch(CRASH);
  tally.acceptances++;
}

/** Nothing damaged: `check` throws (and counts) when a tree differs from what it must be. */
function undamaged(got: unknown, want: unknown): void {
  try {
    expect(got).toEqual(want);
  } catch (err) {
    tally.damage++;
    throw err;
  }
}

/** What is next to an output link other than its versions folder, and in that folder other than its marker and the current version. */
function leftovers(out: string): string[] {
  const parent = join(out, '..');
  const base = relative(parent, out);
  let current = '';
  try {
    current = readlinkSync(out).split('/').pop() as string;
  } catch {
    // no link
  }
  const versions = `${out}.versions`;
  const inside = existsSync(versions) ? readdirSync(versions).filter((n) => n !== VERSIONS_MARKER && n !== current).map((n) => `${base}.versions/${n}`) : [];
  return [...readdirSync(parent).filter((n) => n.startsWith(`${base}.`) && n !== `${base}.versions`), ...inside];
}

/** leftovers() once a background removal of the previous version is done (polled up to 20 s). */
async function leftoversSettled(out: string): Promise<string[]> {
  for (let i = 0; i < 200 && leftovers(out).length > 0; i++) await new Promise((r) => setTimeout(r, 100));
  return leftovers(out);
}

/** The site at `out` as a tree of hashes, or 'absent'. */
function siteAt(out: string): Record<string, string> | 'absent' {
  return existsSync(out) ? hashTree(out) : 'absent';
}

let siteA: Record<string, string>;
let siteB: Record<string, string>;
const reference = join(root, 'reference');
mkdirSync(reference);

beforeAll(() => {
  accepted(cli(['build', studyA, '--out', join(reference, 'a')]));
  accepted(cli(['build', studyB, '--out', join(reference, 'b')]));
  siteA = hashTree(join(reference, 'a'));
  siteB = hashTree(join(reference, 'b'));
  expect(siteA).not.toEqual(siteB);
}, 180_000);

/** Can this process mount a tmpfs (root with the right capability)? */
function canMount(): boolean {
  const probe = join(root, 'mount-probe');
  mkdirSync(probe, { recursive: true });
  try {
    execFileSync('mount', ['-t', 'tmpfs', '-o', 'size=64k', 'tmpfs', probe], { stdio: 'ignore' });
    execFileSync('umount', [probe], { stdio: 'ignore' });
    return true;
  } catch {
    return false;
  }
}
const MOUNT = canMount();
const mounted: string[] = [];
afterAll(() => {
  for (const m of mounted.reverse()) spawnSync('umount', ['-l', m]);
});
function mountTmpfs(dir: string, options: string): void {
  mkdirSync(dir, { recursive: true });
  execFileSync('mount', ['-t', 'tmpfs', '-o', options, 'tmpfs', dir]);
  mounted.push(dir);
}
/** A test that needs a tmpfs: run where mounting works, fail under CI where it does not, skip elsewhere. */
const withMount = MOUNT || process.env.CI === 'true' ? it : it.skip;

describe('the swap: at every instant --out leads to the old site or the new one', () => {
  it('a reader polling --out while six builds alternate between two studies only ever sees one complete site or the other', async () => {
    const out = join(root, 'polled', 'site');
    mkdirSync(join(root, 'polled'));
    accepted(cli(['build', studyA, '--out', out]));
    const observations = { complete: 0, replacedWhileRead: 0, wrong: [] as string[], targets: new Set<string>() };
    for (let i = 0; i < 6; i++) {
      const study = i % 2 === 0 ? studyB : studyA;
      const child = spawn(process.execPath, [LAUNCHER, 'build', study, '--out', out], { cwd: root, env: { ...process.env, ...ENV }, stdio: 'ignore' });
      const exited = new Promise<number | null>((resolve) => child.on('exit', resolve));
      while (child.exitCode === null && child.signalCode === null) {
        let target: string;
        try {
          target = readlinkSync(out);
        } catch (err) {
          observations.wrong.push(`no link at --out: ${(err as Error).message}`);
          await new Promise((r) => setTimeout(r, 1));
          continue;
        }
        let tree: Record<string, string> | undefined;
        try {
          tree = hashTree(join(out, '..', target));
        } catch {
          tree = undefined;
        }
        if (tree && (JSON.stringify(tree) === JSON.stringify(siteA) || JSON.stringify(tree) === JSON.stringify(siteB))) {
          observations.complete++;
          observations.targets.add(target);
        } else if (readlinkSync(out) !== target) observations.replacedWhileRead++; // the old version went while it was read
        else observations.wrong.push(`${target}: ${tree ? 'another site' : 'unreadable'}`);
        await new Promise((r) => setImmediate(r));
      }
      expect(await exited).toBe(0);
      undamaged(hashTree(out), i % 2 === 0 ? siteB : siteA);
    }
    tally.cases++;
    expect(observations.wrong).toEqual([]);
    // The reader saw the link change (else it proved nothing).
    expect(observations.targets.size).toBeGreaterThanOrEqual(4);
    expect(observations.complete).toBeGreaterThan(20);
    expect(existsSync(join(out, OUTPUT_MARKER))).toBe(true);
    expect(existsSync(join(`${out}.versions`, VERSIONS_MARKER))).toBe(true);
    tally.acceptances++;
    expect(await leftoversSettled(out)).toEqual([]);
  }, 240_000);

  // The steps of src/pipeline/output.ts in order; 'content' is where the site's files are written.
  const STEPS = ['cleaned', 'versions folder', 'versions marker', 'version folder', 'version marker', 'content', 'link made', 'empty folder removed', 'old folder moved', 'foreign moved aside', 'swapped', 'previous removed'];
  const STARTS = ['a previous build (link)', 'nothing', 'an empty folder', 'an older myofolio site (folder)', "the user's folder, with --force"] as const;

  /** Prepare `out` in a fresh folder as the start says; returns the user's files that must survive. */
  function prepare(start: (typeof STARTS)[number], dir: string, out: string): Record<string, string> | undefined {
    mkdirSync(dir, { recursive: true });
    if (start === 'a previous build (link)') {
      const r = spawnSync(process.execPath, [SWAP_CHILD, studyA, out, join(reference, 'a'), '-', '-'], { cwd: dir, encoding: 'utf8' });
      expect(r.stdout, r.stderr).toBe('done\n');
    } else if (start === 'an empty folder') mkdirSync(out);
    else if (start === 'an older myofolio site (folder)') execFileSync('cp', ['-rL', join(reference, 'a'), out]);
    else if (start === "the user's folder, with --force") {
      mkdirSync(join(out, 'thesis'), { recursive: true });
      writeFileSync(join(out, 'thesis', 'chapter1.txt'), 'precious');
      return hashTree(out);
    }
    return undefined;
  }

  for (const start of STARTS) {
    it(`killed with SIGKILL at each step from ${start}: --out holds the old site or the new one, the user's files survive, and the next build cleans up`, () => {
      for (const step of STEPS) {
        const dir = join(root, 'kill', `${STARTS.indexOf(start)}-${step.replace(/\W+/g, '-')}`);
        const out = join(dir, 'site');
        const users = prepare(start, dir, out);
        const before = siteAt(out);
        const force = start === "the user's folder, with --force" ? 'force' : '-';
        const killed = spawnSync(process.execPath, [SWAP_CHILD, studyB, out, join(reference, 'b'), force, step], { cwd: dir, encoding: 'utf8' });
        tally.cases++;
        if (killed.signal !== 'SIGKILL') expect(killed.stdout, killed.stderr).toBe('done\n'); // a step this start does not pass
        const now = siteAt(out);
        // The one step where neither is there: what was at --out (an empty folder, the user's folder
        // with --force, or the site of an older myofolio, which kept its site in a plain folder) has
        // been moved away and the link is not yet in place. This happens once, at the change of layout.
        const gap = (step === 'old folder moved' || step === 'foreign moved aside' || step === 'empty folder removed') && now === 'absent';
        const ok = gap || JSON.stringify(now) === JSON.stringify(before) || JSON.stringify(now) === JSON.stringify(siteB);
        if (!ok) tally.damage++;
        expect(ok, `${start}, killed at ${step}: ${JSON.stringify(now).slice(0, 200)}`).toBe(true);
        // The user's folder is renamed aside whole, never deleted.
        const usersSafe = () => {
          if (!users) return;
          const aside = readdirSync(dir).filter((n) => n.startsWith('site.replaced-'));
          undamaged(hashTree(aside.length === 1 ? join(dir, aside[0] as string) : out), users);
        };
        usersSafe();
        // The next build: the new site in place, nothing left over but the user's folder moved aside.
        const next = spawnSync(process.execPath, [SWAP_CHILD, studyB, out, join(reference, 'b'), force, '-'], { cwd: dir, encoding: 'utf8' });
        expect(next.stdout, next.stderr).toBe('done\n');
        undamaged(hashTree(out), siteB);
        usersSafe();
        expect(leftovers(out).filter((n) => !n.startsWith('site.replaced-'))).toEqual([]);
        expect(lstatSync(out).isSymbolicLink()).toBe(true);
        tally.acceptances++;
      }
    }, 120_000);
  }

  it('real builds killed (SIGKILL, SIGTERM, SIGINT) at twelve points spread over their run leave one complete site, and the next build leaves nothing behind', async () => {
    const out = join(root, 'killed', 'site');
    mkdirSync(join(root, 'killed'));
    accepted(cli(['build', studyA, '--out', out]));
    // How long a build takes here: the kills are spread over it.
    const t0 = Date.now();
    accepted(cli(['build', studyA, '--out', out]));
    const span = Date.now() - t0;
    let cutShort = 0;
    let finished = 0;
    for (let i = 0; i < 12; i++) {
      const previous = hashTree(out);
      const child: ChildProcess = spawn(process.execPath, [LAUNCHER, 'build', i % 2 === 0 ? studyB : studyA, '--out', out], { cwd: root, env: { ...process.env, ...ENV }, stdio: 'ignore' });
      const exited = new Promise<void>((resolve) => child.on('exit', () => resolve()));
      await new Promise((r) => setTimeout(r, Math.round((span * (i + 0.5)) / 12)));
      child.kill(i % 4 === 1 ? 'SIGTERM' : i % 4 === 3 ? 'SIGINT' : 'SIGKILL');
      await exited;
      if (child.signalCode !== null) cutShort++;
      else finished++;
      tally.cases++;
      const now = hashTree(out);
      const ok = JSON.stringify(now) === JSON.stringify(previous) || JSON.stringify(now) === JSON.stringify(i % 2 === 0 ? siteB : siteA);
      if (!ok) tally.damage++;
      expect(ok, `kill ${i}`).toBe(true);
      tally.acceptances++;
    }
    // Most kills landed during a build (else this proved little).
    expect(cutShort).toBeGreaterThanOrEqual(6);
    accepted(cli(['build', studyA, '--out', out]));
    undamaged(hashTree(out), siteA);
    expect(await leftoversSettled(out)).toEqual([]);
    console.log(`real builds killed: ${cutShort} cut short, ${finished} finished first`);
  }, 300_000);
});

describe('a site that can be published', () => {
  /** Modes (permission bits) of every folder and file of the site and of its versions folder. */
  function modes(out: string): { dirs: Set<number>; files: Set<number> } {
    const dirs = new Set<number>();
    const files = new Set<number>();
    const walk = (d: string) => {
      dirs.add(statSync(d).mode & 0o777);
      for (const e of readdirSync(d, { withFileTypes: true })) {
        if (e.isDirectory()) walk(join(d, e.name));
        else files.add(lstatSync(join(d, e.name)).mode & 0o777);
      }
    };
    walk(`${out}.versions`);
    return { dirs, files };
  }

  it('under umask 022 every folder is 755 and every file 644 (readable by others); under 077 nothing is readable by others', () => {
    const open = join(root, 'umask', 'open');
    const closed = join(root, 'umask', 'closed');
    accepted(cli(['build', studyA, '--out', open], { shell: 'umask 022' }));
    accepted(cli(['build', studyA, '--out', closed], { shell: 'umask 077' }));
    expect(modes(open)).toEqual({ dirs: new Set([0o755]), files: new Set([0o644]) });
    expect(modes(closed)).toEqual({ dirs: new Set([0o700]), files: new Set([0o600]) });
    // Readable by another user through the link: user 65534 reads the front page.
    const r = spawnSync('cat', [join(open, 'index.html')], { uid: 65534, gid: 65534, encoding: 'utf8' });
    expect(r.status).toBe(0);
    expect(r.stdout).toContain('<html');
    undamaged(hashTree(open), siteA);
  }, 120_000);
});

describe('--out that must never be replaced is refused, even with --force', () => {
  const work = join(root, 'work');
  mkdirSync(join(work, 'notes'), { recursive: true });
  writeFileSync(join(work, 'notes', 'todo.txt'), 'mine');
  writeFileSync(join(home, 'profile.txt'), 'mine');
  const cases: Array<[string, string, RegExp]> = [
    ['empty', '', /No output folder was given \(--out is empty\)/],
    ['the working folder', '.', /is the working folder/],
    ['the working folder, absolute', work, /is the working folder/],
    ['a folder containing the working folder', '..', /contains (the working folder|the study folder)/],
    ['the root of the file system', '/', /is the root of the file system/],
    ['the home folder', home, /is your home folder/],
    ['the home folder through a link', join(work, 'link-to-home'), /is your home folder/],
    ['the study folder', studyA, /is inside the study folder/],
    ['inside the study folder', join(studyA, 'site'), /is inside the study folder/],
    ['the cache folder', join(cache, 'myofolio'), /is myofolio's cache folder/],
    ['a folder containing the cache folder', cache, /contains myofolio's cache folder/],
  ];
  beforeAll(() => {
    symlinkSync(home, join(work, 'link-to-home'));
    mkdirSync(join(cache, 'myofolio'), { recursive: true });
  });

  for (const [what, out, message] of cases) {
    it(`${what} (--out '${out}' --force): exit 1 with a message and fix; nothing changed`, () => {
      const before = { work: hashTree(work), home: hashTree(home), study: hashTree(studyA), rootList: readdirSync(root).sort(), workList: readdirSync(work).sort() };
      clean(cli(['build', studyA, '--out', out, '--force'], { cwd: work }), message);
      undamaged({ work: hashTree(work), home: hashTree(home), study: hashTree(studyA), rootList: readdirSync(root).sort(), workList: readdirSync(work).sort() }, before);
      expect(existsSync('/.versions')).toBe(false);
    }, 60_000);
  }

  it("a folder inside another output's versions folder, and a foreign folder where the versions folder goes: refused", () => {
    const out = join(root, 'nested', 'site');
    accepted(cli(['build', studyA, '--out', out]));
    const version = readlinkSync(out);
    clean(cli(['build', studyB, '--out', join(out, 'inner'), '--force']), /inside .*site\.versions, where myofolio keeps the versions of another output's site/);
    clean(cli(['build', studyB, '--out', join(root, 'nested', version), '--force']), /where myofolio keeps the versions/);
    const mine = join(root, 'nested', 'mine');
    mkdirSync(`${mine}.versions`);
    writeFileSync(join(`${mine}.versions`, 'data.txt'), 'mine');
    clean(cli(['build', studyB, '--out', mine, '--force']), /mine\.versions exists and was not made by myofolio/);
    expect(readFileSync(join(`${mine}.versions`, 'data.txt'), 'utf8')).toBe('mine');
    undamaged(hashTree(out), siteA);
  }, 60_000);

  withMount('a mount point holding other files is not moved aside, even with --force', () => {
    const point = join(root, 'mounted', 'point');
    mountTmpfs(point, 'size=1m');
    writeFileSync(join(point, 'data.txt'), 'mine');
    clean(cli(['build', studyA, '--out', point, '--force']), /is a top-level folder or a mount point/);
    expect(readFileSync(join(point, 'data.txt'), 'utf8')).toBe('mine');
  }, 60_000);
});

describe('faults of the machine', () => {
  withMount('a full disk (tmpfs): exit 1 saying the disk is full; the previous site unchanged; after space is freed the next build succeeds and leaves nothing behind', async () => {
    const disk = join(root, 'disk');
    // Room for two sites and some: the next build writes its version beside the previous one.
    const bytes = (dir: string) => Number(execFileSync('du', ['-sbL', dir], { encoding: 'utf8' }).split('\t')[0]);
    const sizeA = bytes(join(reference, 'a'));
    const sizeB = bytes(join(reference, 'b'));
    mountTmpfs(disk, `size=${Math.ceil((2.5 * Math.max(sizeA, sizeB)) / 2 ** 20) + 4}m`);
    const out = join(disk, 'site');
    accepted(cli(['build', studyA, '--out', out]));
    // Free space left for the second build, from none to nearly enough: each level fails at another write.
    for (const free of [0, 64 * 1024, 512 * 1024, Math.round(sizeB / 2), sizeB - 256 * 1024]) {
      const filler = join(disk, 'filler');
      rmSync(filler, { force: true });
      const { bavail, bsize } = statfsSync(disk);
      const fill = Math.max(0, bavail * bsize - free);
      writeFileSync(filler, Buffer.alloc(0));
      // fallocate would be quicker; a plain write also works on every tmpfs.
      const chunk = Buffer.alloc(2 ** 20);
      for (let left = fill; left > 0; left -= chunk.length) {
        try {
          writeFileSync(filler, left >= chunk.length ? chunk : chunk.subarray(0, left), { flag: 'a' });
        } catch {
          break; // the disk is full
        }
      }
      const r = cli(['build', studyB, '--out', out]);
      if (r.code === 0) {
        accepted(r);
        undamaged(hashTree(out), siteB);
      } else {
        clean(r, /The disk is full: no space left on the device holding .*\. Nothing was built; the previous output, if any, is unchanged\./);
        undamaged(hashTree(out), siteA);
      }
      expect(await leftoversSettled(out)).toEqual([]);
      rmSync(filler);
      accepted(cli(['build', studyA, '--out', out]));
      undamaged(hashTree(out), siteA);
    }
    expect(tally.cleanErrors).toBeGreaterThan(0);
  }, 300_000);

  withMount('a full disk under the cache folder only: the build succeeds and equals a build without cache', () => {
    const disk = join(root, 'cache-disk');
    mountTmpfs(disk, 'size=32k');
    writeFileSync(join(disk, 'filler'), Buffer.alloc(0));
    try {
      writeFileSync(join(disk, 'filler'), Buffer.alloc(64 * 1024));
    } catch {
      // full
    }
    const out = join(root, 'cache-full-site');
    accepted(cli(['build', studyA, '--out', out], { env: { XDG_CACHE_HOME: disk } }));
    undamaged(hashTree(out), siteA);
  }, 60_000);

  it('a disk that fills while pages are written (ENOSPC injected after 0, 3 and 10 pages): exit 1 saying the disk is full; the previous site unchanged', async () => {
    const out = join(root, 'injected', 'site');
    mkdirSync(join(root, 'injected'));
    accepted(cli(['build', studyA, '--out', out]));
    for (const after of [0, 3, 10]) {
      clean(cli(['build', studyB, '--out', out], { node: ['--import', INJECT], env: { MYOFOLIO_TEST_FAULT: `enospc:${after}` } }), /The disk is full: no space left on the device holding the output folder .*site\. Nothing was built; the previous output, if any, is unchanged\./);
      undamaged(hashTree(out), siteA);
      expect(leftovers(out)).toEqual([]);
    }
  }, 120_000);

  it('standard output on a full device (> /dev/full): exit 1 with one line on standard error; the site is built', () => {
    const out = join(root, 'devfull-site');
    const r = spawnSync('bash', ['-c', 'exec "$0" "$@" > /dev/full', process.execPath, LAUNCHER, 'build', studyA, '--out', out], { env: { ...process.env, ...ENV }, encoding: 'utf8', timeout: 120_000 });
    tally.cases++;
    expect(r.status).toBe(1);
    expect(r.stderr).toBe('myofolio build: cannot write to standard output: the disk is full: no space left on the device holding standard output.\n');
    undamaged(hashTree(out), siteA);
    tally.cleanErrors++;
  }, 120_000);

  it('too few file descriptors (ulimit -n 64, 32, 100): exit 1 naming the limit and how to raise it; the previous site unchanged', () => {
    const out = join(root, 'fd', 'site');
    mkdirSync(join(root, 'fd'));
    accepted(cli(['build', studyA, '--out', out]));
    for (const n of [64, 32, 100]) {
      const r = cli(['build', studyB, '--out', out], { shell: `ulimit -n ${n}` });
      if (r.code === 0) {
        accepted(r);
        undamaged(hashTree(out), siteB);
        continue;
      }
      clean(r, new RegExp(`Too many open files: this process may open only ${n} files at once \\(ulimit -n\\)[^]*fix: Raise the limit in this shell, e\\.g\\. 'ulimit -n 4096'`));
      undamaged(hashTree(out), siteA);
    }
    // check and init too, with a limit below what they need.
    clean(cli(['check', studyA], { shell: 'ulimit -n 20' }), /myofolio check: Too many open files: this process may open only 20 files/);
    clean(cli(['init', join(root, 'fd', 'new-study')], { shell: 'ulimit -n 20' }), /myofolio init: Too many open files/);
  }, 180_000);

  it('a promise that never settles (the writing of chart files injected to hang): exit 1 with a message, not exit 13; the previous site unchanged; the next build cleans up', async () => {
    const out = join(root, 'hang', 'site');
    mkdirSync(join(root, 'hang'));
    accepted(cli(['build', studyA, '--out', out]));
    const r = cli(['build', studyB, '--out', out], { node: ['--import', INJECT], env: { MYOFOLIO_TEST_FAULT: 'never' } });
    tally.cases++;
    expect(r.code, r.err).toBe(1);
    expect(r.err).toBe('myofolio build: stopped before it finished: an operation it waited for never completed. The previous output, if any, is unchanged. Please report this.\n');
    tally.cleanErrors++;
    undamaged(hashTree(out), siteA);
    expect(leftovers(out)).toHaveLength(1); // the unfinished version, removed by the next build
    accepted(cli(['build', studyB, '--out', out]));
    undamaged(hashTree(out), siteB);
    expect(await leftoversSettled(out)).toEqual([]);
  }, 120_000);

  it('an output folder in a folder the user may not write (as user 65534): exit 1 naming it; nothing written', () => {
    const locked = join(root, 'locked');
    mkdirSync(locked);
    chmodSync(locked, 0o555);
    const userCache = join(root, 'user-cache');
    mkdirSync(userCache);
    chmodSync(userCache, 0o777);
    clean(cli(['build', studyA, '--out', join(locked, 'site')], { uid: 65534, env: { XDG_CACHE_HOME: userCache, HOME: userCache } }), /Permission denied: you may not write or read .*locked\/site\.versions/);
    expect(readdirSync(locked)).toEqual([]);
  }, 60_000);

  withMount('an output folder on a read-only file system: exit 1 saying so; nothing written', () => {
    const ro = join(root, 'read-only');
    mountTmpfs(ro, 'size=1m,ro');
    clean(cli(['build', studyA, '--out', join(ro, 'site')]), /The file system holding .*read-only\/site\.versions is read-only\./);
    expect(readdirSync(ro)).toEqual([]);
  }, 60_000);
});

describe('init where it cannot write', () => {
  it('under a file: exit 1 naming the file; the file unchanged', () => {
    const file = join(root, 'init-file');
    writeFileSync(file, 'mine');
    clean(cli(['init', join(file, 'study')]), /myofolio init: cannot write the starter study to '.*init-file\/study': a part of the path is a file, not a folder\. Nothing was left behind/);
    expect(readFileSync(file, 'utf8')).toBe('mine');
  });

  it('on a symbolic link that leads nowhere: exit 1 naming the link and its target; nothing made', () => {
    const link = join(root, 'init-dangling');
    symlinkSync(join(root, 'nowhere'), link);
    clean(cli(['init', link]), /myofolio init: '.*init-dangling' is a symbolic link to '.*nowhere', which does not exist\.\n  fix: remove the link/);
    expect(existsSync(join(root, 'nowhere'))).toBe(false);
  });

  it('in a read-only parent (as user 65534): exit 1 naming the folder; nothing made', () => {
    const parent = join(root, 'init-locked');
    mkdirSync(parent);
    chmodSync(parent, 0o555);
    clean(cli(['init', join(parent, 'study')], { uid: 65534 }), /myofolio init: cannot write the starter study to '.*init-locked\/study': permission denied\. Nothing was left behind/);
    expect(readdirSync(parent)).toEqual([]);
  });

  withMount('on a read-only file system: exit 1 saying so; nothing made', () => {
    const ro = join(root, 'init-ro');
    mountTmpfs(ro, 'size=64k,ro');
    clean(cli(['init', join(ro, 'study')]), /myofolio init: cannot write the starter study to '.*init-ro\/study': the file system is read-only\. Nothing was left behind/);
    expect(readdirSync(ro)).toEqual([]);
  });
});
