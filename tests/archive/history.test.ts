/**
 * The archive's history across studies. Calls are written by hand in each study below; the expected
 * concordance follows from the rules in src/archive/concordance.ts, applied by hand in the comments.
 */
import { describe, expect, it } from 'vitest';
import { describeCalls, judgeScope } from '../../src/archive/concordance.js';
import { buildHistory, type ArchiveEntry } from '../../src/archive/history.js';
import { sameVariant, variantKey } from '../../src/archive/identity.js';
import type { StudyResults } from '../../src/results/types.js';
import { makeResults, type VariantSpec } from './study-results.js';

const R403Q = (overall: VariantSpec['overall'], kcat: [number, number, number, 'increased' | 'decreased' | 'within WT range' | 'indeterminate']): VariantSpec => ({
  hgvs: 'p.Arg403Gln',
  short: 'R403Q',
  residue: 403,
  overall,
  metrics: { 'atpase.kcat': kcat },
});
const G700D = (overall: VariantSpec['overall'], kcat: [number, number, number, 'increased' | 'decreased' | 'within WT range' | 'indeterminate']): VariantSpec => ({
  hgvs: 'p.Gly700Asp',
  short: 'G700D',
  residue: 700,
  overall,
  metrics: { 'atpase.kcat': kcat },
});

function entry(studyId: string, title: string, date: string, results: StudyResults, release?: ArchiveEntry['release']): ArchiveEntry {
  return { studyId, title, dates: [date], results, ...(release ? { release } : {}) };
}

/** The demo shape: a panel, a re-measurement of two of its variants, a study of a second gene. */
function archive(): ArchiveEntry[] {
  const panel = makeResults({
    title: 'Panel',
    dates: ['2025-03-10'],
    variants: [
      R403Q('hypercontractile', [1.5, 1.3, 1.7, 'increased']),
      G700D('hypercontractile', [1.4, 1.28, 1.55, 'increased']),
      { hgvs: 'p.Glu500Lys', short: 'E500K', residue: 500, overall: 'within WT range', metrics: { 'atpase.kcat': [1.0, 0.9, 1.1, 'within WT range'] } },
    ],
  });
  const remeasure = makeResults({
    title: 'Re-measure',
    dates: ['2025-10-02'],
    variants: [R403Q('hypercontractile', [1.45, 1.3, 1.6, 'increased']), G700D('within WT range', [1.02, 0.92, 1.12, 'within WT range'])],
  });
  const second = makeResults({
    title: 'Second gene',
    dates: ['2026-01-20'],
    variants: [{ gene: 'ZZACT2', hgvs: 'p.Glu99Lys', short: 'E99K', residue: 99, overall: 'hypocontractile', metrics: { 'motility.velocity': [0.6, 0.5, 0.7, 'decreased'] } }],
  });
  return [
    // Given out of order on purpose: the history orders by date.
    entry('second-gene', 'Second gene', '2026-01-20', second),
    entry('remeasure', 'Re-measure', '2025-10-02', remeasure),
    entry('panel', 'Panel', '2025-03-10', panel),
    entry('panel', 'Panel', '2025-03-10', panel, { id: '2025-04-01-1', date: '2025-04-01', note: 'sent to the cardiogenetics clinic' }),
  ];
}

describe('variant identity', () => {
  it('is gene + normalised HGVS; the wild type is never matched', () => {
    expect(variantKey({ gene: 'ZZMYO9', hgvs: 'p.Arg403Gln' })).toBe('ZZMYO9:p.Arg403Gln');
    expect(sameVariant({ gene: 'G', hgvs: 'p.Arg403Gln', isWT: false }, { gene: 'G', hgvs: 'p.Arg403Gln', isWT: false })).toBe(true);
    expect(sameVariant({ gene: 'G', hgvs: 'p.Arg403Gln', isWT: false }, { gene: 'H', hgvs: 'p.Arg403Gln', isWT: false })).toBe(false);
    expect(sameVariant({ gene: 'G', hgvs: 'WT', isWT: true }, { gene: 'G', hgvs: 'WT', isWT: true })).toBe(false);
  });

  it('lists no wild type in the history, though every study has one', () => {
    const h = buildHistory(archive());
    expect(h.variants.map((v) => v.key)).toEqual(['ZZACT2:p.Glu99Lys', 'ZZMYO9:p.Arg403Gln', 'ZZMYO9:p.Glu500Lys', 'ZZMYO9:p.Gly700Asp']);
  });
});

