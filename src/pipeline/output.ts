/**
 * Safe output. The output folder `--out <parent>/<name>` is a symbolic link to a complete site:
 *
 *   <parent>/<name>             → <name>.versions/<id>   (a relative link)
 *   <parent>/<name>.versions/   .myofolio-versions (marks the folder as myofolio's)
 *                               <id>/   one complete site, with .myofolio-output   (<id>: <pid>-<8 hex>)
 *
 * A build writes a new <id> folder, makes a link to it under a temporary name in the versions
 * folder (link-<pid>-<8 hex>) and renames that link onto <name>. rename(2) replaces the old link
 * in one step, so at every instant <name> leads to the old site or to the new one, whenever the
 * build fails or is killed (kill -9 included). The old version is removed after the swap. What a
 * killed build leaves (a half-written <id>, a temporary link, an old version whose removal was cut
 * short) is named by the build's process id; the next build removes it once that process is gone.
 *
 * Folders and files are created with the default modes (0777 and 0666) less the umask, so a site
 * built under umask 022 is readable by everyone, and one built under 077 only by its owner.
 *
 * Where a build may write: never the study folder or inside it, the working folder, the home
 * folder, the file system root, myofolio's cache folder or a folder that contains any of these,
 * not even with --force. A non-empty folder myofolio did not make (or a link it did not make) is
 * replaced only with --force, and then renamed aside (<name>.replaced-<8 hex>), never deleted.
 * A folder left by an older myofolio (a real folder carrying .myofolio-output) is replaced by the
 * link; that one change of layout is the only swap made of two renames.
 */
import { spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { chmodSync, lstatSync, mkdirSync, readdirSync, readlinkSync, realpathSync, renameSync, rmSync, rmdirSync, statSync, symlinkSync, writeFileSync } from 'node:fs';
import { homedir } from 'node:os';
import path from 'node:path';
import { makeFolders } from './folders.js';

/** File that marks a folder as one myofolio site (safe to replace on the next build). */
export const OUTPUT_MARKER = '.myofolio-output';
/** File that marks the folder of site versions next to an output link. */
export const VERSIONS_MARKER = '.myofolio-versions';
/** Suffix of the versions folder's name: `<name>.versions`. */
export const VERSIONS_SUFFIX = '.versions';

const VERSION_NAME = /^(\d+)-[0-9a-f]{8}$/;
const LINK_NAME = /^link-(\d+)-[0-9a-f]{8}$/;

export class OutputError extends Error {
  constructor(message: string, readonly fix: string) {
    super(message);
  }
}

function isInside(child: string, parent: string): boolean {
  const rel = path.relative(parent, child);
  return rel === '' || (!rel.startsWith('..') && !path.isAbsolute(rel));
}

/** The real path of `p` (symbolic links resolved) even when its last parts do not exist yet. */
export function realPath(p: string): string {
  const abs = path.resolve(p);
  const rest: string[] = [];
  let cur = abs;
  for (;;) {
    try {
      return path.join(realpathSync(cur), ...rest.reverse());
    } catch {
      const parent = path.dirname(cur);
      if (parent === cur) return abs;
      rest.push(path.basename(cur));
      cur = parent;
    }
  }
}

/** Where `p` itself is: its folder's real path and its own name (a link at `p` is not followed). */
function placeOf(p: string): string {
  const abs = path.resolve(p);
  return abs === path.parse(abs).root ? abs : path.join(realPath(path.dirname(abs)), path.basename(abs));
}

function lstatOrUndefined(p: string) {
  try {
    return lstatSync(p);
  } catch {
    return undefined;
  }
}

function hasFile(dir: string, name: string): boolean {
  return lstatOrUndefined(path.join(dir, name))?.isFile() ?? false;
}

function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}

const hex8 = () => randomBytes(4).toString('hex');

/** What is at the output path before the build. */
export type Existing = 'none' | 'link' | 'empty' | 'legacy' | 'foreign';

export interface OutputPlan {
  /** The output path (absolute), where the link goes. */
  out: string;
  /** The versions folder next to it. */
  versions: string;
  existing: Existing;
  /**
   * A plain folder written in place, without a link or versions (the study sites inside an
   * archive's own version, which the archive build swaps as a whole): `out` must not exist.
   */
  plain?: boolean;
}

