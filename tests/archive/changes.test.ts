/**
 * What changed since a release. Each test builds the released and the current StudyResults by hand
 * and changes one thing (a file's bytes, a band, the tool version…); the expected change and reason
 * follow from that one difference.
 */
import { describe, expect, it } from 'vitest';
import { changeFor, changeLines, compareWithRelease, outsideInterval } from '../../src/archive/changes.js';
import { canonicalJson, studyReasons, variantFiles } from '../../src/archive/reasons.js';
import type { ReleaseRef } from '../../src/archive/release.js';
import type { StudyResults } from '../../src/results/types.js';
import { defaultCalibration, fakeSha, makeResults, type StudySpec, type VariantSpec } from './study-results.js';

const RELEASE: ReleaseRef = { id: '2026-03-02-1', date: '2026-03-02', note: 'sent to the cardiogenetics clinic' };
const SINCE = 'since the release of 2026-03-02 (note: sent to the cardiogenetics clinic)';

const R403Q: VariantSpec = { hgvs: 'p.Arg403Gln', short: 'R403Q', residue: 403, overall: 'hypercontractile', metrics: { 'atpase.kcat': [1.38, 1.21, 1.55, 'increased'] } };
const E500K: VariantSpec = { hgvs: 'p.Glu500Lys', short: 'E500K', residue: 500, overall: 'within WT range', metrics: { 'atpase.kcat': [1.0, 0.9, 1.1, 'within WT range'] } };
/** Measured by force–pCa only: its data are in force-pca.csv. */
const D600N: VariantSpec = { hgvs: 'p.Asp600Asn', short: 'D600N', residue: 600, overall: 'within WT range', metrics: { 'force.pCa50': [0.01, -0.04, 0.06, 'within WT range'] } };

const FILES = (atpaseSha = fakeSha('atpase v1'), atpaseRows = 40) => [
  { path: 'atpase-rates.csv', kind: 'atpase-rates', sha256: atpaseSha, rows: atpaseRows },
  { path: 'force-pca.csv', kind: 'force-pca', sha256: fakeSha('force v1'), rows: 30 },
];
const MANIFEST = { title: 'Panel', files: [{ path: 'atpase-rates.csv', kind: 'atpase-rates' }, { path: 'force-pca.csv', kind: 'force-pca' }], variants: ['WT', 'R403Q', 'E500K', 'D600N'] };

function study(overrides: Partial<StudySpec> = {}): StudyResults {
  return makeResults({ title: 'Panel', dates: ['2026-02-20'], variants: [R403Q, E500K, D600N], files: FILES(), manifest: MANIFEST, ...overrides });
}

const withVariant = (v: VariantSpec, patch: Partial<VariantSpec>): VariantSpec => ({ ...v, ...patch });

describe('nothing changed', () => {
  it('lists no variant and says so', () => {
    const cmp = compareWithRelease('panel', study(), study(), RELEASE);
    expect(cmp.variants).toEqual([]);
    expect(cmp.unchanged).toBe(3);
    expect(cmp.reasons).toEqual([]);
    expect(cmp.summary).toBe(
      'No call changed since the release of 2026-03-02 (note: sent to the cardiogenetics clinic): every variant has the same overall call and evidence level, and no estimate lies outside its released 95% CI.',
    );
  });
});

