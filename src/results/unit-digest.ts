/**
 * Content digests of unit results: SHA-256 of a unit's JSON, remembered per object. The variant
 * report's chart blocks are cached by the digests of the units they draw
 * (src/charts/assay-charts.ts), and the analysis cache stores each unit's digest beside it
 * (src/build/analysis-cache.ts), so that a rebuild does not serialise every unit of the study
 * again to find its charts unchanged.
 *
 * A digest is remembered only for an object whose JSON it was computed from: units come back
 * from the analysis cache with the JSON they were stored with (v8 serialisation, plots as their
 * JSON bytes: src/results/raw-json.ts), and analyseStudy's
 * copies carry their original's digest only when nothing was added to them (carryUnitDigest).
 * Units are not changed after analyseStudy (tests/scale/load-reuse.test.ts checks the
 * remembered digests against fresh ones after a build).
 */
import { createHash } from 'node:crypto';
import type { UnitResult } from './types.js';

const remembered = new WeakMap<UnitResult, string>();

/** SHA-256 (hex) of the unit's JSON, computed now. */
export function computeUnitDigest(u: UnitResult): string {
  return createHash('sha256').update(JSON.stringify(u)).digest('hex');
}

/** The unit's digest: remembered, or computed now and remembered. */
export function unitDigest(u: UnitResult): string {
  let d = remembered.get(u);
  if (d === undefined) {
    d = computeUnitDigest(u);
    remembered.set(u, d);
  }
  return d;
}

/** Remember a digest computed from the same JSON as `u` (stored beside it). */
export function rememberUnitDigest(u: UnitResult, digest: string): void {
  remembered.set(u, digest);
}

/** `copy` is a copy of `from` with the same JSON: it gets `from`'s digest, if one is remembered. */
export function carryUnitDigest(from: UnitResult, copy: UnitResult): void {
  const d = remembered.get(from);
  if (d !== undefined) remembered.set(copy, d);
}
