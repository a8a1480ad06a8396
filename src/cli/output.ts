/**
 * Safe output: a build writes into a new sibling folder and swaps it in only when complete,
 * so a failed or killed build leaves the last good output in place. The tool refuses to write
 * inside the study folder, and into a non-empty folder it did not create unless forced; even
 * forced, it moves the old folder aside rather than deleting what it did not write.
 */
import { existsSync, mkdirSync, readdirSync, renameSync, rmSync, writeFileSync, lstatSync } from 'node:fs';
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

/** Check where the output may go; returns the absolute output folder. */
export function planOutput(studyDir: string, outDir: string, force: boolean): { out: string; replaceForeign: boolean } {
  const out = path.resolve(outDir);
  const study = path.resolve(studyDir);
  if (isInside(out, study)) {
    throw new OutputError(`The output folder ${outDir} is inside the study folder ${studyDir}.`, 'Choose an output folder outside the study folder, e.g. --out _site; myofolio never writes into a study folder.');
  }
  if (isInside(study, out)) {
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
  const staging = `${out}.building-${tag}`;
  rmSync(staging, { recursive: true, force: true });
  mkdirSync(staging, { recursive: true });
  writeFileSync(path.join(staging, OUTPUT_MARKER), 'This folder was written by myofolio build and is replaced by the next build.\n');
  return staging;
}

/** Swap the finished staging folder in. Returns where a foreign folder was moved, if any. */
export function swapIn(staging: string, out: string, replaceForeign: boolean, tag: string): string | undefined {
  let movedAside: string | undefined;
  let old: string | undefined;
  if (existsSync(out)) {
    if (replaceForeign) {
      movedAside = `${out}.replaced-${tag}`;
      renameSync(out, movedAside);
    } else {
      old = `${out}.previous-${tag}`;
      rmSync(old, { recursive: true, force: true });
      renameSync(out, old);
    }
  }
  renameSync(staging, out);
  if (old) rmSync(old, { recursive: true, force: true });
  return movedAside;
}
