/**
 * The ATPase assay's input kinds: per-head rates at each [actin] (atpase-rates), or raw
 * NADH-coupled A340 readings (atpase-nadh), turned into rates by nadh.ts.
 */
import type { MessageText } from '../../results/source.js';
import type { InputKindDef, RowBase } from '../types.js';
import nadhSchema from './atpase-nadh.schema.json' with { type: 'json' };
import ratesSchema from './atpase-rates.schema.json' with { type: 'json' };

/** Steady-state ATPase: per-head rate at one [actin]. */
export interface AtpaseRateRow extends RowBase {
  actinUM: number;
  ratePerS: number;
  replicate?: string;
}

/**
 * NADH-coupled ATPase: one A340 reading of one well.
 * Actin-only background wells have wellType 'actin-only' and variant/unit (preparation) empty ('').
 */
export interface NadhRow extends RowBase {
  wellType: 'sample' | 'actin-only';
  well: string;
  actinUM: number;
  /** Myosin head concentration in the well (µM); 0 for actin-only wells. */
  headsUM: number;
  timeS: number;
  a340: number;
  /** Optical path length in cm (default from the manifest file entry). */
  pathCm: number;
}

const NEEDS_PATH_LENGTH: MessageText = {
  severity: 'error',
  code: 'csv.needs-path-length',
  message: 'No optical path length: the file has no path column and the manifest no pathLength.',
  fix: 'Add "pathLength": {"value": …, "unit": "cm"} to the file entry or a path column.',
};

const needsVariantUnit = (column: string): MessageText => ({
  severity: 'error',
  code: 'csv.empty-cell',
  message: `The cell in '${column}' is empty, but sample wells need it.`,
  fix: `Fill in '${column}' (only actin-only wells leave variant and preparation empty).`,
});

export const ATPASE_RATES: InputKindDef<AtpaseRateRow> = {
  kind: 'atpase-rates',
  schema: ratesSchema,
};

export const ATPASE_NADH: InputKindDef<NadhRow> = {
  kind: 'atpase-nadh',
  schema: nadhSchema,
  fileOptions: [
    {
      name: 'pathLength',
      shape: 'quantity',
      quantity: 'path',
      description: 'NADH: optical path length of every well, e.g. {"value": 0.5, "unit": "cm"}.',
      setting: 'pathLengthCm',
    },
  ],
  reading(file) {
    const pathCm = file.options.pathLength as number | undefined;
    return {
      headerProblems: !file.has('path') && pathCm === undefined ? [NEEDS_PATH_LENGTH] : [],
      emptyCell: (column) => (column === 'variant' || column === 'preparation' ? needsVariantUnit(column) : undefined),
      complete(row) {
        if (row.pathCm === undefined) row.pathCm = pathCm;
        return true;
      },
    };
  },
};
