/**
 * What the rest of the tool reads from the assay registry, assembled once: the input kinds with
 * their row schemas, the default WT-like band of every metric and the default of every setting.
 * Each is defined once, in its assay's folder; `assemble` checks that the assays fit together.
 * Pure.
 */
import { ASSAYS } from './registry.js';
import type { AssayModule, InputKindDef } from './types.js';

export interface Assembled {
  /** Assay ids, in report order. */
  assayIds: string[];
  /** Every input kind, in registry order, and the assay that reads it. */
  kinds: Array<{ def: InputKindDef; assay: AssayModule }>;
  /** Default WT-like band per metric key `<assay>.<metric>`. */
  bands: Record<string, [number, number]>;
  /** Metric keys compared as differences (their bands may hold zero and negative values). */
  differenceMetrics: Set<string>;
  /** Default of every assay setting, by name (manifest: settings.<name>). */
  settings: Record<string, number>;
}

/**
 * Assemble a list of assay modules; throws when two assays claim one id, input kind, file option
 * or setting name, when a band names no metric of its assay, or a kind differs from its schema's
 * x-kind. These are mistakes in the code, found when it is first loaded.
 */
export function assemble(assays: readonly AssayModule[]): Assembled {
  const out: Assembled = { assayIds: [], kinds: [], bands: {}, differenceMetrics: new Set(), settings: {} };
  const kindNames = new Set<string>();
  const optionNames = new Set<string>();
  for (const a of assays) {
    if (out.assayIds.includes(a.id)) throw new Error(`assay registry: the id '${a.id}' is used twice`);
    out.assayIds.push(a.id);
    for (const def of a.inputs) {
      if (kindNames.has(def.kind)) throw new Error(`assay registry: the input kind '${def.kind}' is read by two assays`);
      if (def.schema['x-kind'] !== def.kind) throw new Error(`assay registry: the row schema of '${def.kind}' says x-kind '${String(def.schema['x-kind'])}'`);
      kindNames.add(def.kind);
      for (const o of def.fileOptions ?? []) {
        if (optionNames.has(o.name)) throw new Error(`assay registry: the file option '${o.name}' is declared by two input kinds`);
        optionNames.add(o.name);
      }
      out.kinds.push({ def, assay: a });
    }
    for (const [metric, band] of Object.entries(a.bands)) {
      const m = a.metrics.find((x) => x.id === metric);
      if (!m) throw new Error(`assay registry: ${a.id} has a band for '${metric}', which is not one of its metrics`);
      out.bands[`${a.id}.${metric}`] = [band[0], band[1]];
    }
    for (const m of a.metrics) if (m.scale === 'difference') out.differenceMetrics.add(`${a.id}.${m.id}`);
    for (const [name, value] of Object.entries(a.settings)) {
      if (name in out.settings) throw new Error(`assay registry: the setting '${name}' is declared by two assays`);
      out.settings[name] = value;
    }
  }
  return out;
}

const ASSEMBLED = assemble(ASSAYS);

/** Assay ids, in report order. */
export const ASSAY_IDS: readonly string[] = ASSEMBLED.assayIds;
/** Every input kind with its assay, in registry order. */
export const KINDS: ReadonlyArray<{ def: InputKindDef; assay: AssayModule }> = ASSEMBLED.kinds;
/** Default WT-like band per metric key `<assay>.<metric>` (manifest: thresholds.bands). */
export const BANDS: Readonly<Record<string, [number, number]>> = ASSEMBLED.bands;
/** Metric keys compared as differences. */
export const DIFFERENCE_METRICS: ReadonlySet<string> = ASSEMBLED.differenceMetrics;
/** Default of every assay setting, by name (manifest: settings.<name>). */
export const SETTINGS: Readonly<Record<string, number>> = ASSEMBLED.settings;