describe('a corrected CSV after a release', () => {
  // The lab corrected atpase-rates.csv (same number of rows, other bytes); R403Q's kcat moved from
  // 1.38 (95% CI 1.21 to 1.55) to 1.12 (0.98 to 1.28): its call and evidence changed.
  const released = study();
  const current = study({
    files: FILES(fakeSha('atpase v2, corrected'), 40),
    variants: [withVariant(R403Q, { overall: 'indeterminate', metrics: { 'atpase.kcat': [1.12, 0.98, 1.28, 'indeterminate'] } }), E500K, D600N],
  });
  const cmp = compareWithRelease('panel', current, released, RELEASE);

  it('lists the changed call with the reason "corrected data in <file>"', () => {
    expect(cmp.reasons).toEqual([{ kind: 'file-changed', file: 'atpase-rates.csv', text: 'corrected data in atpase-rates.csv' }]);
    expect(cmp.variants.map((v) => [v.short, v.status])).toEqual([['R403Q', 'changed']]);
    const call = cmp.variants[0]!.changes.find((c) => c.kind === 'overall-call')!;
    expect(call).toMatchObject({ was: 'hypercontractile', now: 'indeterminate' });
    expect(call.sentence).toBe(
      'Changed since the release of 2026-03-02 (note: sent to the cardiogenetics clinic): overall call was hypercontractile, now indeterminate; reason: corrected data in atpase-rates.csv.',
    );
  });

  it('lists the evidence level and the estimate that left its released CI, each with its reason', () => {
    const kinds = cmp.variants[0]!.changes.map((c) => c.kind);
    // PS3 supporting (hypercontractile) → none (indeterminate): makeResults' evidence by call.
    expect(kinds).toEqual(['overall-call', 'evidence-level', 'estimate-outside-ci']);
    const estimate = cmp.variants[0]!.changes[2];
    // 1.12 < 1.21, the released lower limit.
    expect(estimate?.text).toBe('kcat (Actin-activated ATPase) is now 1.12×, outside its released 95% CI 1.21× to 1.55× (released estimate 1.38×)');
    expect(estimate?.reasons.map((r) => r.text)).toEqual(['corrected data in atpase-rates.csv']);
    expect(cmp.variants[0]?.sentence).toBe(
      `Changed ${SINCE}: overall call was hypercontractile, now indeterminate; evidence level was PS3 supporting, now none; kcat (Actin-activated ATPase) is now 1.12×, outside its released 95% CI 1.21× to 1.55× (released estimate 1.38×); reason: corrected data in atpase-rates.csv.`,
    );
  });

  it('leaves variants whose calls and estimates held unlisted, and counts them', () => {
    expect(cmp.unchanged).toBe(2);
    expect(cmp.summary).toBe(`Since the release of 2026-03-02 (note: sent to the cardiogenetics clinic): 1 variant changed; 2 unchanged (same overall call and evidence level, no estimate outside its released 95% CI).`);
    expect(changeLines(cmp)[1]).toBe(`R403Q (ZZMYO9 p.Arg403Gln): ${cmp.variants[0]?.sentence}`);
    expect(changeFor(cmp, { gene: 'ZZMYO9', hgvs: 'p.Arg403Gln' })?.status).toBe('changed');
    expect(changeFor(cmp, { gene: 'ZZMYO9', hgvs: 'p.Glu500Lys' })).toBeUndefined();
  });

  it('names the file as the reason only for variants whose data it holds', () => {
    // D600N's data are in force-pca.csv; if its call had changed with only atpase-rates.csv
    // corrected, the file is another variant's data (it moves q values and calibration study-wide).
    const c2 = compareWithRelease('panel', study({ files: FILES(fakeSha('atpase v2')), variants: [R403Q, E500K, withVariant(D600N, { overall: 'indeterminate', metrics: { 'force.pCa50': [0.01, -0.12, 0.14, 'indeterminate'] } })] }), released, RELEASE);
    const d = c2.variants.find((v) => v.short === 'D600N')!;
    expect(d.changes[0]?.reasons.map((r) => r.kind)).toEqual(['other-data']);
    expect(d.changes[0]?.reasons[0]?.text).toBe('changed data of other variants (atpase-rates.csv), which moves q values and the calibration study-wide');
    expect([...variantFiles(released, 'zzmyo9-d600n')]).toEqual(['force-pca.csv']);
    expect([...variantFiles(released, 'zzmyo9-r403q')]).toEqual(['atpase-rates.csv']);
  });
});

