/**
 * What adding an assay touches. A fictional assay, glow (tests/fixtures/assays/glow/), is added
 * to the registry here (vi.mock: the one registry line), and the whole build then reads its
 * input kind, row schema, unit conversion, setting, band, analysis, chart and methods text from
 * its folder alone: check, init templates, manifest schema, analysis and pages. Besides the folder
 * and the registry line, only generated text changes (the README input reference and the
 * committed manifest schema, each rewritten by one command), and the demo generator, which must
 * give every input kind (tests/study/demo.test.ts).
 */
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it, vi } from 'vitest';

vi.mock('../../src/assays/registry.js', async (importOriginal) => {
  const real = await importOriginal<typeof import('../../src/assays/registry.js')>();
  const { glow } = await import('../fixtures/assays/glow/module.js');
  const ASSAYS = [...real.ASSAYS, glow];
  return { ASSAYS, assayById: (id: string) => ASSAYS.find((a) => a.id === id) };
});

const { BANDS, PLAUSIBLE, SETTINGS, UNIT_FLAG_WORDS, assemble } = await import('../../src/assays/assembled.js');
const { FLAG_WORDS } = await import('../../src/analysis/flag-words.js');
const { glow } = await import('../fixtures/assays/glow/module.js');
const { buildStudy } = await import('../../src/pipeline/build-study.js');
const { manifestSchemaText } = await import('../../src/study/manifest-schema.js');
const { readManifest } = await import('../../src/study/manifest.js');
const { extractReference, inputReference } = await import('../../src/study/reference-doc.js');
const { INPUT_KINDS, MANIFEST_SCHEMA } = await import('../../src/study/schemas.js');
const { starterFiles } = await import('../../src/study/templates.js');

/** Every file a new assay needs besides generated text: its folder (as the fixture has it) and one registry line. */
export const NEW_ASSAY_FILES = [
  'src/assays/<id>/<kind>.schema.json (row schema of each input kind)',
  'src/assays/<id>/inputs.ts (input kinds: row types, file options, reading rules)',
  'src/assays/<id>/messages.ts (flag codes in plain words, the message of each flag, its own input problems)',
  'src/assays/<id>/metrics.ts (metrics with directions, default WT-like bands, typical ranges)',
  'src/assays/<id>/module.ts (the AssayModule: analysis, chart, methods text)',
  'src/assays/<id>/settings.ts (settings with their defaults)',
  'src/assays/registry.ts (one line)',
  'src/demo/ (the demo generator gives the new input kinds)',
];
const GENERATED = ['README.md (input reference: npx tsx src/study/reference-doc.ts --write)', 'schemas/manifest.schema.json (npx tsx src/study/manifest-schema.ts --write)'];

const FOLDER = join(import.meta.dirname, '..', 'fixtures', 'assays', 'glow');
const dirs: string[] = [];
afterAll(() => dirs.forEach((d) => rmSync(d, { recursive: true, force: true })));

/** A small study of the glow assay: WT and one variant glowing 1.5 times faster, two batches. */
function glowStudy(exposureUnit = 'ms'): string {
  const dir = mkdtempSync(join(tmpdir(), 'myofolio-glow-'));
  dirs.push(dir);
  const manifest = {
    title: 'Glow test study (synthetic)',
    lab: 'Invented lab',
    dates: ['2025-01-01'],
    synthetic: true,
    genes: [{ symbol: 'ZZGLO1' }],
    variants: [{ wt: true }, { hgvs: 'p.Gly12Ala' }],
    direction: 'hypercontractile',
    files: [{ path: 'glow.csv', kind: 'glow-wells' }],
    settings: { glowMinWells: 2 },
  };
  const lines = [`variant,preparation,batch,well,exposure (${exposureUnit}),glow`];
  // Invented values: rate = glow / exposure; WT about 10 per s, G12A about 15 per s, small spread.
  const spread = [0.97, 1.0, 1.03];
  for (const batch of ['B1', 'B2']) {
    for (const [label, rate] of [['WT', 10], ['G12A', 15]] as const) {
      for (let u = 0; u < 3; u++) {
        for (let w = 0; w < 3; w++) lines.push(`${label},${label}-${batch}-${u},${batch},W${w},500,${(rate * 0.5 * spread[u]! * spread[w]!).toFixed(4)}`);
      }
    }
  }
  writeFileSync(join(dir, 'study.json'), JSON.stringify(manifest, null, 2));
  writeFileSync(join(dir, 'glow.csv'), lines.join('\n') + '\n');
  return dir;
}

