import { describe, expect, it } from 'vitest';
import { loadStudy } from '../../src/study/load.js';
import type { Issue, LoadOutcome } from '../../src/study/types.js';
import { RATES, baseManifest, load, loadWith } from './fixtures.js';
import { rowsOf } from '../../src/assays/assay-common.js';
import { ATPASE_NADH, ATPASE_RATES } from '../../src/assays/atpase/inputs.js';
import { FORCE_PCA } from '../../src/assays/force/inputs.js';
import { MOTILITY_TRACKS, MOTILITY_VELOCITIES } from '../../src/assays/motility/inputs.js';
import { TURNOVER } from '../../src/assays/turnover/inputs.js';

const errors = (o: LoadOutcome) => o.issues.filter((i) => i.severity === 'error');

describe('a valid in-memory study', () => {
  it('loads with no issues and canonical values', () => {
    const o = load();
    expect(o.issues).toEqual([]);
    const s = o.study!;
    expect(s.variants.map((v) => [v.id, v.hgvs, v.short, v.label])).toEqual([
      ['zzg1-wt', 'WT', 'WT', 'WT'],
      ['zzg1-r2q', 'p.Arg2Gln', 'R2Q', 'R2Q'],
      ['zzg1-k4e', 'p.Lys4Glu', 'K4E', 'K4E'],
    ]);
    expect(rowsOf(s, ATPASE_RATES)[2]).toEqual({ variant: 'zzg1-r2q', unit: 'p1', batch: 'B1', actinUM: 0, ratePerS: 0.04, at: { file: 'rates.csv', line: 4 } });
    expect(s.files[0]).toMatchObject({ kind: 'atpase-rates', path: 'rates.csv', rows: 6 });
    expect(s.files[0]!.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(s.variants[1]!.control).toEqual({ class: 'pathogenic', source: 'invented' });
  });
});

/** One broken fixture per rule: [name, outcome, severity, code, message fragment, location]. */
type Case = [string, () => LoadOutcome, 'error' | 'warning', string, string, Partial<Issue['at']>];

const m = (patch: (x: Record<string, any>) => void) => {
  const x = baseManifest();
  patch(x);
  return load(x);
};
const rates = (text: string, entry: Record<string, unknown> = {}) => loadWith('rates.csv', 'atpase-rates', text, entry);
const RATE_HEAD = 'variant,preparation,batch,actin (uM),rate (1/s)';

const MANIFEST_CASES: Case[] = [
  ['not JSON', () => load('{"title": '), 'error', 'manifest.not-json', 'The manifest is not valid JSON', { file: 'study.json' }],
  ['missing required field', () => m((x) => delete x.title), 'error', 'manifest.required', "The required field 'title' is missing.", { jsonPath: '/title' }],
  ['unknown field', () => m((x) => (x.colour = 'red')), 'error', 'manifest.unknown-field', "'colour' is not a manifest field here.", { jsonPath: '/colour' }],
  ['bad date', () => m((x) => (x.dates = ['01/02/2025'])), 'error', 'manifest.format', 'not a valid date', { jsonPath: '/dates/0' }],
  ['bad direction', () => m((x) => (x.direction = 'up')), 'error', 'manifest.enum', 'not one of the allowed values', { jsonPath: '/direction' }],
  ['WT with a change', () => m((x) => (x.variants[0].hgvs = 'R2Q')), 'error', 'manifest.wt-with-change', 'The wild-type entry has an hgvs change', { jsonPath: '/variants/0/hgvs' }],
  ['variant without hgvs', () => m((x) => x.variants.push({ label: 'X' })), 'error', 'manifest.required', "'hgvs' is missing", { jsonPath: '/variants/3/hgvs' }],
  ['bad control class', () => m((x) => (x.variants[1].control.class = 'VUS')), 'error', 'manifest.enum', 'allowed values', { jsonPath: '/variants/1/control/class' }],
  ['file setting for another kind', () => m((x) => (x.files[0].pixelSize = { value: 0.1, unit: 'um' })), 'error', 'manifest.setting-not-for-kind', 'does not apply to this kind', { jsonPath: '/files/0/pixelSize' }],
  ['HGVS not understood', () => m((x) => (x.variants[2].hgvs = 'c.12A>G')), 'error', 'manifest.hgvs', "'c.12A>G' is not a protein change", { jsonPath: '/variants/2/hgvs' }],
  ['reference residue mismatch', () => m((x) => (x.variants[2].hgvs = 'p.Arg4Glu')), 'error', 'manifest.reference-residue', 'p.Arg4Glu names the wrong reference residue: the ZZG1 sequence has Lys4 there.', { jsonPath: '/variants/2/hgvs' }],
  ['residue beyond the sequence', () => m((x) => (x.variants[2].hgvs = 'R99Q')), 'error', 'manifest.residue-beyond-sequence', 'beyond the end of the ZZG1 sequence (23 residues)', { jsonPath: '/variants/2/hgvs' }],
  ['unknown gene', () => m((x) => (x.variants[2].gene = 'OTHER')), 'error', 'manifest.unknown-gene', "The gene 'OTHER' is not declared", { jsonPath: '/variants/2/gene' }],
  ['gene needed with two genes', () => m((x) => x.genes.push({ symbol: 'ZZG2' })), 'error', 'manifest.gene-required', 'several genes', { jsonPath: '/variants/0/gene' }],
  ['duplicate label', () => m((x) => (x.variants[2].label = 'R2Q')), 'error', 'manifest.duplicate-label', "The label 'R2Q' is used by two variants.", { jsonPath: '/variants/2/label' }],
  ['duplicate variant', () => m((x) => x.variants.push({ hgvs: 'p.Arg2Gln', label: 'again' })), 'error', 'manifest.duplicate-variant', 'p.Arg2Gln is declared twice', { jsonPath: '/variants/3/hgvs' }],
  ['no wild type', () => m((x) => x.variants.shift()), 'error', 'manifest.no-wt', 'No variant is marked as wild type.', { jsonPath: '/variants' }],
  ['two wild types', () => m((x) => x.variants.push({ wt: true, label: 'WT2' })), 'error', 'manifest.multiple-wt', 'More than one wild type', { jsonPath: '/variants/3/wt' }],
  ['domain ends before it starts', () => m((x) => (x.genes[0].domains = [{ name: 'd', start: 9, end: 3 }])), 'error', 'manifest.domain-order', "The domain 'd' ends before it starts.", { jsonPath: '/genes/0/domains/0/end' }],
  ['domain beyond sequence', () => m((x) => (x.genes[0].domains = [{ name: 'd', start: 1, end: 30 }])), 'error', 'manifest.domain-beyond-sequence', 'ends beyond the sequence (23 residues)', { jsonPath: '/genes/0/domains/0/end' }],
  ['sequence with a non-residue letter', () => m((x) => (x.genes[0].sequence = 'MRXB')), 'error', 'manifest.pattern', 'one-letter amino-acid codes', { jsonPath: '/genes/0/sequence' }],
  ['unknown setting', () => m((x) => (x.settings = { motilityImobileUmS: 0.1 })), 'error', 'manifest.unknown-setting', "'motilityImobileUmS' is not an assay setting.", { jsonPath: '/settings/motilityImobileUmS' }],
  ['setting of the wrong type', () => m((x) => (x.settings = { atpaseMinPoints: 'five' })), 'error', 'manifest.setting-type', "The setting 'atpaseMinPoints' must be a number.", { jsonPath: '/settings/atpaseMinPoints' }],
  ['unknown band', () => m((x) => (x.thresholds = { bands: { 'atpase.vmax': [0.8, 1.2] } })), 'error', 'manifest.unknown-band', "'atpase.vmax' is not a metric", { jsonPath: '/thresholds/bands/atpase.vmax' }],
  ['WT baseline for an unknown metric', () => m((x) => (x.thresholds = { wtBaselines: { 'atpase.vmax': { mean: 5, sd: 0.3 } } })), 'error', 'manifest.unknown-band', "'atpase.vmax' is not a metric", { jsonPath: '/thresholds/wtBaselines/atpase.vmax' }],
  ['WT baseline with a zero SD', () => m((x) => (x.thresholds = { wtBaselines: { 'atpase.kcat': { mean: 5, sd: 0 } } })), 'error', 'manifest.range', 'must be > 0', { jsonPath: '/thresholds/wtBaselines/atpase.kcat/sd' }],
  ['band low ≥ high', () => m((x) => (x.thresholds = { bands: { 'atpase.kcat': [1.2, 0.8] } })), 'error', 'manifest.band-order', 'low ≥ high', { jsonPath: '/thresholds/bands/atpase.kcat' }],
  ['q threshold out of range', () => m((x) => (x.thresholds = { qThreshold: 5 })), 'error', 'manifest.range', 'must be < 1', { jsonPath: '/thresholds/qThreshold' }],
  ['exclusion without its target', () => m((x) => (x.exclusions = [{ kind: 'batch', reason: 'r' }])), 'error', 'manifest.required', "'batch' is missing", { jsonPath: '/exclusions/0/batch' }],
  ['exclusion of an unknown assay', () => m((x) => (x.exclusions = [{ kind: 'batch', batch: 'B1', assay: 'atp', reason: 'r' }])), 'error', 'manifest.unknown-assay', "'atp' is not an assay id.", { jsonPath: '/exclusions/0/assay' }],
  ['exclusion of an unknown variant', () => m((x) => (x.exclusions = [{ kind: 'variant', variant: 'Q9R', reason: 'r' }])), 'error', 'manifest.exclusion-variant', "'Q9R' is not declared", { jsonPath: '/exclusions/0/variant' }],
  ['exclusion by the former kind "unit"', () => m((x) => (x.exclusions = [{ kind: 'unit', unit: 'w1', reason: 'r' }])), 'error', 'manifest.renamed-value', "The kind 'unit' is now called 'preparation'", { jsonPath: '/exclusions/0/kind' }],
  ['exclusion naming the former field "unit"', () => m((x) => (x.exclusions = [{ kind: 'unit', unit: 'w1', reason: 'r' }])), 'error', 'manifest.renamed-field', "'unit' is now called 'preparation'", { jsonPath: '/exclusions/0/unit' }],
  ['cross-section by the former "byUnit"', () => loadWith('f.csv', 'force-pca', 'variant,preparation,batch,pCa,force (mN)\nWT,w1,B1,4.5,0.003\n', { crossSection: { unit: 'mm2', byUnit: { w1: 0.0001 } } }), 'error', 'manifest.renamed-field', "'byUnit' is now called 'byPreparation'", { jsonPath: '/files/0/crossSection/byUnit' }],
  ['exclusion of a preparation that matches nothing', () => m((x) => (x.exclusions = [{ kind: 'preparation', preparation: 'w9', reason: 'r' }])), 'warning', 'manifest.exclusion-no-match', "preparation 'w9' does not occur in any file", { jsonPath: '/exclusions/0/preparation' }],
  ['exclusion that matches nothing', () => m((x) => (x.exclusions = [{ kind: 'batch', batch: 'B7', reason: 'r' }])), 'warning', 'manifest.exclusion-no-match', "batch 'B7' does not occur in any file", { jsonPath: '/exclusions/0/batch' }],
  ['file not found', () => m((x) => x.files.push({ path: 'gone.csv', kind: 'turnover' })), 'error', 'folder.file-not-found', "The file 'gone.csv' named in the manifest does not exist", { jsonPath: '/files/1/path' }],
  ['path leaving the folder', () => m((x) => x.files.push({ path: '../secret.csv', kind: 'turnover' })), 'error', 'folder.path-outside', "The path '../secret.csv' leaves the study folder.", { jsonPath: '/files/1/path' }],
  ['absolute path', () => m((x) => x.files.push({ path: '/etc/passwd', kind: 'turnover' })), 'error', 'folder.path-outside', 'leaves the study folder', { jsonPath: '/files/1/path' }],
  ['file listed twice', () => m((x) => x.files.push({ path: 'rates.csv', kind: 'atpase-rates' })), 'error', 'manifest.duplicate-file', "The file 'rates.csv' is listed twice.", { jsonPath: '/files/1/path' }],
  ['units for a column without units', () => m((x) => (x.files[0].units = { variant: 'uM' })), 'error', 'manifest.units-column', "'variant' is not a column with a unit", { jsonPath: '/files/0/units/variant' }],
  ['unknown unit in the manifest', () => m((x) => (x.files[0].units = { actin: 'ug/ml' })), 'error', 'units.unknown', "'ug/ml' is not a known unit of concentration.", { jsonPath: '/files/0/units/actin' }],
  ['declared but unused variant', () => m((x) => x.variants.push({ hgvs: 'L3P' })), 'warning', 'manifest.variant-unused', "The variant 'L3P' is declared but appears in no file.", { jsonPath: '/variants/3' }],
];

const CSV_CASES: Case[] = [
  ['invalid UTF-8', () => load(baseManifest(), { 'rates.csv': new Uint8Array([0x61, 0xff]) }), 'error', 'csv.encoding', 'not valid UTF-8', { file: 'rates.csv' }],
  ['broken quotes', () => rates(`${RATE_HEAD}\nWT,w1,B1,0,"0.03\nWT,w1,B1,5,1\n`), 'error', 'csv.quotes', 'Broken quoting', { file: 'rates.csv', line: 2 }],
  ['duplicate header', () => rates('variant,preparation,batch,actin (uM),rate (1/s),actin_uM\nWT,w1,B1,0,0.03,0\n'), 'error', 'csv.duplicate-header', "The column 'actin' appears twice in the header.", { line: 1, col: 6 }],
  ['missing column', () => rates('variant,preparation,batch,actin (uM)\nWT,w1,B1,0\n'), 'error', 'csv.missing-column', "The column 'rate' is required in atpase-rates files.", { line: 1 }],
  ['the former name of the preparation column', () => rates('variant,unit,batch,actin (uM),rate (1/s)\nWT,w1,B1,0,0.03\n'), 'error', 'csv.renamed-column', "The column 'unit' is now called 'preparation'", { line: 1, col: 2, column: 'unit' }],
  ['unknown column', () => rates(`${RATE_HEAD},comment\nWT,w1,B1,0,0.03,ok\n`), 'warning', 'csv.unknown-column', "The column 'comment' is not used for atpase-rates files and is ignored.", { line: 1, col: 6 }],
  ['no unit', () => rates('variant,preparation,batch,actin,rate (1/s)\nWT,w1,B1,0,0.03\n'), 'error', 'csv.no-unit', "The column 'actin' has no unit.", { line: 1, col: 4, column: 'actin' }],
  ['unknown unit in the header', () => rates('variant,preparation,batch,actin (ug/ml),rate (1/s)\nWT,w1,B1,0,0.03\n'), 'error', 'units.unknown', "'ug/ml' is not a known unit of concentration.", { line: 1, col: 4 }],
  ['header and manifest disagree', () => rates(`${RATE_HEAD}\nWT,w1,B1,0,0.03\n`, { units: { actin: 'nM' } }), 'error', 'csv.unit-conflict', "The header gives 'actin' in µM but the manifest says nM.", { line: 1, col: 4 }],
  ['unit on a unitless column', () => loadWith('f.csv', 'force-pca', 'variant,preparation,batch,pCa (M),tension (kPa)\nWT,w1,B1,5,10\n'), 'error', 'csv.unit-not-expected', "The column 'pCa' takes no unit, but 'M' is given.", { line: 1, col: 4 }],
  ['wrong field count', () => rates(`${RATE_HEAD}\nWT,w1,B1,0\n`), 'error', 'csv.field-count', 'The row has 4 fields but the header has 5.', { line: 2 }],
  ['NA not declared', () => rates(`${RATE_HEAD}\nWT,w1,B1,0,NA\n`), 'error', 'csv.not-a-number', "'NA' in 'rate' is not a number.", { line: 2, col: 5, column: 'rate' }],
  ['date in a number column', () => rates(`${RATE_HEAD}\nWT,w1,B1,2025-01-01,1\n`), 'error', 'csv.not-a-number', "'2025-01-01' in 'actin' is not a number.", { line: 2, col: 4 }],
  ['decimal comma not declared', () => rates(`${RATE_HEAD}\nWT,w1,B1,0,"0,5"\n`), 'error', 'csv.decimal-comma', "'0,5' in 'rate' uses a decimal comma, which the manifest does not declare.", { line: 2, col: 5 }],
  ['decimal comma with comma delimiter', () => rates(`${RATE_HEAD}\nWT,w1,B1,0,1\n`, { decimal: ',' }), 'error', 'csv.decimal-delimiter', 'declares a decimal comma but the file is comma-separated', { line: 1 }],
  ['decimal point in a decimal-comma file', () => rates('variant;preparation;batch;actin (uM);rate (1/s)\nWT;w1;B1;0;1.5\n', { decimal: ',' }), 'error', 'csv.decimal-point', "'1.5' in 'rate' has a decimal point", { line: 2, col: 5 }],
  ['empty required cell', () => rates(`${RATE_HEAD}\nWT,,B1,0,0.03\n`), 'error', 'csv.empty-cell', "The cell in 'preparation' is empty.", { line: 2, col: 2, column: 'preparation' }],
  ['declared missing token', () => rates(`${RATE_HEAD}\nWT,w1,B1,0,NA\nWT,w1,B1,5,1\n`, { missing: ['NA'] }), 'warning', 'csv.missing-value', "'rate' holds the missing-value token 'NA', so the row is not used.", { line: 2, col: 5 }],
  ['negative concentration', () => rates(`${RATE_HEAD}\nWT,w1,B1,-5,0.03\n`), 'error', 'csv.range', "-5 in 'actin' is out of range: it must be >= 0.", { line: 2, col: 4 }],
  ['pCa out of range', () => loadWith('f.csv', 'force-pca', 'variant,preparation,batch,pCa,tension (kPa)\nWT,w1,B1,2.5,10\n'), 'error', 'csv.range', "2.5 in 'pCa' is out of range: it must be >= 3.", { file: 'f.csv', line: 2, col: 4 }],
  ['bad well type', () => loadWith('n.csv', 'atpase-nadh', 'batch,well_type,well,actin (uM),heads (uM),time (s),a340,path (cm)\nB1,blank,A1,0,0,0,1,1\n'), 'error', 'csv.enum', "'blank' is not allowed in 'well_type'.", { line: 2, col: 2 }],
  ['sample well without variant', () => loadWith('n.csv', 'atpase-nadh', 'variant,preparation,batch,well_type,well,actin (uM),heads (uM),time (s),a340,path (cm)\n,p1,B1,sample,A1,0,0.05,0,1,1\n'), 'error', 'csv.empty-cell', "The cell in 'variant' is empty, but sample wells need it.", { line: 2, col: 1 }],
  ['implausible rate', () => rates(`${RATE_HEAD}\nWT,w1,B1,0,150\n`), 'warning', 'csv.implausible', "150 1/s in 'rate' is implausible: per-head rates", { line: 2, col: 5 }],
  ['undeclared variant', () => rates(`${RATE_HEAD}\nWT,w1,B1,0,0.03\nR2W,p1,B1,0,0.03\n`), 'error', 'csv.unknown-variant', "The variant 'R2W' is not declared in the manifest.", { line: 3, col: 1, column: 'variant' }],
  ['batch without WT', () => rates(`${RATE_HEAD}\nWT,w1,B1,0,0.03\nR2Q,p1,B2,0,0.03\nK4E,p2,B2,0,0.03\n`), 'error', 'csv.batch-without-wt', "Batch 'B2' of the atpase-rates data holds 'R2Q', 'K4E' but no wild type.", { line: 3, column: 'batch' }],
  ['repeated observation', () => loadWith('t.csv', 'turnover', 'variant,preparation,batch,trace,time (s),fluorescence\nWT,w1,B1,t1,0,100\nWT,w1,B1,t1,0,99\n'), 'error', 'csv.duplicate-observation', 'This row repeats the observation on line 2', { file: 't.csv', line: 3 }],
  ['identical row', () => rates(`${RATE_HEAD}\nWT,w1,B1,0,0.03\nWT,w1,B1,0,0.03\n`), 'warning', 'csv.duplicate-row', 'This row is identical to line 2.', { line: 3 }],
  ['pixels without pixel size', () => loadWith('k.csv', 'motility-tracks', 'variant,preparation,batch,movie,filament,time (s),x (px),y (um)\nWT,w1,B1,m,f,0,1,1\n'), 'error', 'csv.needs-pixel-size', "'x' is in pixels but the manifest gives no pixelSize", { line: 1, col: 7 }],
  ['frames without interval', () => loadWith('k.csv', 'motility-tracks', 'variant,preparation,batch,movie,filament,frame,x (um),y (um)\nWT,w1,B1,m,f,0,1,1\n'), 'error', 'csv.needs-frame-interval', 'Tracks are given by frame but the manifest gives no frameInterval', { line: 1 }],
  ['neither time nor frame', () => loadWith('k.csv', 'motility-tracks', 'variant,preparation,batch,movie,filament,x (um),y (um)\nWT,w1,B1,m,f,1,1\n'), 'error', 'csv.missing-column', "motility-tracks files need one of the columns 'time', 'frame'.", { line: 1 }],
  ['force without area', () => loadWith('f.csv', 'force-pca', 'variant,preparation,batch,pCa,force (uN)\nWT,w1,B1,5,10\n'), 'error', 'csv.needs-cross-section', "Force is given without a cross-sectional area for preparation 'w1'.", { line: 2, col: 5 }],
  ['NADH without path length', () => loadWith('n.csv', 'atpase-nadh', 'batch,well_type,well,actin (uM),heads (uM),time (s),a340\nB1,actin-only,A1,0,0,0,1\n'), 'error', 'csv.needs-path-length', 'No optical path length', { line: 1 }],
  [
    'header only (beside a file with data; a study without any data row is an error, see tests/study/across-files.test.ts)',
    () => {
      const x = baseManifest();
      x.files.push({ path: 'empty.csv', kind: 'turnover' });
      return load(x, { 'rates.csv': RATES, 'empty.csv': '# just a header\nvariant,preparation,batch,trace,time (s),fluorescence\n' });
    },
    'warning',
    'csv.no-rows',
    'The file has a header but no data rows.',
    { file: 'empty.csv', line: 2 },
  ],
];

describe.each([
  ['manifest', MANIFEST_CASES],
  ['CSV', CSV_CASES],
])('%s rules: one broken fixture per rule', (_group, cases) => {
  it.each(cases)('%s', (_name, run, severity, code, fragment, at) => {
    const outcome = run();
    const hit = outcome.issues.find((i) => i.code === code);
    expect(hit, JSON.stringify(outcome.issues, null, 1)).toBeDefined();
    expect(hit!.severity).toBe(severity);
    expect(hit!.message).toContain(fragment);
    expect(hit!.fix.length).toBeGreaterThan(10);
    expect(hit!.at).toMatchObject(at);
    if (severity === 'error') expect(outcome.study).toBeUndefined();
  });
});

describe('one issue per problem, all problems in one pass', () => {
  it('reports problems from the manifest and several files together', () => {
    const x = baseManifest();
    x.files.push({ path: 'f.csv', kind: 'force-pca' });
    x.settings = { nope: 1 };
    const o = load(x, { 'rates.csv': `${RATE_HEAD}\nWT,w1,B1,-1,0.03\nWT,w1,B1,0,abc\n`, 'f.csv': 'variant,preparation,batch,pCa,tension (kPa)\nWT,w1,B1,11,1\n' });
    expect(errors(o).map((i) => `${i.at.file}:${i.at.line ?? i.at.jsonPath}:${i.code}`).sort()).toEqual([
      'f.csv:2:csv.range',
      'rates.csv:2:csv.range',
      'rates.csv:3:csv.not-a-number',
      'study.json:/settings/nope:manifest.unknown-setting',
    ]);
  });

  it('a WT entry with hgvs gives one error, not an extra if/then summary', () => {
    const x = baseManifest();
    x.variants[0].hgvs = 'R2Q';
    expect(load(x).issues).toHaveLength(1);
  });
});

describe('conversions and accepted forms', () => {
  it('velocity in nm/s becomes µm/s', () => {
    const o = loadWith('v.csv', 'motility-velocities', 'variant,preparation,batch,filament,velocity (nm/s)\nWT,w1,B1,f1,812.5\n');
    expect(rowsOf(o.study!, MOTILITY_VELOCITIES)[0]!.velocityUmS).toBeCloseTo(0.8125, 12); // 812.5e-9 m/s = 0.8125e-6 m/s
  });

  it('force with an area column becomes tension: 12 µN on 400 µm² = 30 kPa (computed from SI definitions)', () => {
    const o = loadWith('f.csv', 'force-pca', 'variant,preparation,batch,pCa,force (uN),area (um2)\nWT,w1,B1,4.5,12,400\n');
    expect(rowsOf(o.study!, FORCE_PCA)[0]!.tensionKPa).toBeCloseTo(30, 10);
  });

  it('force with a manifest cross-section per unit', () => {
    const o = loadWith('f.csv', 'force-pca', 'variant,preparation,batch,pCa,force (mN)\nWT,w1,B1,4.5,0.003\n', { crossSection: { unit: 'mm2', byPreparation: { w1: 0.0001 } } });
    expect(rowsOf(o.study!, FORCE_PCA)[0]!.tensionKPa).toBeCloseTo(30, 10); // 0.003 mN / 1e-4 mm² = 30 mN/mm²
  });

  it('frames and pixels become seconds and micrometres', () => {
    const o = loadWith('k.csv', 'motility-tracks', 'variant,preparation,batch,movie,filament,frame,x (px),y (px)\nWT,w1,B1,m,f,3,10,20\n', {
      pixelSize: { value: 160, unit: 'nm' },
      frameInterval: { value: 200, unit: 'ms' },
    });
    expect(errors(o)).toEqual([]);
    const r = rowsOf(o.study!, MOTILITY_TRACKS)[0]!;
    expect(r.timeS).toBeCloseTo(0.6, 12);
    expect(r.xUm).toBeCloseTo(1.6, 12);
    expect(r.yUm).toBeCloseTo(3.2, 12);
  });

  it('minutes in the manifest units, header forms actin_uM and [µM], BOM, semicolons and decimal comma', () => {
    const text = '\ufeff# comment\nvariant;preparation;batch;trace;time;fluorescence\nWT;w1;B1;t;1,5;100\n';
    const o = loadWith('t.csv', 'turnover', text, { units: { time: 'min' }, decimal: ',' });
    expect(errors(o)).toEqual([]);
    expect(rowsOf(o.study!, TURNOVER)[0]).toMatchObject({ timeS: 90, at: { line: 3 } });
    const a = rates('variant,preparation,batch,actin_uM,rate_per_s\nWT,w1,B1,5,1\n');
    expect(rowsOf(a.study!, ATPASE_RATES)[0]).toMatchObject({ actinUM: 5, ratePerS: 1 });
    const b = rates('variant,preparation,batch,actin [mM],rate (1/min)\nWT,w1,B1,0.05,60\n');
    expect(rowsOf(b.study!, ATPASE_RATES)[0]!.actinUM).toBeCloseTo(50, 12); // 0.05 mM
    expect(rowsOf(b.study!, ATPASE_RATES)[0]!.ratePerS).toBeCloseTo(1, 12); // 60 per minute
  });

  it("'00123' is 123 in a number column and stays text in a text column", () => {
    const o = rates(`${RATE_HEAD}\nWT,00123,B1,00123,1\n`);
    expect(rowsOf(o.study!, ATPASE_RATES)[0]).toMatchObject({ unit: '00123', actinUM: 123 });
  });

  it('NADH: actin-only wells have empty variant/unit and path from the manifest', () => {
    const text = 'variant,preparation,batch,well_type,well,actin (uM),heads (uM),time (s),a340\n,,B1,actin-only,A1,10,0,0,0.9\nWT,w1,B1,sample,A2,10,0.05,0,0.9\n';
    const o = loadWith('n.csv', 'atpase-nadh', text, { pathLength: { value: 5, unit: 'mm' } });
    expect(errors(o)).toEqual([]);
    expect(rowsOf(o.study!, ATPASE_NADH).map((r) => [r.variant, r.wellType, r.pathCm])).toEqual([
      ['', 'actin-only', 0.5],
      ['zzg1-wt', 'sample', 0.5],
    ]);
  });

  it('accepts file bytes and a Map of files', () => {
    const o = loadStudy({ manifest: new TextEncoder().encode(JSON.stringify(baseManifest())), files: new Map([['rates.csv', new TextEncoder().encode(RATES)]]) });
    expect(errors(o)).toEqual([]);
  });
});

describe('variant names in CSV files', () => {
  it('accept the label, the short form and the HGVS of a declared variant', () => {
    const x = baseManifest();
    x.variants[1].label = 'mutant-1';
    const o = load(x, { 'rates.csv': `${RATE_HEAD}\nWT,w1,B1,0,0.03\nmutant-1,p1,B1,0,0.04\nR2Q,p1,B1,5,0.5\np.Arg2Gln,p1,B1,10,0.9\np.Lys4Glu,p2,B1,0,0.03\n` });
    expect(errors(o)).toEqual([]);
    expect(rowsOf(o.study!, ATPASE_RATES).map((r) => r.variant)).toEqual(['zzg1-wt', 'zzg1-r2q', 'zzg1-r2q', 'zzg1-r2q', 'zzg1-k4e']);
  });
});