describe('reasons other than data', () => {
  it('a changed WT-like band explains a changed call, but not a moved estimate', () => {
    // Band of kcat narrowed from 0.8–1.25 to 0.85–1.2 in the manifest; E500K's call changed with it,
    // and (invented) its estimate moved: a band cannot move an estimate, so no reason is found for that.
    const current = study({
      settings: { bands: { 'atpase.kcat': [0.85, 1.2] } },
      variants: [R403Q, withVariant(E500K, { overall: 'indeterminate', metrics: { 'atpase.kcat': [1.15, 1.02, 1.3, 'indeterminate'] } }), D600N],
    });
    const cmp = compareWithRelease('panel', current, study(), RELEASE);
    expect(cmp.reasons.map((r) => r.text)).toEqual(['WT-like band of atpase.kcat changed (0.800× to 1.25× → 0.850× to 1.20×)']);
    const e = cmp.variants.find((v) => v.short === 'E500K')!;
    const call = e.changes.find((c) => c.kind === 'overall-call')!;
    expect(call.sentence).toBe(
      `Changed ${SINCE}: overall call was within WT range, now indeterminate; reason: WT-like band of atpase.kcat changed (0.800× to 1.25× → 0.850× to 1.20×).`,
    );
    const estimate = e.changes.find((c) => c.kind === 'estimate-outside-ci')!;
    expect(estimate.reasons).toEqual([{ kind: 'none-found', text: 'no difference found in input files, manifest, settings or tool version' }]);
  });

  it('a changed q threshold, assay setting and exclusion are reasons, with values', () => {
    const released = study({ manifest: { ...MANIFEST, settings: { immobileThreshold: 0.2 } } });
    const current = study({
      settings: { qThreshold: 0.01 },
      manifest: { ...MANIFEST, settings: { immobileThreshold: 0.3 }, exclusions: [{ kind: 'batch', assay: 'atpase', batch: 'B3', reason: 'old actin' }] },
      variants: [withVariant(R403Q, { overall: 'indeterminate' }), E500K, D600N],
    });
    const cmp = compareWithRelease('panel', current, released, RELEASE);
    expect(cmp.reasons.map((r) => [r.kind, r.text])).toEqual([
      ['exclusions-changed', 'exclusion added: batch B3 of atpase'],
      ['settings-changed', 'assay setting immobileThreshold changed (0.2 → 0.3)'],
      ['thresholds-changed', 'q threshold changed (0.05 → 0.01)'],
    ]);
    expect(cmp.variants[0]?.changes[0]?.sentence).toBe(
      `Changed ${SINCE}: overall call was hypercontractile, now indeterminate; reasons: exclusion added: batch B3 of atpase, assay setting immobileThreshold changed (0.2 → 0.3) and q threshold changed (0.05 → 0.01).`,
    );
  });

  it('a different tool version is a reason', () => {
    const current = study({ toolVersion: '0.3.0', variants: [withVariant(R403Q, { overall: 'indeterminate' }), E500K, D600N] });
    const cmp = compareWithRelease('panel', current, study(), RELEASE);
    expect(cmp.releasedToolVersion).toBe('0.2.0');
    expect(cmp.currentToolVersion).toBe('0.3.0');
    expect(cmp.variants[0]?.changes[0]?.sentence).toBe(
      `Changed ${SINCE}: overall call was hypercontractile, now indeterminate; reason: a different tool version (0.2.0 → 0.3.0; see the changes to the methods).`,
    );
  });

  it('a changed calibration explains a changed evidence level (and not a call)', () => {
    // Two more benign controls read normal: BS3 supporting → BS3 moderate for normal readouts (invented levels).
    const cal = defaultCalibration();
    const after = [{ ...cal[0]!, counts: { ...cal[0]!.counts, benignNormal: 5 }, totalControls: 8, levelNormal: 'BS3 moderate' as const }];
    const current = study({ calibration: after, variants: [R403Q, withVariant(E500K, { evidence: 'BS3 moderate' }), D600N] });
    const cmp = compareWithRelease('panel', current, study(), RELEASE);
    const e = cmp.variants.find((v) => v.short === 'E500K')!;
    expect(e.changes.map((c) => c.kind)).toEqual(['evidence-level']);
    expect(e.sentence).toBe(
      `Changed ${SINCE}: evidence level was BS3 supporting, now BS3 moderate; reason: calibration of overall changed (normal readouts BS3 supporting → BS3 moderate; controls counted 6 of 6 → 8 of 8).`,
    );
  });

  it('a variant made a calibration control: its evidence level changes, with that reason', () => {
    // A control's readout calibrates the assays and carries no evidence level of its own (src/analysis/analyse-study.ts).
    const current = study({ variants: [R403Q, withVariant(E500K, { control: 'benign' }), D600N] });
    const e = compareWithRelease('panel', current, study(), RELEASE).variants.find((v) => v.short === 'E500K')!;
    expect(e.sentence).toBe(`Changed ${SINCE}: evidence level was BS3 supporting, now none; reason: E500K (ZZMYO9) became a benign calibration control.`);
  });

  it('a changed variant list can explain another variant’s call (q values are adjusted across the test variants)', () => {
    const current = study({ variants: [withVariant(R403Q, { overall: 'indeterminate' }), D600N], manifest: { ...MANIFEST, variants: ['WT', 'R403Q', 'D600N'] } });
    const cmp = compareWithRelease('panel', current, study(), RELEASE);
    const r = cmp.variants.find((v) => v.short === 'R403Q')!;
    expect(r.changes[0]?.reasons.map((x) => x.text)).toEqual(['the variant list in the manifest changed']);
    expect(cmp.variants.find((v) => v.short === 'E500K')?.status).toBe('withdrawn');
  });

  it('a new tool version that compares a metric on another scale says the estimate cannot be set against the released CI', () => {
    const spec = (basal: [number, number, number]) => withVariant(R403Q, { metrics: { 'atpase.kcat': [1.38, 1.21, 1.55, 'increased'], 'atpase.basal': [...basal, 'indeterminate'] } });
    const released = study({ scales: { 'atpase.basal': 'ratio' }, variants: [spec([1.2, 0.9, 1.6]), E500K, D600N] });
    const current = study({ toolVersion: '0.3.0', variants: [spec([0.01, -0.01, 0.03]), E500K, D600N] });
    const change = compareWithRelease('panel', current, released, RELEASE).variants[0]?.changes[0];
    expect(change?.kind).toBe('scale-changed');
    expect(change?.text).toBe('basal rate (Actin-activated ATPase) is now compared as a difference (+0.0100), not as a ratio (released 1.20× (95% CI 0.900× to 1.60×)), so it cannot be set against the released interval');
  });

  it('caveats changed are told in the summary even when no call changed', () => {
    const cmp = compareWithRelease('panel', study({ caveats: ['Research data, not a clinical test (test caveat).', 'Batch B2 used old actin.'] }), study(), RELEASE);
    expect(cmp.variants).toEqual([]);
    expect(cmp.summary).toMatch(/ Caveats changed \(1 added, 0 removed\) since the release\.$/);
  });

  it('a manifest changed in layout only is found, and changes no call', () => {
    const current = study();
    current.provenance.manifestSha256 = fakeSha('reformatted');
    expect(studyReasons(study(), current)).toEqual([{ kind: 'manifest-changed', text: 'the manifest file changed in layout only (no field differs)' }]);
  });
});

