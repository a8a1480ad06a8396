/**
 * Full garbage collections in a large build. A build's rows (about 8 bytes of heap per byte of
 * CSV) die together once the results exist, and every run of variant pages leaves its SVGs and
 * HTML behind; V8 schedules its next full collection from the heap size it last saw, so this
 * garbage piled up and set the build's peak memory. A build with more variants than one run of
 * pages (PAGES_PER_RUN) therefore collects once after analysis and after each run; a smaller
 * build (a lab's usual study) never does. Measured side by side in `npm run bench`: the same CPU
 * time, a far lower peak. The collector is reached through V8's flag API (--expose-gc, then `gc`
 * from a new context); if that fails, nothing happens.
 */
import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';

/** Variant pages per Eleventy run (each run's SVGs and HTML are in memory at once). */
export const PAGES_PER_RUN = 75;

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
