/**
 * A full garbage collection between build phases.
 *
 * After loading and analysing a large study, the rows (most of the memory) become garbage at
 * once, but V8 schedules its next full collection only when the heap has grown well past the
 * size it had after the last one: with a 1,000-variant study the main thread kept about 1.4 GB
 * of dead rows for two minutes of chart drawing, and that set the build's peak memory. One
 * collection when the rows die costs well under a second and lowers the peak by about that much.
 *
 * The collector is exposed at run time (v8.setFlagsFromString('--expose-gc'), then `gc` from a
 * new context), so no node flag is needed. If that fails, this does nothing.
 */
import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';

let gc: (() => void) | null | undefined;

/**
 * Bytes of CSV parsed by a build from which the build counts as heavy (a cold build, or many
 * files changed). Parsed rows take about 8 bytes of heap per byte of CSV: a light build has at
 * most about 130 MB of dead rows after analysis, which is not worth a full collection (about
 * 0.2 s with a large study's results alive), and has room to start the chart workers while it
 * analyses (src/build/build-study.ts).
 */
export const HEAVY_PARSE_BYTES = 16 * 2 ** 20;

/** Run a full garbage collection, if the collector could be exposed. */
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
