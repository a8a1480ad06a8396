/**
 * makeFolders: `mkdir -p` that always ends. Node's mkdirSync(dir, { recursive: true }) loops
 * without end where mkdir(2) answers ENOENT although the parent exists (under /proc, for one);
 * this walks up to the nearest existing folder and makes each missing part once, so every
 * failure comes back as the error of the part that could not be made (ENOENT, ENOTDIR, EACCES, …).
 */
import { lstatSync, mkdirSync, statSync } from 'node:fs';
import path from 'node:path';

/**
 * Make `dir` and its missing parents (mode: as mkdir(2), less the umask); throws the first failure.
 * Each folder made is pushed to `created`, outermost first, so a caller can remove them again.
 */
export function makeFolders(dir: string, mode?: number, created?: string[]): void {
  const missing: string[] = [];
  for (let cur = path.resolve(dir); ; cur = path.dirname(cur)) {
    try {
      if (statSync(cur).isDirectory()) break;
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== 'ENOENT') throw err;
      missing.push(cur);
      if (path.dirname(cur) === cur) break;
      continue;
    }
    // Something that is not a folder stands in the way: mkdir says so (EEXIST or ENOTDIR).
    missing.push(cur);
    break;
  }
  for (const part of missing.reverse()) {
    try {
      mkdirSync(part, mode === undefined ? {} : { mode });
      created?.push(part);
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
      // Made meanwhile by another process: fine, if it is a folder.
      if (isFolder(part)) continue;
      // A link that leads nowhere stays EEXIST (src/pipeline/faults.ts names it); a file is in the way.
      if (lstatSync(part).isSymbolicLink()) throw err;
      throw Object.assign(new Error(`ENOTDIR: not a directory, mkdir '${part}'`), { code: 'ENOTDIR', syscall: 'mkdir', path: part });
    }
  }
}

function isFolder(p: string): boolean {
  try {
    return statSync(p).isDirectory();
  } catch {
    return false;
  }
}
