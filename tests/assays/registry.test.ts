/**
 * The input kinds, row schemas, bands and settings the loader and the analysis use are the
 * registry's (src/assays/registry.ts), derived from each assay's folder, and the committed
 * manifest schema is the one the registry makes.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { ASSAY_IDS, BANDS, DIFFERENCE_METRICS, KINDS, PLAUSIBLE, SETTINGS, UNIT_FLAG_WORDS, assemble } from '../../src/assays/assembled.js';
import { ASSAYS } from '../../src/assays/registry.js';
import type { AssayModule } from '../../src/assays/types.js';
import { manifestSchemaText } from '../../src/study/manifest-schema.js';
import { readManifest } from '../../src/study/manifest.js';
import { CATALOGUE, INPUT_KINDS, KIND_DEFS, MANIFEST_SCHEMA, ROW_SCHEMAS } from '../../src/study/schemas.js';

const base = { title: 't', lab: 'l', dates: ['2025-01-01'], synthetic: true, genes: [{ symbol: 'G' }], variants: [{ wt: true }], direction: 'hypercontractile' };

describe('the assay registry', () => {
  it('gives the input kinds and their row schemas, each from its assay', () => {
    expect(ASSAY_IDS).toEqual(ASSAYS.map((a) => a.id));
    expect(INPUT_KINDS).toEqual(ASSAYS.flatMap((a) => a.inputs.map((k) => k.kind)));
    expect(INPUT_KINDS).toEqual(['atpase-rates', 'atpase-nadh', 'motility-tracks', 'motility-velocities', 'force-pca', 'turnover']);
    for (const a of ASSAYS) {
      for (const def of a.inputs) {
        expect(KIND_DEFS[def.kind]).toBe(def);
        expect(ROW_SCHEMAS[def.kind]).toBe(def.schema);
        expect(def.schema['x-kind']).toBe(def.kind);
        expect(CATALOGUE[def.kind]!.columns.map((c) => c.name)).toEqual(Object.keys(def.schema.properties as object));
        expect(KINDS.find((k) => k.def === def)!.assay).toBe(a);
      }
    }
    const kindEnum = (MANIFEST_SCHEMA.properties as any).files.items.properties.kind.enum;
    expect(kindEnum).toEqual(INPUT_KINDS);
  });

  it('gives every band and setting, each defined once in its assay, in registry order', () => {
    const bands = ASSAYS.flatMap((a) => Object.entries(a.bands).map(([m, b]) => [`${a.id}.${m}`, b]));
    expect(Object.entries(BANDS)).toEqual(bands);
    for (const a of ASSAYS) for (const m of a.metrics.filter((x) => x.primary)) expect(BANDS[`${a.id}.${m.id}`]).toBeDefined();
    expect([...DIFFERENCE_METRICS]).toEqual(ASSAYS.flatMap((a) => a.metrics.filter((m) => m.scale === 'difference').map((m) => `${a.id}.${m.id}`)));
    expect(SETTINGS).toEqual(Object.assign({}, ...ASSAYS.map((a) => a.settings)));
    // The defaults as they were in src/defaults.ts before the assays became folders (the demo relies on them).
    expect(BANDS['atpase.kcat']).toEqual([0.8, 1.25]);
    expect(BANDS['force.pCa50']).toEqual([-0.1, 0.1]);
    expect(SETTINGS.nadhEpsilon340).toBe(6220); // Horecker & Kornberg 1948
  });

  it('gives every typical range from its assay, and every metric says whether it has one', () => {
    for (const a of ASSAYS) expect(Object.keys(a.plausible).sort()).toEqual(a.metrics.map((m) => m.id).sort());
    const ranged = ASSAYS.flatMap((a) => a.metrics.filter((m) => a.plausible[m.id]).map((m) => [`${a.id}.${m.id}`, { ...a.plausible[m.id], scale: m.scale }]));
    expect(Object.entries(PLAUSIBLE)).toEqual(ranged);
    // The ranges as they were in src/defaults.ts before they moved into the assays (sources as written there:
    // from memory, and Sarkar et al., Sci Adv 2020 for the turnover rates).
    const typical = Object.fromEntries(Object.entries(PLAUSIBLE).map(([k, p]) => [k, [...p.typical, p.scale]]));
    expect(typical).toEqual({
      'atpase.kcat': [4, 7, 'ratio'],
      'atpase.km': [10, 100, 'ratio'],
      'motility.velocity': [0.7, 1.0, 'ratio'],
      'force.fmax': [20, 40, 'ratio'],
      'force.pCa50': [5.5, 6.0, 'difference'],
      'turnover.kFast': [0.03, 0.03, 'ratio'],
      'turnover.kSlow': [0.0034, 0.0034, 'ratio'],
    });
    expect(PLAUSIBLE['turnover.kSlow']!.source).toBe('slow phase 0.0034 s⁻¹, Sarkar et al., Sci Adv 2020');
  });

  it('lets the manifest set every setting and band of the registry, and a difference band below zero', () => {
    const settings = Object.fromEntries(Object.entries(SETTINGS).map(([k, v]) => [k, v * 2]));
    const bands = Object.fromEntries(Object.entries(BANDS));
    const files = INPUT_KINDS.map((kind) => ({ path: `${kind}.csv`, kind }));
    const m = readManifest(JSON.stringify({ ...base, files, settings, thresholds: { bands } }), 'study.json');
    expect(m.issues).toEqual([]);
    expect(m.manifest!.settings).toEqual(settings);
    // atpase.basal and force.passive are difference metrics: [-0.01, 0.01] is a valid band (a ratio band must be positive).
    const ratio = readManifest(JSON.stringify({ ...base, files, thresholds: { bands: { 'atpase.kcat': [-0.1, 0.1] } } }), 'study.json');
    expect(ratio.issues.map((i) => i.code)).toEqual(['manifest.band-ratio']);
  });

  it('makes the committed manifest schema (regenerate: npx tsx src/study/manifest-schema.ts --write)', () => {
    expect(readFileSync('schemas/manifest.schema.json', 'utf8')).toBe(manifestSchemaText());
  });

  it('refuses two assays that claim one id, kind or setting, and a band of no metric', () => {
    const [atpase, motility] = ASSAYS as [AssayModule, AssayModule];
    expect(() => assemble([atpase, atpase])).toThrow(/id 'atpase' is used twice/);
    expect(() => assemble([atpase, { ...motility, inputs: atpase.inputs }])).toThrow(/input kind 'atpase-rates' is read by two assays/);
    expect(() => assemble([atpase, { ...motility, settings: { atpaseMinPoints: 1 } }])).toThrow(/setting 'atpaseMinPoints'/);
    expect(() => assemble([{ ...atpase, bands: { nothing: [0.8, 1.25] } }])).toThrow(/'nothing', which is not one of its metrics/);
  });

  it('refuses a metric with no plausible entry, and a typical range that is no range or names a column its kinds lack', () => {
    const [atpase] = ASSAYS as [AssayModule];
    const kcat = atpase.plausible.kcat!;
    const { basal: _basal, ...withoutBasal } = atpase.plausible;
    expect(() => assemble([{ ...atpase, plausible: withoutBasal }])).toThrow(/atpase\.basal has no plausible entry: give its typical range, or null/);
    expect(() => assemble([{ ...atpase, plausible: { ...atpase.plausible, nothing: null } }])).toThrow(/'nothing', which is not one of its metrics/);
    expect(() => assemble([{ ...atpase, plausible: { ...atpase.plausible, kcat: { ...kcat, typical: [7, 4] } } }])).toThrow(/typical range of atpase\.kcat is not a range of positive values/);
    expect(() => assemble([{ ...atpase, plausible: { ...atpase.plausible, kcat: { ...kcat, typical: [0, 4] } } }])).toThrow(/not a range of positive values/);
    const wrongColumn = { ...kcat, causes: [{ kind: 'atpase-rates', column: 'rates', power: 1 as const }] };
    expect(() => assemble([{ ...atpase, plausible: { ...atpase.plausible, kcat: wrongColumn } }])).toThrow(/the column 'rates', which 'atpase-rates' does not have/);
    const wrongKind = { ...kcat, causes: [{ kind: 'force-pca', column: 'tension', power: 1 as const }] };
    expect(() => assemble([{ ...atpase, plausible: { ...atpase.plausible, kcat: wrongKind } }])).toThrow(/the input kind 'force-pca', which atpase does not read/);
  });

  it('gives the plain words of every unit flag code from its assay, and every flag a metric names is one its assay raises', () => {
    const codes = [...new Set(ASSAYS.flatMap((a) => Object.keys(a.flagWords)))];
    expect(Object.keys(UNIT_FLAG_WORDS)).toEqual(codes);
    for (const a of ASSAYS) {
      for (const [code, words] of Object.entries(a.flagWords)) expect(UNIT_FLAG_WORDS[code], `${a.id}: ${code}`).toEqual(words);
      for (const m of a.metrics) for (const code of [...(m.excludeFlagged ?? []), ...(m.carryFlags ?? [])]) expect(a.flagWords, `${a.id}.${m.id}`).toHaveProperty([code]);
    }
    // The codes of src/assays/*/messages.ts (and the fit flags three assays share), in registry order.
    expect(codes).toEqual([
      'not-converged', 'too-few-points', 'poorly-determined', 'km-above-range', 'nadh-too-few-readings', 'nadh-no-heads', 'nadh-no-background',
      'motility-short-tracks', 'motility-duplicate-frames', 'motility-both-inputs', 'motility-invalid-velocity', 'motility-too-few-filaments', 'motility-no-moving-filaments', 'motility-high-immobile-fraction',
      'pca50-out-of-range', 'force-no-activation',
      'window-too-short', 'one-phase-trace', 'no-reference-rates',
    ]);
  });

  it('refuses one flag code worded two ways, and a metric naming a flag its assay does not raise', () => {
    const [atpase, motility, force] = ASSAYS as [AssayModule, AssayModule, AssayModule];
    const notConverged = force.flagWords['not-converged']!;
    expect(() => assemble([atpase, { ...force, flagWords: { ...force.flagWords, 'not-converged': { ...notConverged, label: 'no fit' } } }])).toThrow(/the flag 'not-converged' is worded differently by atpase and force/);
    expect(() => assemble([atpase, motility, force])).not.toThrow();
    const { 'km-above-range': _km, ...withoutKm } = atpase.flagWords;
    expect(() => assemble([{ ...atpase, flagWords: withoutKm }])).toThrow(/the metric atpase\.kcat names the flag 'km-above-range', which atpase does not raise/);
  });
});
