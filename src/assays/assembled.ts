/**
 * What the rest of the tool reads from the assay registry, assembled once: the input kinds with
 * their row schemas, the default WT-like band of every metric, the default of every setting, the
 * typical ranges and the plain words of every unit flag code.
 * Each is defined once, in its assay's folder; `assemble` checks that the assays fit together.
 * Pure.
 */
import type { MetricScale } from '../results/types.js';
import { ASSAYS } from './registry.js';
import type { AssayModule, FlagWords, InputKindDef, PlausibleRange } from './types.js';

/** A metric's typical range with the metric's scale (ratio: bounds are factors; difference: shifts). */
export type PlausibleMetric = PlausibleRange & { scale: MetricScale };

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
  /** Typical range per metric key `<assay>.<metric>`, for the metrics that have one. */
  plausible: Record<string, PlausibleMetric>;
  /** Every unit flag code the assays raise, in plain words, in registry order (a code first raised by an earlier assay keeps its place). */
  flagWords: Record<string, FlagWords>;
}

/**
 * Assemble a list of assay modules; throws when two assays claim one id, input kind, file option
 * or setting name, when a band names no metric of its assay, or a kind differs from its schema's
 * x-kind, and when a metric has no plausible entry (a range, or null to say it has none) or a
 * range is not a range or names a column its assay's kinds do not have, and when two assays word one
 * flag code differently or a metric names a flag its assay does not raise. These are mistakes in
 * the code, found when it is first loaded.
 */
export function assemble(assays: readonly AssayModule[]): Assembled {
  const out: Assembled = { assayIds: [], kinds: [], bands: {}, differenceMetrics: new Set(), settings: {}, plausible: {}, flagWords: {} };
  const flagOwner = new Map<string, string>();
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
    for (const metric of Object.keys(a.plausible)) {
      if (!a.metrics.some((x) => x.id === metric)) throw new Error(`assay registry: ${a.id} has a plausible range for '${metric}', which is not one of its metrics`);
    }
    for (const m of a.metrics) {
      const p = a.plausible[m.id];
      if (p === undefined) throw new Error(`assay registry: ${a.id}.${m.id} has no plausible entry: give its typical range, or null when its values are not checked against one`);
      if (p === null) continue;
      const [lo, hi] = p.typical;
      if (!(lo <= hi) || (m.scale === 'ratio' && !(lo > 0))) throw new Error(`assay registry: the typical range of ${a.id}.${m.id} is not a range${m.scale === 'ratio' ? ' of positive values' : ''}`);
      for (const c of p.causes) {
        const kind = a.inputs.find((k) => k.kind === c.kind);
        if (!kind) throw new Error(`assay registry: a cause of ${a.id}.${m.id} names the input kind '${c.kind}', which ${a.id} does not read`);
        if (!(c.column in ((kind.schema.properties as object | undefined) ?? {}))) throw new Error(`assay registry: a cause of ${a.id}.${m.id} names the column '${c.column}', which '${c.kind}' does not have`);
      }
      out.plausible[`${a.id}.${m.id}`] = { ...p, scale: m.scale };
    }
    for (const [code, words] of Object.entries(a.flagWords)) {
      const owner = flagOwner.get(code);
      if (owner === undefined) {
        flagOwner.set(code, a.id);
        out.flagWords[code] = words;
      } else if (JSON.stringify(out.flagWords[code]) !== JSON.stringify(words)) {
        throw new Error(`assay registry: the flag '${code}' is worded differently by ${owner} and ${a.id} (take one wording, e.g. from src/assays/fit-flags.ts)`);
      }
    }
    for (const m of a.metrics) {
      for (const code of [...(m.excludeFlagged ?? []), ...(m.carryFlags ?? [])]) {
        if (!(code in a.flagWords)) throw new Error(`assay registry: the metric ${a.id}.${m.id} names the flag '${code}', which ${a.id} does not raise (its flagWords have no such code)`);
      }
    }
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
/** Typical range per metric key `<assay>.<metric>`, for the metrics that have one (src/analysis/plausibility.ts). */
export const PLAUSIBLE: Readonly<Record<string, PlausibleMetric>> = ASSEMBLED.plausible;
/** Every unit flag code the assays raise, in plain words (the glossary: src/analysis/flag-words.ts). */
export const UNIT_FLAG_WORDS: Readonly<Record<string, FlagWords>> = ASSEMBLED.flagWords;
