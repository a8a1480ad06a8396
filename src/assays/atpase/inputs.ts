/**
 * The ATPase assay's input kinds: per-head rates at each [actin] (atpase-rates), or raw
 * NADH-coupled A340 readings (atpase-nadh), turned into rates by nadh.ts.
 */
import type { InputKindDef, RowBase } from '../types.js';
import nadhSchema from './atpase-nadh.schema.json' with { type: 'json' };
import ratesSchema from './atpase-rates.schema.json' with { type: 'json' };
import { ATPASE_INPUT_MSG } from './messages.js';

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
      headerProblems: !file.has('path') && pathCm === undefined ? [ATPASE_INPUT_MSG.needsPathLength()] : [],
      emptyCell: (column) => (column === 'variant' || column === 'preparation' ? ATPASE_INPUT_MSG.needsVariantUnit(column) : undefined),
      complete(row) {
        if (row.pathCm === undefined) row.pathCm = pathCm;
        return true;
      },
    };
  },
};
