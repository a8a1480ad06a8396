/**
 * Pruning of the build caches (charts, chart blocks and pages: src/charts/cache.ts; unit analyses
 * and file digests: src/build/analysis-cache.ts). Their entries are named by content, so they
 * are never stale, but they pile up: every code version, study edit and retired study leaves
 * entries nobody will ask for again (a 1,000-variant study alone keeps about 0.5 GB).
 *
 *   cache hit ──markUsed──▶ the entry file's modification time set to now
 *   end of a successful build ──pruneCache (at most once a day per folder, see <dir>/last-pruned)──▶
 *       entry files not used for CACHE_KEEP_DAYS removed; temporary files left by killed writes too
 *
 * Only files named as the caches name them, in their two-hex-digit subfolders, are removed, so a
 * cache folder pointed at the wrong place loses nothing else. Best effort: a file that cannot be
 * touched or removed costs only space or a rebuild.
 */
import { lstatSync, readdirSync, unlinkSync, utimesSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { CACHE } from '../defaults.js';

/** Days a cache entry is kept without being used by a build (src/defaults.ts). */
export const CACHE_KEEP_DAYS = CACHE.keepDays;

/** Hours between two prunings of one cache folder (each walks every entry). */
export const CACHE_PRUNE_EVERY_HOURS = CACHE.pruneEveryHours;

/** File in a cache folder whose modification time is that of its last pruning. */
export const PRUNE_STAMP = 'last-pruned';

/** Temporary files (a killed write's leftovers) older than this are removed. */
const TMP_KEEP_MS = 24 * 3600 * 1000;

/** Names of entry files: chart cache `<hash>.<ext>`, analysis slots `s<hash>.bin`, file digests `d<hash>.bin`. */
const ENTRY = /^[sd]?[0-9a-f]{64}\.(svg|json|html|offsets\.json|bin)$/;
/** Their temporary names while being written (`<name>.<pid>.tmp`). */
const TEMPORARY = /^[sd]?[0-9a-f]{64}\.(svg|json|html|offsets\.json|bin)\.\d+\.tmp$/;
const SUBFOLDER = /^[0-9a-f]{2}$/;

/** Record that a cache entry was used now (its modification time), so that pruning keeps it. */
export function markUsed(file: string, now: Date = new Date()): void {
  try {
    utimesSync(file, now, now);
  } catch {
    // read-only cache: it is not pruned by this user either
  }
}

/**
 * Remove the entry files of a cache folder not used for `keepDays` (default CACHE_KEEP_DAYS),
 * unless the folder was pruned less than CACHE_PRUNE_EVERY_HOURS ago. Returns what was removed
 * and kept, or undefined when it was not its time (or the folder does not exist).
 */
export function pruneCache(dir: string, options: { now?: number; keepDays?: number } = {}): { removed: number; kept: number } | undefined {
  const now = options.now ?? Date.now();
  const stamp = join(dir, PRUNE_STAMP);
  let subfolders: string[];
  try {
    if (!lstatSync(dir).isDirectory()) return undefined;
    subfolders = readdirSync(dir).filter((n) => SUBFOLDER.test(n));
  } catch {
    return undefined;
  }
  try {
    if (now - lstatSync(stamp).mtimeMs < CACHE_PRUNE_EVERY_HOURS * 3600 * 1000) return undefined;
  } catch {
    // never pruned
  }
  const oldest = now - (options.keepDays ?? CACHE_KEEP_DAYS) * 24 * 3600 * 1000;
  let removed = 0;
  let kept = 0;
  for (const sub of subfolders) {
    let names: string[];
    try {
      names = readdirSync(join(dir, sub));
    } catch {
      continue;
    }
    for (const name of names) {
      const entry = ENTRY.test(name);
      if (!entry && !TEMPORARY.test(name)) continue;
      const file = join(dir, sub, name);
      try {
        const st = lstatSync(file);
        if (!st.isFile()) continue;
        if (st.mtimeMs < (entry ? oldest : now - TMP_KEEP_MS)) {
          unlinkSync(file);
          removed++;
        } else kept++;
      } catch {
        // gone meanwhile, or not ours to remove
      }
    }
  }
  try {
    writeFileSync(stamp, `Pruned by myofolio: entries unused for ${options.keepDays ?? CACHE_KEEP_DAYS} days removed.\n`);
    utimesSync(stamp, new Date(now), new Date(now));
  } catch {
    // read-only: tried again next build
  }
  return { removed, kept };
}