export interface PlanOptions {
  /** The working folder (refused as output); default process.cwd(). */
  cwd?: string;
  /** The home folder (refused as output); default os.homedir(). */
  home?: string;
  /** Other folders the output may neither be nor contain, with how to name them (e.g. the cache folder). */
  protect?: ReadonlyArray<{ dir: string; name: string }>;
  /** Write a plain folder in place (see OutputPlan.plain). */
  plain?: boolean;
}

/** The versions folder of an output path. */
export function versionsOf(out: string): string {
  return `${out}${VERSIONS_SUFFIX}`;
}

/** Is this link ours: does it lead to a version in the versions folder next to it? */
function ourLink(out: string): boolean {
  try {
    const target = readlinkSync(out);
    const [dir, name, ...rest] = target.split('/');
    return rest.length === 0 && dir === path.basename(versionsOf(out)) && VERSION_NAME.test(name ?? '');
  } catch {
    return false;
  }
}

/** Check where the output may go, before anything is written. */
export function planOutput(studyDir: string, outDir: string, force: boolean, options: PlanOptions = {}): OutputPlan {
  if (outDir.trim() === '') throw new OutputError('No output folder was given (--out is empty).', 'Name a new folder, e.g. --out _site.');
  const out = path.resolve(outDir);
  const place = placeOf(out);
  const study = path.resolve(studyDir);
  if (place === path.parse(place).root) {
    throw new OutputError(`The output folder ${outDir} is the root of the file system.`, 'Choose a new folder for the site, e.g. --out _site; --force does not change this.');
  }
  // Compare real paths too, so a link cannot lead the output into the study folder.
  if (isInside(out, study) || isInside(place, realPath(study))) {
    throw new OutputError(`The output folder ${outDir} is inside the study folder ${studyDir}.`, 'Choose an output folder outside the study folder, e.g. --out _site; myofolio never writes into a study folder.');
  }
  if (isInside(study, out) || isInside(realPath(study), place)) {
    throw new OutputError(`The output folder ${outDir} contains the study folder ${studyDir}.`, 'Choose an output folder that does not contain the study, e.g. --out _site.');
  }
  const guarded = [
    { dir: options.cwd ?? process.cwd(), name: 'the working folder' },
    { dir: options.home ?? homedir(), name: 'your home folder' },
    ...(options.protect ?? []),
  ];
  // Where a link at `out` leads (itself when it is no link): a link to a guarded folder is refused too.
  const target = realPath(out);
  for (const { dir, name } of guarded) {
    if (!dir) continue;
    const real = realPath(dir);
    if (out === path.resolve(dir) || place === real || target === real) throw new OutputError(`The output folder ${outDir || "''"} is ${name}.`, 'Choose a new folder for the site, e.g. --out _site; --force does not change this.');
    if (isInside(path.resolve(dir), out) || isInside(real, place)) throw new OutputError(`The output folder ${outDir} contains ${name} (${dir}).`, 'Choose a new folder for the site, e.g. --out _site; --force does not change this.');
  }
  if (options.plain) {
    if (lstatOrUndefined(out)) throw new OutputError(`${outDir} already exists.`, 'Build into a new folder.');
    return { out, versions: versionsOf(out), existing: 'none', plain: true };
  }
  // Not inside (or the same as) another output's versions folder.
  for (let dir = place; ; dir = path.dirname(dir)) {
    if (hasFile(dir, VERSIONS_MARKER)) throw new OutputError(`The output folder ${outDir} is inside ${dir}, where myofolio keeps the versions of another output's site.`, 'Choose a folder outside it, e.g. --out _site.');
    if (dir === path.dirname(dir)) break;
  }
  const versions = versionsOf(out);
  const v = lstatOrUndefined(versions);
  if (v && !(v.isDirectory() && (hasFile(versions, VERSIONS_MARKER) || readdirSync(versions).length === 0))) {
    throw new OutputError(`${versions} exists and was not made by myofolio; a build keeps its site versions there.`, 'Move or rename it, or choose another --out.');
  }
  const st = lstatOrUndefined(out);
  if (!st) return { out, versions, existing: 'none' };
  if (st.isSymbolicLink()) {
    if (ourLink(out)) return { out, versions, existing: 'link' };
    if (!force) throw new OutputError(`The output path ${outDir} is a symbolic link that myofolio did not make.`, 'Choose another --out path, or add --force to rename the link aside (what it leads to is not touched).');
    return { out, versions, existing: 'foreign' };
  }
  if (!st.isDirectory()) {
    throw new OutputError(`The output path ${outDir} exists and is not a folder.`, 'Choose another --out path, or remove that file yourself.');
  }
  const entries = readdirSync(out);
  if (entries.length === 0) return { out, versions, existing: 'empty' };
  if (entries.includes(OUTPUT_MARKER)) return { out, versions, existing: 'legacy' };
  if (!force) {
    throw new OutputError(`The output folder ${outDir} is not empty and was not made by myofolio.`, 'Choose a new or empty folder, or add --force to move the existing folder aside (it is renamed, never deleted).');
  }
  if (path.dirname(place) === path.parse(place).root || st.dev !== statSync(path.dirname(out)).dev) {
    throw new OutputError(`The output folder ${outDir} is a top-level folder or a mount point, which myofolio does not move aside.`, 'Choose a new folder for the site, e.g. --out _site; --force does not change this.');
  }
  return { out, versions, existing: 'foreign' };
}

