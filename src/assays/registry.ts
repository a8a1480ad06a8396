/**
 * The assay registry: every assay module the tool knows, in report order.
 * Adding an assay: write its module (src/assays/types.ts) and add it here.
 */
import { atpase } from './atpase.js';
import type { AssayModule } from './types.js';

export const ASSAYS: readonly AssayModule[] = [atpase];

export function assayById(id: string): AssayModule | undefined {
  return ASSAYS.find((a) => a.id === id);
}
