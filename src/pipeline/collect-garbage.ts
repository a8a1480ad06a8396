/**
 * Full garbage collections in a heavy build (one that parsed much CSV: a cold build). The rows
 * (about 8 bytes of heap per byte of CSV) are most of its memory and die together once the
 * results exist, and every run of pages leaves its SVGs and HTML behind; V8 schedules its next
 * full collection from the heap size it last saw, so this garbage piled up and set the build's
 * peak memory. A heavy build therefore collects once after analysis and after each run of
 * HEAVY_PAGES_PER_RUN pages (measured in `npm run bench`; figures in the closing notes of
 * issue 20). A light build (a rebuild) holds no rows, and writes its pages in larger runs
 * without collecting: each run compiles the templates, and each collection costs time.
 * The collector is reached through V8's flag API (--expose-gc, then `gc` from a new context);
 * if that fails, nothing happens.
 */
import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';

/** Bytes of CSV parsed from which a build counts as heavy. */
export const COLLECT_AFTER_PARSED_BYTES = 16 * 2 ** 20;

/** Variant pages per Eleventy run in a heavy build. */
export const HEAVY_PAGES_PER_RUN = 75;

let gc: (() => void) | null | undefined;

export function collectGarbage(): void {
  if (gc === undefined) {
    try {
      setFlagsFromString('--expose-gc');
      gc = runInNewContext('gc') as () => void;
    } catch {
      gc = null;
    }
  }
  gc?.();
}