/** Called between the steps of making and swapping a version (the kill tests stop the process there). */
export type StepHook = (step: string) => void;

/**
 * Remove what builds that were killed left next to `out`: in its versions folder, version folders
 * and temporary links named after a process that is gone, except the version `out` leads to;
 * and the staging folders of older myofolio versions (`<out>.building-<pid>-*`, `.previous-`,
 * `.preparing-`, only with the output marker, or empty for `.preparing-`). Anything else is left
 * alone. Returns what was removed.
 */
export function cleanStale(out: string): string[] {
  const removed: string[] = [];
  const remove = (full: string) => {
    try {
      rmSync(full, { recursive: true, force: true });
      removed.push(full);
    } catch {
      // still being removed by the build that left it (background removal), or not ours to remove
    }
  };
  const gone = (pid: number) => pid !== process.pid && !processAlive(pid);
  const versions = versionsOf(out);
  if (hasFile(versions, VERSIONS_MARKER)) {
    let current: string | undefined;
    try {
      current = path.basename(readlinkSync(out));
    } catch {
      // no link: every version is stale
    }
    let names: string[] = [];
    try {
      names = readdirSync(versions);
    } catch {
      // nothing to clean
    }
    for (const name of names) {
      const full = path.join(versions, name);
      const version = VERSION_NAME.exec(name);
      const link = LINK_NAME.exec(name);
      const st = lstatOrUndefined(full);
      if (version && name !== current && st?.isDirectory() && gone(Number(version[1]))) remove(full);
      else if (link && st?.isSymbolicLink() && gone(Number(link[1]))) remove(full);
    }
  }
  // Left by older versions of myofolio, which built in sibling folders.
  const parent = path.dirname(out);
  const base = path.basename(out);
  let siblings: string[] = [];
  try {
    siblings = readdirSync(parent);
  } catch {
    return removed;
  }
  for (const name of siblings) {
    const m = /^\.(building|previous|preparing)-(\d+)-[^/]+$/.exec(name.slice(base.length));
    if (!name.startsWith(base) || !m || !gone(Number(m[2]))) continue;
    const full = path.join(parent, name);
    if (!lstatOrUndefined(full)?.isDirectory()) continue;
    if (hasFile(full, OUTPUT_MARKER) || (m[1] === 'preparing' && readdirSync(full).length === 0)) remove(full);
  }
  return removed;
}

/**
 * A new, empty version folder for the site (carrying the output marker), in the versions folder
 * next to the output. Cleans what killed builds left first.
 */
export function makeStaging(plan: OutputPlan, step: StepHook = () => {}): string {
  if (plan.plain) {
    makeFolders(path.dirname(plan.out));
    mkdirSync(plan.out);
    writeFileSync(path.join(plan.out, OUTPUT_MARKER), 'This folder was written by myofolio build and is replaced by the next build.\n');
    return plan.out;
  }
  cleanStale(plan.out);
  step('cleaned');
  makeFolders(path.dirname(plan.out));
  try {
    mkdirSync(plan.versions);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
  }
  step('versions folder');
  if (!hasFile(plan.versions, VERSIONS_MARKER)) writeFileSync(path.join(plan.versions, VERSIONS_MARKER), 'Versions of the site at the link next to this folder, written by myofolio build. The link leads to one of them; the others are removed by the next build.\n');
  step('versions marker');
  for (;;) {
    const staging = path.join(plan.versions, `${process.pid}-${hex8()}`);
    try {
      mkdirSync(staging);
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === 'EEXIST') continue;
      throw err;
    }
    step('version folder');
    try {
      writeFileSync(path.join(staging, OUTPUT_MARKER), 'This folder was written by myofolio build and is replaced by the next build.\n');
    } catch (err) {
      rmSync(staging, { recursive: true, force: true });
      throw err;
    }
    step('version marker');
    return staging;
  }
}

