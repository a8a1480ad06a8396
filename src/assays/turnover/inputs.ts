/** The single-turnover assay's input kind (turnover): fluorescence readings of chase traces. */
import type { InputKindDef, RowBase } from '../types.js';
import schema from './turnover.schema.json' with { type: 'json' };

/** Single turnover: one fluorescence reading of one chase trace. */
export interface TurnoverRow extends RowBase {
  trace: string;
  timeS: number;
  fluorescence: number;
}

export const TURNOVER: InputKindDef<TurnoverRow> = {
  kind: 'turnover',
  schema,
};
