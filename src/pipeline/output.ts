/**
 * Safe output: a build writes into a new sibling folder and swaps it in only when complete,
 * so a failed or killed build leaves the last good output in place. The tool refuses to write
 * inside the study folder, and into a non-empty folder it did not create unless forced; even
 * forced, it moves the old folder aside rather than deleting what it did not write.
 */
import { spawn } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, realpathSync, renameSync, rmSync, rmdirSync, writeFileSync, lstatSync } from 'node:fs';
import path from 'node:path';

/** File that marks a folder as myofolio output (safe to replace on the next build). */
export const OUTPUT_MARKER = '.myofolio-output';

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
function realPath(p: string): string {
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

/** Does this folder carry our marker (so it was written by myofolio)? */
function hasMarker(dir: string): boolean {
  try {
    return lstatSync(path.join(dir, OUTPUT_MARKER)).isFile();
  } catch {
    return false;
  }
}

function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * Remove staging and previous-output folders left next to `out` by builds that were killed:
 * only folders named `<out>.building-<pid>-*`, `<out>.previous-<pid>-*` or `<out>.preparing-<pid>-*`
 * that carry our marker (a `.preparing-` folder also when empty) and whose process is gone.
 * Anything else is left alone. Returns the folders removed.
 */
export function cleanStale(out: string): string[] {
  const parent = path.dirname(out);
  const base = path.basename(out);
  const removed: string[] = [];
  let names: string[];
  try {
    names = readdirSync(parent);
  } catch {
    return removed;
  }
  for (const name of names) {
    const m = /^\.(building|previous|preparing)-(\d+)-[^/]+$/.exec(name.slice(base.length));
    if (!name.startsWith(base) || !m) continue;
    const full = path.join(parent, name);
    const pid = Number(m[2]);
    if (pid === process.pid || processAlive(pid)) continue;
    if (!lstatSync(full).isDirectory()) continue;
    if (!hasMarker(full) && !(m[1] === 'preparing' && readdirSync(full).length === 0)) continue;
    try {
      rmSync(full, { recursive: true, force: true });
      removed.push(full);
    } catch {
      // still being removed by the build that left it (see removePrevious), or not ours to remove
    }
  }
  return removed;
}

/** Check where the output may go; returns the absolute output folder. */
export function planOutput(studyDir: string, outDir: string, force: boolean): { out: string; replaceForeign: boolean } {
  const out = path.resolve(outDir);
  const study = path.resolve(studyDir);
  // Compare real paths too, so a link cannot lead the output into the study folder.
  if (isInside(out, study) || isInside(realPath(out), realPath(study))) {
    throw new OutputError(`The output folder ${outDir} is inside the study folder ${studyDir}.`, 'Choose an output folder outside the study folder, e.g. --out _site; myofolio never writes into a study folder.');
  }
  if (isInside(study, out) || isInside(realPath(study), realPath(out))) {
    throw new OutputError(`The output folder ${outDir} contains the study folder ${studyDir}.`, 'Choose an output folder that does not contain the study, e.g. --out _site.');
  }
  if (!existsSync(out)) return { out, replaceForeign: false };
  if (!lstatSync(out).isDirectory()) {
    throw new OutputError(`The output path ${outDir} exists and is not a folder.`, 'Choose another --out path, or remove that file yourself.');
  }
  const entries = readdirSync(out);
  if (entries.length === 0 || entries.includes(OUTPUT_MARKER)) return { out, replaceForeign: false };
  if (!force) {
    throw new OutputError(`The output folder ${outDir} is not empty and was not made by myofolio.`, 'Choose a new or empty folder, or add --force to move the existing folder aside (it is renamed, never deleted).');
  }
  return { out, replaceForeign: true };
}

/** A fresh temporary folder next to the output (same file system, so the swap is a rename). */
export function makeStaging(out: string, tag: string): string {
  cleanStale(out);
  mkdirSync(path.dirname(out), { recursive: true });
  // A new, uniquely named folder: never reuses (or deletes) anything already there. It is prepared
  // under another name and renamed once it carries the marker, so a staging folder never exists
  // without it (a build killed in between leaves an empty or marked `.preparing-` folder, cleaned below).
  const preparing = mkdtempSync(`${out}.preparing-${tag}-`);
  writeFileSync(path.join(preparing, OUTPUT_MARKER), 'This folder was written by myofolio build and is replaced by the next build.\n');
  const staging = `${out}.building-${tag}-${path.basename(preparing).slice(`${path.basename(out)}.preparing-${tag}-`.length)}`;
  renameSync(preparing, staging);
  return staging;
}

/**
 * How the previous output is removed once the new one is in place: 'now', or 'background' in a
 * detached process that outlives this one, so that the user need not wait while a large site
 * (hundreds of megabytes for 1,000 variants) is deleted; at once if that process cannot start.
 * A folder whose removal was cut short is removed by the next build (cleanStale).
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

/** Swap the finished staging folder in. Returns where a foreign folder was moved, if any. */
export function swapIn(staging: string, out: string, replaceForeign: boolean, tag: string, removePrevious: RemovePrevious = 'now'): string | undefined {
  let movedAside: string | undefined;
  let old: string | undefined;
  if (existsSync(out)) {
    if (replaceForeign) {
      movedAside = mkdtempSync(`${out}.replaced-${tag}-`);
      rmdirSync(movedAside);
      renameSync(out, movedAside);
    } else {
      // Our own previous output (it has the marker) or an empty folder.
      old = mkdtempSync(`${out}.previous-${tag}-`);
      rmdirSync(old);
      renameSync(out, old);
    }
  }
  renameSync(staging, out);
  if (old) {
    if (hasMarker(old)) removeFolder(old, removePrevious);
    else {
      try {
        rmdirSync(old); // was empty; if something appeared in it meanwhile, it is left in place
      } catch {
        /* left next to the output */
      }
    }
  }
  return movedAside;
}
