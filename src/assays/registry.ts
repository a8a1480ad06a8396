/**
 * The assay registry: every assay module the tool knows, in report order.
 * Adding an assay: write its module (src/assays/types.ts) and add it here.
 */
import { atpase } from './atpase.js';
import { force } from './force.js';
import { motility } from './motility.js';
import { turnover } from './turnover.js';
import type { AssayModule } from './types.js';

export const ASSAYS: readonly AssayModule[] = [atpase, motility, force, turnover];

export function assayById(id: string): AssayModule | undefined {
  return ASSAYS.find((a) => a.id === id);
}
