/** The manifest as written (study.json), once it has passed its schema (schemas/manifest.schema.json). */
import type { ControlClass, DiseaseDirection, Exclusion, InputKind, ThresholdOverrides } from './types.js';

/** A value with a unit as written in the manifest. */
export interface ManifestQuantity {
  value: number;
  unit: string;
}

/** One files[] entry as written in the manifest. */
export interface ManifestFile {
  path: string;
  kind: InputKind;
  units?: Record<string, string>;
  decimal?: '.' | ',';
  missing?: string[];
  pathLength?: ManifestQuantity;
  pixelSize?: ManifestQuantity;
  frameInterval?: ManifestQuantity;
  crossSection?: { unit: string; value?: number; byUnit?: Record<string, number> };
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
  exclusions?: Omit<Exclusion, 'at'>[];
  caveats?: string[];
  settings?: Record<string, number | string | boolean>;
}

