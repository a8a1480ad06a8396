/**
 * The force–pCa assay's input kind (force-pca): steady tension at each pCa, or force with the
 * preparation's cross-sectional area, converted here to tension.
 */
import type { InputKindDef, RowBase } from '../types.js';
import schema from './force-pca.schema.json' with { type: 'json' };
import { FORCE_INPUT_MSG } from './messages.js';

/** Force–pCa: steady force at one pCa for one preparation (tension in kPa = mN/mm²). */
export interface ForceRow extends RowBase {
  pCa: number;
  tensionKPa: number;
  replicate?: string;
}

/**
 * Tension from force and cross-sectional area, in kPa: F[mN] / A[mm²] = mN/mm² = kPa
 * (1 mN/mm² = 1e-3 N / 1e-6 m² = 1e3 Pa).
 * @example tensionKPa(0.009, 0.0003) // 30 (9 µN over 300 µm² is 30 kPa)
 */
export function tensionKPa(forceMN: number, areaMm2: number): number {
  return forceMN / areaMm2;
}

export const FORCE_PCA: InputKindDef<ForceRow> = {
  kind: 'force-pca',
  schema,
  fileOptions: [
    {
      name: 'crossSection',
      shape: 'quantity-per-unit',
      quantity: 'area',
      description: 'Force: cross-sectional area for all preparations (value) or per preparation (byPreparation).',
      setting: 'crossSectionMm2',
    },
  ],
  templateSkip: ['force', 'area'],
  // Force and area only feed tension.
  transientFields: ['forceMN', 'areaMm2'],
  reading(file) {
    const crossSection = file.options.crossSection as { value?: number; byUnit?: Record<string, number> } | undefined;
    const computed = !file.has('tension');
    /** Units already told that they lack an area (one message per unit and file). */
    const warned = new Set<string>();
    return {
      complete(row, cell, report) {
        if (row.tensionKPa !== undefined) return true;
        const unit = row.unit as string;
        const area = (cell('area') as number | undefined) ?? crossSection?.byUnit?.[unit] ?? crossSection?.value;
        if (area === undefined) {
          if (!warned.has(unit)) report.problem(FORCE_INPUT_MSG.needsCrossSection(unit), 'force');
          warned.add(unit);
          return false;
        }
        row.tensionKPa = tensionKPa(cell('force') as number, area);
        if (computed) report.plausible('tension', row.tensionKPa as number, 'force', 'computed from force and area');
        return true;
      },
    };
  },
};
