/** The manifest as written (study.json), once it has passed its schema (schemas/manifest.schema.json). */
import type { ControlClass, DiseaseDirection, InputKind, ThresholdOverrides } from './types.js';

/** A value with a unit as written in the manifest. */
export interface ManifestQuantity {
  value: number;
  unit: string;
}

/** A file option of shape 'quantity-per-unit' as written in the manifest: one value for all preparations, or one per preparation. */
export interface ManifestQuantityPerUnit {
  unit: string;
  value?: number;
  byPreparation?: Record<string, number>;
}

/** One files[] entry as written in the manifest; the kind's file options (pathLength, …) by name. */
export interface ManifestFile {
  path: string;
  kind: InputKind;
  units?: Record<string, string>;
  decimal?: '.' | ',';
  missing?: string[];
  [option: string]: unknown;
}

/** One exclusions[] entry as written: a batch, a preparation or a variant, optionally in one assay. */
export interface ManifestExclusion {
  kind: 'batch' | 'preparation' | 'variant';
  assay?: string;
  batch?: string;
  preparation?: string;
  variant?: string;
  reason: string;
}

export interface ManifestJson {
  title: string;
  lab: string;
  dates: string[];
  synthetic: boolean;
  description?: string;
  genes: { symbol: string; sequence?: string; domains?: { name: string; start: number; end: number }[] }[];
  variants: { wt?: boolean; hgvs?: string; gene?: string; label?: string; control?: { class: ControlClass; source: string }; note?: string }[];
  direction: DiseaseDirection;
  files: ManifestFile[];
  thresholds?: ThresholdOverrides;
  exclusions?: ManifestExclusion[];
  caveats?: string[];
  settings?: Record<string, number | string | boolean>;
}
