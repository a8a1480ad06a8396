/**
 * Minimal StudyResults built by hand for the archive tests. Everything here is invented (genes
 * ZZMYO9 and ZZACT2, invented labs and numbers): these objects exercise matching, history and
 * release comparison, not science. Calls and evidence levels are given by each test, not computed,
 * so that a test states the calls it is about; numbers are whatever the test writes beside them.
 * tests/archive/study-results.test.ts checks the output against schemas/results.schema.json.
 */
import { createHash } from 'node:crypto';
import type {
  Calibration,
  EvidenceLevel,
  FunctionCall,
  MetricCall,
  MetricComparison,
  MetricDef,
  StudyResults,
  UnitResult,
  VariantResult,
} from '../../src/results/types.js';
import type { ControlClass } from '../../src/study/types.js';

/** effect, 95% CI low, high, call; scale and unit come from the metric. */
export type MetricSpec = [effect: number | null, ciLow: number | null, ciHigh: number | null, call: MetricCall];

export interface VariantSpec {
  gene?: string;
  hgvs: string;
  short: string;
  residue?: number;
  overall: FunctionCall;
  evidence?: EvidenceLevel;
  control?: ControlClass;
  /** Keyed '<assay>.<metric>'. */
  metrics?: Record<string, MetricSpec>;
  /** Input file of the variant's units per assay (default: ASSAY_FILES). */
  files?: Record<string, string>;
}

export interface StudySpec {
  title?: string;
  dates?: string[];
  toolVersion?: string;
  genes?: string[];
  direction?: StudyResults['study']['direction'];
  caveats?: string[];
  variants: VariantSpec[];
  /** Input files; default one per assay, 40 rows each, SHA-256 of the path. */
  files?: Array<{ path: string; kind: string; sha256: string; rows: number }>;
  /** The manifest as given (provenance.manifest); its SHA-256 is taken over its JSON text. */
  manifest?: Record<string, unknown>;
  settings?: Partial<StudyResults['settings']>;
  calibration?: Calibration[];
  /** Override one metric's scale (e.g. a method change): '<assay>.<metric>' → scale. */
  scales?: Record<string, 'ratio' | 'difference'>;
}

export const ASSAY_FILES: Record<string, string> = {
  atpase: 'atpase-rates.csv',
  motility: 'motility-velocities.csv',
  force: 'force-pca.csv',
};

const ASSAY_DEFS: Array<{ id: string; label: string; metrics: MetricDef[] }> = [
  {
    id: 'atpase',
    label: 'Actin-activated ATPase',
    metrics: [
      { id: 'kcat', label: 'kcat', unit: 's⁻¹', scale: 'ratio', hyper: 'up', primary: true, description: 'Maximal rate per head.' },
      { id: 'basal', label: 'basal rate', unit: 's⁻¹', scale: 'difference', hyper: 'none', primary: false, description: 'Rate without actin.' },
    ],
  },
  {
    id: 'motility',
    label: 'In vitro motility',
    metrics: [{ id: 'velocity', label: 'mean velocity', unit: 'µm/s', scale: 'ratio', hyper: 'up', primary: true, description: 'Mean sliding velocity.' }],
  },
  {
    id: 'force',
    label: 'Force–pCa',
    metrics: [{ id: 'pCa50', label: 'pCa50', unit: '', scale: 'difference', hyper: 'up', primary: true, description: 'Calcium sensitivity.' }],
  },
];

export const DEFAULT_BANDS: Record<string, [number, number]> = {
  'atpase.kcat': [0.8, 1.25],
  'atpase.basal': [-0.02, 0.02],
  'motility.velocity': [0.8, 1.25],
  'force.pCa50': [-0.1, 0.1],
};

/** A SHA-256 standing for a file's bytes: the hash of a label (so that a test can say "changed bytes" by changing the label). */
export function fakeSha(label: string): string {
  return createHash('sha256').update(label).digest('hex');
}

function defaultEvidence(call: FunctionCall, control?: ControlClass): EvidenceLevel {
  if (control) return 'none';
  return call === 'hypercontractile' ? 'PS3 supporting' : call === 'within WT range' ? 'BS3 supporting' : 'none';
}

export function defaultCalibration(): Calibration[] {
  return [
    {
      scope: 'overall',
      counts: { pathogenicAbnormal: 3, pathogenicNormal: 0, benignAbnormal: 0, benignNormal: 3, notCounted: 0 },
      totalControls: 6,
      p1: 0.5,
      p2Abnormal: 0.8,
      p2Normal: 0.2,
      oddsPathAbnormal: 3,
      oddsPathNormal: 0.3333,
      levelAbnormal: 'PS3 supporting',
      levelNormal: 'BS3 supporting',
      notes: [],
    },
  ];
}

/** The id the study gives a variant (lower-case gene and short form, as src/study/hgvs.ts makes them). */
export function idOf(gene: string, short: string): string {
  return `${gene.toLowerCase()}-${short.toLowerCase()}`;
}

/** A metric key '<assay>.<metric>' split at its first dot. */
function splitKey(key: string): [assay: string, metric: string] {
  const dot = key.indexOf('.');
  if (dot < 0) throw new Error(`a metric key needs '<assay>.<metric>': ${key}`);
  return [key.slice(0, dot), key.slice(dot + 1)];
}

/** What the fixture looks up and must know. */
function known<T>(value: T | undefined, what: string): T {
  if (value === undefined) throw new Error(`the test fixture knows no ${what}`);
  return value;
}