describe('estimates against the released interval', () => {
  it('lists an estimate outside the released 95% CI, not one inside it or on its edge', () => {
    // Released kcat 1.38 (1.21 to 1.55). Now 1.3: inside. Now 1.21: on the edge (closed interval), inside.
    // Now 1.6: outside. Calls unchanged in all three.
    const at = (effect: number) =>
      compareWithRelease('panel', study({ variants: [withVariant(R403Q, { metrics: { 'atpase.kcat': [effect, effect - 0.15, effect + 0.15, 'increased'] } }), E500K, D600N] }), study(), RELEASE);
    expect(at(1.3).variants).toEqual([]);
    expect(at(1.21).variants).toEqual([]);
    const moved = at(1.6).variants[0]!;
    expect(moved.changes.map((c) => c.kind)).toEqual(['estimate-outside-ci']);
    expect(moved.changes[0]).toMatchObject({ released: { effect: 1.38, ciLow: 1.21, ciHigh: 1.55 }, current: { effect: 1.6 } });
    expect(outsideInterval(1.55, 1.21, 1.55)).toBe(false);
    expect(outsideInterval(1.5500001, 1.21, 1.55)).toBe(true);
    expect(outsideInterval(null, 1.21, 1.55)).toBe(false);
  });

  it('lists an estimate released and now not estimable', () => {
    const cmp = compareWithRelease('panel', study({ variants: [withVariant(R403Q, { overall: 'indeterminate', metrics: { 'atpase.kcat': [null, null, null, 'not estimable'] } }), E500K, D600N] }), study(), RELEASE);
    const lost = cmp.variants[0]!.changes.find((c) => c.kind === 'estimate-lost')!;
    expect(lost.text).toBe('kcat (Actin-activated ATPase) was 1.38× (95% CI 1.21× to 1.55×) and is now not estimable');
  });
});