describe('history of a variant', () => {
  it('sets one row per study and release side by side, per metric, saying where each row comes from', () => {
    const v = buildHistory(archive()).variants.find((x) => x.short === 'R403Q')!;
    const kcat = v.metrics.find((m) => m.key === 'atpase.kcat')!;
    // Archive order: Panel's release (2025-04-01), Panel's current build, then Re-measure (later date).
    expect(kcat.rows.map((r) => [r.studyId, r.origin, r.release?.id ?? null, r.effect, r.ciLow, r.ciHigh, r.call, r.nVariantUnits])).toEqual([
      ['panel', 'release', '2025-04-01-1', 1.5, 1.3, 1.7, 'increased', 3],
      ['panel', 'current build', null, 1.5, 1.3, 1.7, 'increased', 3],
      ['remeasure', 'current build', null, 1.45, 1.3, 1.6, 'increased', 3],
    ]);
    expect(kcat.rows[0]?.label).toBe('Panel (2025-03-10), the release of 2025-04-01');
    expect(kcat.label).toBe('kcat');
    expect(kcat.assayLabel).toBe('Actin-activated ATPase');
    expect(v.overall.map((r) => r.call)).toEqual(['hypercontractile', 'hypercontractile', 'hypercontractile']);
  });

  it('calls the re-measured variant with the same calls concordant', () => {
    // Counted: Panel's current build and Re-measure (the latest entry of each study).
    // Overall hyper/hyper and kcat increased/increased: two determinate calls agreeing in each scope.
    const v = buildHistory(archive()).variants.find((x) => x.short === 'R403Q')!;
    expect(v.concordance.status).toBe('concordant');
    expect(v.concordance.studies).toEqual(['panel', 'remeasure']);
    expect(v.concordance.sentence).toBe(
      'Concordant: the 2 studies that measured it agree on every call two or more of them could make — overall call hypercontractile; kcat (Actin-activated ATPase) increased.',
    );
    expect(v.latest).toMatchObject({ studyId: 'remeasure', origin: 'current build', call: 'hypercontractile', withdrawn: false });
  });

  it('flags increased in one study and within WT range in another as discordant, naming the metric and studies', () => {
    // Overall hypercontractile (Panel) vs within WT range (Re-measure): change vs within → discordant;
    // kcat increased vs within WT range likewise.
    const h = buildHistory(archive());
    const v = h.variants.find((x) => x.short === 'G700D')!;
    expect(v.concordance.status).toBe('discordant');
    expect(v.concordance.disagreements.map((d) => [d.scope, d.kind])).toEqual([
      ['overall', 'change vs within WT range'],
      ['atpase.kcat', 'change vs within WT range'],
    ]);
    expect(v.concordance.sentence).toBe(
      'Discordant between the 2 studies that measured it: overall call hypercontractile in Panel (2025-03-10), but within WT range in Re-measure (2025-10-02); kcat (Actin-activated ATPase) increased in Panel (2025-03-10), but within WT range in Re-measure (2025-10-02).',
    );
    expect(h.discordant).toEqual(['ZZMYO9:p.Gly700Asp']);
    // The home page flags it on both studies that measured it.
    expect(h.studies.find((s) => s.studyId === 'panel')!.discordant).toEqual(['ZZMYO9:p.Gly700Asp']);
    expect(h.studies.find((s) => s.studyId === 'remeasure')!.discordant).toEqual(['ZZMYO9:p.Gly700Asp']);
    // Latest call: Re-measure is the later study.
    expect(v.latest).toMatchObject({ studyId: 'remeasure', call: 'within WT range' });
  });

  it('flags opposite directions as discordant', () => {
    // kcat increased in one study, decreased in the other; overall hyper vs hypo.
    const a = makeResults({ variants: [R403Q('hypercontractile', [1.5, 1.3, 1.7, 'increased'])] });
    const b = makeResults({ variants: [R403Q('hypocontractile', [0.6, 0.5, 0.7, 'decreased'])] });
    const v = buildHistory([entry('a', 'A', '2025-01-01', a), entry('b', 'B', '2025-02-01', b)]).variants[0]!;
    expect(v.concordance.status).toBe('discordant');
    expect(v.concordance.disagreements.map((d) => d.kind)).toEqual(['opposite directions', 'opposite directions']);
    expect(v.concordance.sentence).toContain('kcat (Actin-activated ATPase), in opposite directions: increased in A (2025-01-01), but decreased in B (2025-02-01)');
  });

  it('does not call two studies concordant when only one of them could make a call', () => {
    // Overall hyper vs indeterminate, kcat increased vs indeterminate: one determinate call per scope.
    const a = makeResults({ variants: [R403Q('hypercontractile', [1.5, 1.3, 1.7, 'increased'])] });
    const b = makeResults({ variants: [R403Q('indeterminate', [1.3, 1.1, 1.5, 'indeterminate'])] });
    const v = buildHistory([entry('a', 'A', '2025-01-01', a), entry('b', 'B', '2025-02-01', b)]).variants[0]!;
    expect(v.concordance.status).toBe('inconclusive');
    expect(v.concordance.sentence).toMatch(/^Not comparable yet/);
  });

  it('calls mixed beside hypercontractile inconclusive, not discordant, and says which calls differ', () => {
    const a = makeResults({ variants: [R403Q('mixed', [1.5, 1.3, 1.7, 'increased'])] });
    const b = makeResults({ variants: [R403Q('hypercontractile', [1.5, 1.3, 1.7, 'increased'])] });
    const v = buildHistory([entry('a', 'A', '2025-01-01', a), entry('b', 'B', '2025-02-01', b)]).variants[0]!;
    expect(v.concordance.status).toBe('inconclusive');
    expect(v.concordance.sentence).toContain('overall call mixed in A (2025-01-01), but hypercontractile in B (2025-02-01)');
  });

  it('says single study for a variant measured once', () => {
    const v = buildHistory(archive()).variants.find((x) => x.short === 'E500K')!;
    expect(v.concordance).toMatchObject({ status: 'single study', sentence: 'Measured in one study only, Panel (2025-03-10); there is nothing to compare it with.' });
  });

  it('counts each study once, by its latest analysis: a release that differs from its own current build is not a second study', () => {
    // Panel released G700D as hypercontractile and now calls it within WT range: one study, two analyses.
    const released = makeResults({ variants: [G700D('hypercontractile', [1.4, 1.28, 1.55, 'increased'])] });
    const now = makeResults({ variants: [G700D('within WT range', [1.02, 0.92, 1.12, 'within WT range'])] });
    const v = buildHistory([entry('panel', 'Panel', '2025-03-10', released, { id: '2025-04-01-1', date: '2025-04-01', note: 'n' }), entry('panel', 'Panel', '2025-03-10', now)]).variants[0]!;
    expect(v.concordance.status).toBe('single study');
    expect(v.overall.map((r) => [r.origin, r.call])).toEqual([
      ['release', 'hypercontractile'],
      ['current build', 'within WT range'],
    ]);
    expect(v.latest).toMatchObject({ origin: 'current build', call: 'within WT range' });
  });

  it('keeps a variant withdrawn from a study listed, from its release, and does not compare it', () => {
    const released = makeResults({ variants: [R403Q('hypercontractile', [1.5, 1.3, 1.7, 'increased'])] });
    const now = makeResults({ variants: [] });
    const v = buildHistory([entry('panel', 'Panel', '2025-03-10', released, { id: '2025-04-01-1', date: '2025-04-01', note: 'n' }), entry('panel', 'Panel', '2025-03-10', now)]).variants[0]!;
    expect(v.studies).toEqual([{ studyId: 'panel', title: 'Panel', date: '2025-03-10', withdrawn: true }]);
    expect(v.latest).toMatchObject({ origin: 'release', call: 'hypercontractile', withdrawn: true });
    expect(v.concordance.sentence).toBe(
      "Not measured in the latest analysis of any study. It was withdrawn from Panel (2025-03-10) after a release there, so that study's released calls are shown but not compared.",
    );
  });

  it('notes rows on different bands or scales before anyone compares their effects', () => {
    const a = makeResults({ variants: [{ ...R403Q('hypercontractile', [1.5, 1.3, 1.7, 'increased']), metrics: { 'atpase.kcat': [1.5, 1.3, 1.7, 'increased'], 'atpase.basal': [1.1, 0.9, 1.3, 'indeterminate'] } }], scales: { 'atpase.basal': 'ratio' } });
    const b = makeResults({
      variants: [{ ...R403Q('hypercontractile', [1.5, 1.3, 1.7, 'increased']), metrics: { 'atpase.kcat': [1.5, 1.3, 1.7, 'increased'], 'atpase.basal': [0.01, -0.01, 0.03, 'indeterminate'] } }],
      settings: { bands: { 'atpase.kcat': [0.85, 1.2] } },
    });
    const v = buildHistory([entry('a', 'A', '2025-01-01', a), entry('b', 'B', '2025-02-01', b)]).variants[0]!;
    const basal = v.metrics.find((m) => m.key === 'atpase.basal')!;
    expect(basal.scales).toEqual(['ratio', 'difference']);
    expect(basal.notes[0]).toContain('different scales');
    const kcat = v.metrics.find((m) => m.key === 'atpase.kcat')!;
    expect(kcat.notes).toEqual(['The WT-like bands differ between rows (0.800× to 1.25× in A (2025-01-01); 0.850× to 1.20× in B (2025-02-01)); each call is made against its own study\'s band.']);
  });
});

