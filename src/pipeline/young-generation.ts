/**
 * A larger young generation for the build process. A build allocates mostly short-lived objects
 * (parsed rows, units read from the store, chart specs, SVG and HTML strings); with V8's default
 * semi-spaces of a few megabytes, many of them survive into the old generation and are collected
 * by full collections of a large heap. Semi-spaces of YOUNG_GENERATION_MB let scavenges collect
 * them cheaply (measured in `npm run bench`; figures in the closing notes of issue 20). V8 reads
 * the limit when the young generation grows, so setting it at the start of the process takes
 * effect. The command line and the benchmark call this first; the library does not.
 */
import { setFlagsFromString } from 'node:v8';

/** Largest semi-space, in MB (V8's --max-semi-space-size; the young generation is three of them at most). */
export const YOUNG_GENERATION_MB = 64;

export function enlargeYoungGeneration(): void {
  setFlagsFromString(`--max-semi-space-size=${YOUNG_GENERATION_MB}`);
}