describe('withdrawn and new variants', () => {
  it('keeps a withdrawn variant listed as withdrawn, with its released call', () => {
    const current = study({ variants: [E500K, D600N], manifest: { ...MANIFEST, variants: ['WT', 'E500K', 'D600N'] } });
    const cmp = compareWithRelease('panel', current, study(), RELEASE);
    expect(cmp.variants.map((v) => [v.short, v.status, v.releasedId, v.currentId])).toEqual([['R403Q', 'withdrawn', 'zzmyo9-r403q', undefined]]);
    expect(cmp.variants[0]?.sentence).toBe(
      `Withdrawn ${SINCE}: in the released results (overall call hypercontractile, evidence level PS3 supporting) but not in the current build; the released results stay as they were released; reason: the variant list in the manifest changed.`,
    );
    expect(cmp.summary).toContain(': 1 withdrawn; 2 unchanged');
  });

  it('lists a variant new since the release, with the data that brought it', () => {
    const G700D: VariantSpec = { hgvs: 'p.Gly700Asp', short: 'G700D', residue: 700, overall: 'hypercontractile', metrics: { 'motility.velocity': [1.4, 1.25, 1.57, 'increased'] } };
    const current = study({
      variants: [R403Q, E500K, D600N, G700D],
      files: [...FILES(), { path: 'motility-velocities.csv', kind: 'motility-velocities', sha256: fakeSha('motility'), rows: 90 }],
      manifest: { ...MANIFEST, variants: [...MANIFEST.variants, 'G700D'] },
    });
    const cmp = compareWithRelease('panel', current, study(), RELEASE);
    expect(cmp.variants.map((v) => [v.short, v.status])).toEqual([['G700D', 'new']]);
    expect(cmp.variants[0]?.sentence).toBe(
      `New ${SINCE}: not in the released results; overall call now hypercontractile (evidence level PS3 supporting); reasons: new data file motility-velocities.csv and the variant list in the manifest changed.`,
    );
  });

  it('matches variants by gene and HGVS, not by label or id, and never lists the wild type', () => {
    const released = study();
    const current = study();
    current.variants = current.variants.map((v) => (v.isWT ? { ...v, id: 'reference', label: 'wild type' } : { ...v, label: `${v.label}-relabelled` }));
    expect(compareWithRelease('panel', current, released, RELEASE).variants).toEqual([]);
  });
});

describe('reasons: files', () => {
  it('tells new rows, removed rows, new and removed files, and moved files apart', () => {
    const before = study({ files: [...FILES(), { path: 'old/force.csv', kind: 'force-pca', sha256: fakeSha('moved bytes'), rows: 5 }, { path: 'gone.csv', kind: 'force-pca', sha256: fakeSha('gone'), rows: 5 }] });
    const after = study({
      files: [
        { path: 'atpase-rates.csv', kind: 'atpase-rates', sha256: fakeSha('more'), rows: 46 },
        { path: 'force-pca.csv', kind: 'force-pca', sha256: fakeSha('fewer'), rows: 24 },
        { path: 'new/force.csv', kind: 'force-pca', sha256: fakeSha('moved bytes'), rows: 5 },
        { path: 'extra.csv', kind: 'force-pca', sha256: fakeSha('extra'), rows: 5 },
      ],
    });
    expect(studyReasons(before, after).map((r) => r.text)).toEqual([
      'new data in atpase-rates.csv (40 → 46 rows)',
      'rows removed from force-pca.csv (30 → 24 rows)',
      'old/force.csv moved to new/force.csv (same bytes)',
      'new data file extra.csv',
      'data file gone.csv removed',
    ]);
  });

  it('canonicalJson ignores key order and keeps list order', () => {
    expect(canonicalJson({ b: 1, a: [2, { d: 3, c: 4 }] })).toBe(canonicalJson({ a: [2, { c: 4, d: 3 }], b: 1 }));
    expect(canonicalJson([1, 2])).not.toBe(canonicalJson([2, 1]));
  });
});