describe('gene pages and the home page', () => {
  it('lists per gene every variant measured in any study, by residue, with its latest call and concordance', () => {
    const h = buildHistory(archive());
    expect(h.genes.map((g) => g.symbol)).toEqual(['ZZACT2', 'ZZMYO9']);
    expect(h.genes[1]?.variants.map((v) => [v.short, v.studies, v.latest.call, v.concordance])).toEqual([
      ['R403Q', 2, 'hypercontractile', 'concordant'],
      ['E500K', 1, 'within WT range', 'single study'],
      ['G700D', 2, 'within WT range', 'discordant'],
    ]);
  });

  it('summarises each study from its latest analysis, with its releases', () => {
    const h = buildHistory(archive());
    const panel = h.studies.find((s) => s.studyId === 'panel')!;
    expect(panel).toMatchObject({
      origin: 'current build',
      variants: 3,
      genes: ['ZZMYO9'],
      toolVersion: '0.2.0',
      calls: [
        { call: 'hypercontractile', count: 2 },
        { call: 'within WT range', count: 1 },
      ],
      latestRelease: { id: '2025-04-01-1', date: '2025-04-01', note: 'sent to the cardiogenetics clinic' },
    });
    expect(h.synthetic).toBe(true);
  });

  it('is the same whatever order the entries come in', () => {
    const entries = archive();
    expect(buildHistory([...entries].reverse())).toEqual(buildHistory(entries));
  });

  it('refuses the same analysis twice (a caller error)', () => {
    const e = archive()[0]!;
    expect(() => buildHistory([e, e])).toThrow(/two current builds/);
  });
});