/** Build a minimal, schema-valid StudyResults from a spec. */
export function makeResults(spec: StudySpec): StudyResults {
  const genes = spec.genes ?? [...new Set(spec.variants.map((v) => v.gene ?? 'ZZMYO9'))];
  if (genes.length === 0) genes.push('ZZMYO9');
  const bands = { ...DEFAULT_BANDS, ...(spec.settings?.bands ?? {}) };
  const assays = ASSAY_DEFS.map((a) => ({
    ...a,
    metrics: a.metrics.map((m) => ({ ...m, scale: spec.scales?.[`${a.id}.${m.id}`] ?? m.scale })),
    methods: [`${a.label}: invented methods text for tests.`],
  }));
  const defOf = (key: string) => {
    const [assay, metric] = key.split('.');
    return assays.find((a) => a.id === assay)!.metrics.find((m) => m.id === metric)!;
  };

  const wts: VariantResult[] = genes.map((g) => ({
    id: idOf(g, 'wt'),
    gene: g,
    hgvs: 'WT',
    short: 'WT',
    label: 'WT',
    isWT: true,
    assayCalls: [],
    overall: { call: 'within WT range', sentence: 'Wild-type reference: every comparison is made against it.', readout: null },
    evidence: { level: 'none', scope: 'overall', sentence: 'Not applicable: wild-type reference.' },
    flags: [],
  }));

  const units: UnitResult[] = [];
  const comparisons: MetricComparison[] = [];
  const measuredAssays = new Set<string>();
  const variants: VariantResult[] = spec.variants.map((v) => {
    const gene = v.gene ?? 'ZZMYO9';
    const id = idOf(gene, v.short);
    const metricKeys = Object.keys(v.metrics ?? {});
    const assaysOf = [...new Set(metricKeys.map((k) => splitKey(k)[0]))];
    for (const assay of assaysOf) {
      measuredAssays.add(assay);
      const file = v.files?.[assay] ?? known(ASSAY_FILES[assay], `input file of ${assay}`);
      units.push({ assay, variant: id, unit: `${id}-p1`, batch: 'B1', metrics: {}, flags: [], nTechnical: 4, plot: { points: [] }, source: [{ file, line: 2, lineEnd: 5 }] });
    }
    for (const key of metricKeys) {
      const [assay, metric] = splitKey(key);
      const [effect, ciLow, ciHigh, call] = known(v.metrics?.[key], `metric ${key}`);
      const def = defOf(key);
      comparisons.push({
        assay,
        metric,
        variant: id,
        scale: def.scale,
        unit: def.unit,
        effect,
        ciLow,
        ciHigh,
        se: effect === null ? null : 0.05,
        df: effect === null ? null : 4,
        variance: effect === null ? null : 'separate',
        pBeyond: null,
        q: null,
        pWithin: null,
        nVariantUnits: 3,
        nWtUnits: 3,
        variantMean: null,
        wtMean: null,
        batches: ['B1'],
        band: known(bands[key], `band of ${key}`),
        call,
        sentence: `${def.label} ${call} (test sentence).`,
        flags: [],
      });
    }
    const readout = v.overall === 'hypercontractile' ? 'abnormal' : v.overall === 'within WT range' ? 'normal' : null;
    return {
      id,
      gene,
      hgvs: v.hgvs,
      short: v.short,
      label: v.short,
      isWT: false,
      ...(v.residue !== undefined ? { residue: v.residue } : {}),
      ...(v.control ? { control: { class: v.control, source: 'invented for tests' } } : {}),
      assayCalls: assaysOf.map((assay) => ({ assay, variant: id, call: v.overall, sentence: `${v.overall} (test sentence).`, readout })),
      overall: { call: v.overall, sentence: `${v.overall} overall (test sentence).`, readout },
      evidence: { level: v.evidence ?? defaultEvidence(v.overall, v.control), scope: 'overall', sentence: 'Evidence sentence (test).' },
      flags: [],
    };
  });
  for (const wt of wts) {
    for (const assay of measuredAssays) {
      units.push({ assay, variant: wt.id, unit: `${wt.id}-p1`, batch: 'B1', metrics: {}, flags: [], nTechnical: 4, plot: { points: [] }, source: [{ file: known(ASSAY_FILES[assay], `input file of ${assay}`), line: 6, lineEnd: 9 }] });
    }
  }

  const files =
    spec.files ??
    Object.entries(ASSAY_FILES).map(([assay, path]) => ({ path, kind: assay === 'atpase' ? 'atpase-rates' : assay === 'motility' ? 'motility-velocities' : 'force-pca', sha256: fakeSha(path), rows: 40 }));
  const manifest = spec.manifest ?? { title: spec.title ?? 'Invented study (synthetic)', files: files.map((f) => ({ path: f.path, kind: f.kind })) };
  return {
    schemaVersion: 1,
    tool: { name: 'myofolio', version: spec.toolVersion ?? '0.2.0' },
    study: {
      title: spec.title ?? 'Invented study (synthetic)',
      lab: 'Invented Motor Lab',
      dates: spec.dates ?? ['2025-03-10'],
      synthetic: true,
      direction: spec.direction ?? 'hypercontractile',
      caveats: spec.caveats ?? ['Research data, not a clinical test (test caveat).'],
      genes: genes.map((symbol) => ({ symbol, domains: [] })),
    },
    settings: {
      qThreshold: 0.05,
      equivalenceAlpha: 0.05,
      combiningRule: 'Combining rule (test text).',
      bandSource: Object.fromEntries(Object.keys(bands).map((k) => [k, 'default'])),
      comparisonMethod: 'Comparison method (test text).',
      ...spec.settings,
      bands,
    },
    assays,
    variants: [...wts, ...variants],
    units,
    comparisons,
    calibration: spec.calibration ?? defaultCalibration(),
    controlCharts: [],
    exclusions: [],
    provenance: {
      files,
      manifestSha256: fakeSha(JSON.stringify(manifest)),
      manifest,
      builtAt: '2025-03-11T00:00:00.000Z',
    },
    issues: [],
  };
}
