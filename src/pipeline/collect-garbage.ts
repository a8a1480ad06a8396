/**
 * Full garbage collections in a large build. A build's rows (about 8 bytes of heap per byte of
 * CSV) die together once the results exist, and every run of variant pages leaves its SVGs and
 * HTML behind; V8 schedules its next full collection from the heap size it last saw, so this
 * garbage piled up and set the build's peak memory. A build with more variants than one run of
 * pages (PAGES_PER_RUN of src/site/build-site.ts) therefore collects before analysis (the
 * parser's garbage), before the pages and after each run; a smaller build (a lab's usual study)
 * never does. The first collection comes after the
 * downloads are written, not at once after analysis: one made straight after analysis was seen to
 * keep the rows (npm run bench shows the peak). The collector is reached through V8's flag API
 * (--expose-gc, then `gc` from a new context); if that fails, nothing happens.
 */
import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';

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
