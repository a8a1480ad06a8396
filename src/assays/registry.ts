/**
 * The assay registry: every assay the tool knows, in report order. Adding an assay: write its
 * folder (see src/assays/types.ts and DEVELOPERS.md) and add its module here. What the rest of
 * the tool reads from this list (input kinds, bands, settings) is assembled in assembled.ts.
 */
import { atpase } from './atpase/module.js';
import { force } from './force/module.js';
import { motility } from './motility/module.js';
import { turnover } from './turnover/module.js';
import type { AssayModule } from './types.js';

export const ASSAYS: readonly AssayModule[] = [atpase, motility, force, turnover];

export function assayById(id: string): AssayModule | undefined {
  return ASSAYS.find((a) => a.id === id);
}