describe('judgeScope and describeCalls', () => {
  it('reads every pair of determinate calls by the rules (table built by hand)', () => {
    const pair = (a: string, b: string) =>
      judgeScope('s', 'x', [
        { studyId: '1', studyName: '1', call: a as never },
        { studyId: '2', studyName: '2', call: b as never },
      ]).status;
    expect(pair('increased', 'increased')).toBe('concordant');
    expect(pair('increased', 'within WT range')).toBe('discordant');
    expect(pair('decreased', 'within WT range')).toBe('discordant');
    expect(pair('increased', 'decreased')).toBe('discordant');
    expect(pair('within WT range', 'within WT range')).toBe('concordant');
    expect(pair('increased', 'indeterminate')).toBe('not comparable');
    expect(pair('not estimable', 'within WT range')).toBe('not comparable');
    expect(pair('mixed', 'within WT range')).toBe('discordant');
    expect(pair('mixed', 'hypocontractile')).toBe('inconclusive');
    expect(pair('hypercontractile', 'hypocontractile')).toBe('discordant');
  });

  it('groups studies by call', () => {
    expect(
      describeCalls([
        { studyName: 'A', call: 'increased' },
        { studyName: 'B', call: 'within WT range' },
        { studyName: 'C', call: 'increased' },
      ]),
    ).toBe('increased in A and C, but within WT range in B');
  });
});