describe('a new assay (the fictional glow assay of tests/fixtures/assays/glow/)', () => {
  it('is one folder: a row schema and five small files', () => {
    expect(readdirSync(FOLDER).sort()).toEqual(['glow-wells.schema.json', 'inputs.ts', 'messages.ts', 'metrics.ts', 'module.ts', 'settings.ts']);
    expect(NEW_ASSAY_FILES.filter((f) => f.startsWith('src/assays/<id>/'))).toHaveLength(6);
  });

  it('gives the loader its input kind, schema and setting, and the analysis its band, through the registry line', () => {
    expect(INPUT_KINDS).toContain('glow-wells');
    const kinds = ((MANIFEST_SCHEMA.properties as any).files.items.properties.kind.enum) as string[];
    expect(kinds).toContain('glow-wells');
    expect(BANDS['glow.rate']).toEqual([0.8, 1.25]);
    expect(SETTINGS.glowMinWells).toBe(3);
    expect(Object.keys(starterFiles('2025-01-01'))).toContain('glow-wells.csv');
    const bad = readManifest(JSON.stringify({ ...JSON.parse(readFileSync(join(glowStudy(), 'study.json'), 'utf8')), settings: { glowMinWell: 2 } }), 'study.json');
    expect(bad.issues.map((i) => i.code)).toEqual(['manifest.unknown-setting']);
    expect(bad.issues[0]!.fix).toContain("'glowMinWells'");
  });

  it('builds: rows read in canonical units, units analysed, the variant compared with paired WT, its pages written', async () => {
    const out = join(mkdtempSync(join(tmpdir(), 'myofolio-glow-out-')), 'site');
    dirs.push(join(out, '..'));
    const outcome = await buildStudy(glowStudy(), out, { store: false, sourceDateEpoch: 0 });
    expect(outcome.issues.filter((i) => i.severity === 'error')).toEqual([]);
    expect(outcome.ok).toBe(true);
    const r = outcome.results!;
    expect(r.assays.map((a) => a.id)).toEqual(['glow']);
    // exposure 500 ms = 0.5 s (the schema's x-quantity: time); WT rate 10/s times the spread (computed from the inputs).
    const wt = r.units.find((u) => u.variant === 'zzglo1-wt' && u.unit === 'WT-B1-1')!;
    expect(wt.metrics.rate).toBeCloseTo(10, 3);
    const c = r.comparisons.find((x) => x.assay === 'glow' && x.variant !== 'zzglo1-wt')!;
    expect(c.metric).toBe('rate');
    expect(c.band).toEqual([0.8, 1.25]);
    // Every variant unit is 1.5 times its WT counterpart: the effect is 1.5 (computed from the inputs,
    // within the rounding of the CSV values to 4 decimals).
    expect(c.effect).toBeCloseTo(1.5, 5);
    const assayPage = readFileSync(join(out, 'assays', 'glow.html'), 'utf8');
    expect(assayPage).toContain('Glow (fictional)');
    expect(readFileSync(join(out, 'methods.html'), 'utf8')).toContain('the glow rate is the mean over its wells');
    // The glossary page explains the glow flag, in the words of the glow folder's messages.ts.
    expect(readFileSync(join(out, 'glossary.html'), 'utf8')).toContain('Fewer wells were measured for this preparation than the glowMinWells setting asks for');
  });

  it('gives the glossary its flag words, and a flag its metric names without words is refused', () => {
    expect(UNIT_FLAG_WORDS['glow-too-few-wells']).toBe(glow.flagWords['glow-too-few-wells']);
    expect(FLAG_WORDS['glow-too-few-wells']!.label).toBe('few wells');
    expect(() => assemble([{ ...glow, flagWords: {} }])).toThrow(/the metric glow\.rate names the flag 'glow-too-few-wells', which glow does not raise/);
  });

  it('gives the plausibility check its typical range, and a metric without a plausible entry is refused', async () => {
    expect(PLAUSIBLE['glow.rate']).toMatchObject({ typical: [5, 20], scale: 'ratio' });
    const { rate: _rate, ...none } = glow.plausible;
    expect(() => assemble([{ ...glow, plausible: none }])).toThrow(/glow\.rate has no plausible entry/);
    // Exposure headed s with values in ms: every rate is 1000 times too low (10 s⁻¹ read as 0.01 s⁻¹: SI prefix milli, SI Brochure 2019, Table 7).
    const out = join(mkdtempSync(join(tmpdir(), 'myofolio-glow-out-')), 'site');
    dirs.push(join(out, '..'));
    const outcome = await buildStudy(glowStudy('s'), out, { store: false, sourceDateEpoch: 0 });
    const w = outcome.issues.find((i) => i.code === 'study.implausible-wt')!;
    expect(w.at).toMatchObject({ file: 'glow.csv', line: 1, column: 'exposure' });
    expect(w.message).toContain('below the plausible 0.5–200 s⁻¹ (typical 5–20 s⁻¹ for the fictional glow assay)');
    expect(w.message).toContain("The unit of 'exposure' in 'glow.csv' is the likely cause: its header 'exposure (s)' reads it as s; read as ms, the values would give");
  });

  it('changes only generated text elsewhere: the README input reference and the committed manifest schema', () => {
    const readme = readFileSync('README.md', 'utf8');
    expect(extractReference(readme)).not.toBe(inputReference());
    expect(inputReference()).toContain('### `glow-wells`: Glow (a fictional assay of the tests)');
    expect(readFileSync('schemas/manifest.schema.json', 'utf8')).not.toBe(manifestSchemaText());
    expect(GENERATED).toHaveLength(2);
  });
});