/**
 * Give every folder and file of a finished version the modes a new one gets here (0777 and 0666
 * less the umask, read from the version folder and its marker file, made with those): files copied from the templates
 * (the assets) would otherwise keep their modes from the installation, whatever the umask.
 */
export function honourUmask(staging: string): void {
  const dirMode = statSync(staging).mode & 0o777;
  const fileMode = statSync(path.join(staging, OUTPUT_MARKER)).mode & 0o777;
  const walk = (dir: string) => {
    for (const e of readdirSync(dir, { withFileTypes: true })) {
      const full = path.join(dir, e.name);
      if (e.isDirectory()) {
        if ((lstatSync(full).mode & 0o777) !== dirMode) chmodSync(full, dirMode);
        walk(full);
      } else if (e.isFile() && (lstatSync(full).mode & 0o777) !== fileMode) chmodSync(full, fileMode);
    }
  };
  walk(staging);
}

/**
 * How the previous version is removed once the new one is in place: 'now', or 'background' in a
 * detached process that outlives this one, so that the user need not wait while a large site
 * (hundreds of megabytes for 1,000 variants) is deleted; at once if that process cannot start.
 * A version whose removal was cut short is removed by the next build (cleanStale).
 */
export type RemovePrevious = 'now' | 'background';

function removeFolder(dir: string, how: RemovePrevious): void {
  if (how === 'background') {
    try {
      const child = spawn(process.execPath, ['-e', 'require("node:fs").rmSync(process.argv[1], { recursive: true, force: true })', dir], { detached: true, stdio: 'ignore' });
      child.on('error', () => rmSync(dir, { recursive: true, force: true }));
      child.unref();
      return;
    } catch {
      // removed below
    }
  }
  rmSync(dir, { recursive: true, force: true });
}

/**
 * Put the finished version in place: one rename of a new link onto the output path. Returns where
 * a foreign folder or link was moved, if any.
 */
export function swapIn(plan: OutputPlan, staging: string, removePrevious: RemovePrevious = 'now', step: StepHook = () => {}): string | undefined {
  if (plan.plain) return undefined; // written in place
  const { out, versions } = plan;
  const tmp = path.join(versions, `link-${process.pid}-${hex8()}`);
  // Relative, so the site keeps working when the folder holding both is moved or mounted elsewhere.
  symlinkSync(`${path.basename(versions)}/${path.basename(staging)}`, tmp);
  step('link made');
  let movedAside: string | undefined;
  let previous: string | undefined;
  let legacy = false;
  try {
    const st = lstatOrUndefined(out);
    if (st?.isSymbolicLink() && ourLink(out)) {
      previous = path.join(versions, path.basename(readlinkSync(out)));
    } else if (st?.isDirectory() && readdirSync(out).length === 0) {
      rmdirSync(out); // fails if something appeared meanwhile: then nothing is replaced
      step('empty folder removed');
    } else if (st?.isDirectory() && hasFile(out, OUTPUT_MARKER)) {
      // A site of an older myofolio: moved into the versions folder, as a version of ours.
      previous = path.join(versions, `${process.pid}-${hex8()}`);
      renameSync(out, previous);
      legacy = true;
      step('old folder moved');
    } else if (st) {
      if (plan.existing !== 'foreign') throw new OutputError(`Something else appeared at ${out} during the build; it was left as it is.`, 'Look at what is there, and run the build again.');
      movedAside = `${out}.replaced-${hex8()}`;
      renameSync(out, movedAside);
      step('foreign moved aside');
    }
    renameSync(tmp, out);
    step('swapped');
  } catch (err) {
    // Nothing was replaced: what was moved goes back.
    rmSync(tmp, { force: true });
    try {
      if (movedAside) renameSync(movedAside, out);
      else if (legacy && previous) renameSync(previous, out);
    } catch {
      // left where it was moved (named in the error's context by its folder)
    }
    throw err;
  }
  if (previous && previous !== staging && hasFile(previous, OUTPUT_MARKER)) {
    try {
      removeFolder(previous, removePrevious);
    } catch {
      // left for the next build's cleanStale
    }
    step('previous removed');
  }
  return movedAside;
}
