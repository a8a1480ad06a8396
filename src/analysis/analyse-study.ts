/**
 * analyseStudy: the pure heart of myofolio. A checked Study in, StudyResults out.
 *
 *   Study ──analyse──▶ UnitResult[]           per biological unit, per assay (src/assays/*)
 *         ──exclude──▶ units marked excluded  manifest exclusions, with their reasons
 *         ──normalise▶ MetricComparison[]     variant vs WT of the same batches (normalise.ts)
 *         ──score────▶ assay and variant calls, with sentences (score.ts)
 *         ──qc───────▶ WT control charts, Westgard rules; rejected batches flag their variants
 *         ──calibrate▶ OddsPath per assay and overall; evidence ceiling per variant
 *         ──checks───▶ warnings that need the units (study-checks.ts), with the loader's; each
 *                      variant carries those that touch it
 *         ──────────▶ StudyResults (src/results/types.ts)
 *
 * No I/O, no clock: the build time comes in as an argument.
 */
import { activeModules, groupBy } from '../assays/assay-common.js';
import { ASSAYS } from '../assays/registry.js';
import type { AssayModule } from '../assays/types.js';
import { bandFromBenignControls } from '../calibrate/bands.js';
import { calibrate, evidenceForReadout } from '../calibrate/oddspath.js';
import { BANDS } from '../assays/assembled.js';
import { STATS } from '../defaults.js';
import type {
  AssayCall,
  Calibration,
  ControlChart,
  Flag,
  MetricComparison,
  StudyResults,
  UnitResult,
  VariantResult,
} from '../results/types.js';
import { groupIssues } from '../study/group-issues.js';
import type { Exclusion, Issue, Study, Variant } from '../study/types.js';
import { ANALYSIS_MSG } from './messages.js';
import { compareAssay } from './normalise.js';
import { assayCall, callComparisons, combiningRule, variantCall } from './score.js';
import { wtControlCharts } from './control-charts.js';
import { studyChecks } from './study-checks.js';

export interface AnalyseOptions {
  toolVersion: string;
  /** ISO time stamp of the build (from SOURCE_DATE_EPOCH when set). */
  builtAt: string;
  /** Restrict to these assay modules (default: the registry). */
  assays?: readonly AssayModule[];
  /** Per-unit results computed elsewhere (e.g. from the store: src/pipeline/analyse-units.ts); default: each module's analyse(). */
  units?: readonly UnitResult[];
  /** Issues found while loading (warnings): with the checks that need the units, they become `issues` and each variant's `warnings`. */
  issues?: readonly Issue[];
}

/** The comparison and decision methods, stated on the methods page and in results.json. */
export const COMPARISON_METHOD =
  'Each variant is compared with WT of the same batches on values per preparation (biological unit; natural log for ratio metrics, own units for difference metrics): ' +
  'y = μ_batch + δ·[variant] + ε, with a residual variance of its own for the variant and for WT (randomised block design, batches as blocks; ' +
  'generalised least squares fitted by restricted maximum likelihood, as R nlme::gls with varIdent, Pinheiro & Bates 2000 §5.2). ' +
  'WT preparations of batches without the variant inform WT’s variance only. The 95% interval uses Satterthwaite’s degrees of freedom (Satterthwaite 1946; Giesbrecht & Burns 1985); ' +
  'with one variant preparation, or no batch with two WT preparations, one pooled variance is used instead and the row says so. With one batch the comparison is Welch’s t test. ' +
  'Each effect is tested against its WT-like band: a minimum-effect test that it lies beyond the nearer edge (Murphy & Myors 1999), its p values adjusted by Benjamini–Hochberg across the study’s test variants (Benjamini & Hochberg 1995; known controls are outside that family, each scored as if added to it) ' +
  'and, for primary metrics, by Holm across the variant’s primary metrics (Holm 1979); and two one-sided tests that it lies inside the band (Schuirmann 1987). ' +
  'n is the number of preparations (biological units); technical replicates are summarised within their preparation first.';

function matchesExclusion(u: UnitResult, e: Exclusion, variants: Variant[]): boolean {
  if (e.assay && e.assay !== u.assay) return false;
  if (e.batch !== undefined && e.batch !== u.batch) return false;
  if (e.unit !== undefined && e.unit !== u.unit) return false;
  if (e.variant !== undefined) {
    const v = variants.find((x) => x.id === u.variant);
    if (!v || (e.variant !== v.id && e.variant !== v.label && e.variant !== v.hgvs && e.variant !== v.short)) return false;
  }
  return e.batch !== undefined || e.unit !== undefined || e.variant !== undefined;
}

/** Where the default band of a metric key `<assay>.<metric>` is defined. */
function defaultBandSource(key: string): string {
  return `default (src/assays/${key.split('.')[0]}/metrics.ts)`;
}

/** Resolve bands: defaults, then manifest overrides, then (when asked) benign-control bands. */
function resolveBands(study: Study): { bands: Record<string, [number, number]>; source: Record<string, string> } {
  const bands: Record<string, [number, number]> = { ...BANDS };
  const source: Record<string, string> = {};
  for (const k of Object.keys(bands)) source[k] = defaultBandSource(k);
  for (const [k, v] of Object.entries(study.thresholds.bands ?? {})) {
    bands[k] = v;
    source[k] = 'manifest';
  }
  return { bands, source };
}

export function analyseStudy(study: Study, options: AnalyseOptions): StudyResults {
  const modules = activeModules(study, options.assays ?? ASSAYS);
  const variants = study.variants;
  const qThreshold = study.thresholds.qThreshold ?? STATS.qThreshold;

  // 1. Per-unit analysis, then manifest exclusions (kept for display, out of the statistics).
  const units: UnitResult[] = options.units ? options.units.map((u) => ({ ...u })) : [];
  if (!options.units) for (const m of modules) for (const u of m.analyse(study)) units.push(u);
  for (const u of units) {
    const e = study.exclusions.find((x) => matchesExclusion(u, x, variants));
    if (e) u.excluded = e.reason;
  }

  // 2. Normalise to paired WT: effects, intervals and band tests for every metric.
  const { bands, source: bandSource } = resolveBands(study);
  const compareOptions = {
    confidenceLevel: STATS.confidenceLevel,
    bands,
    variants: variants.map((v) => ({ id: v.id, isWT: v.isWT })),
  };
  let comparisons = modules.flatMap((m) => compareAssay(m.id, m.metrics, units, compareOptions));
  if (study.thresholds.bandsFromBenignControls) {
    const benign = new Set(variants.filter((v) => v.control && v.control.class.includes('benign')).map((v) => v.id));
    for (const m of modules) {
      for (const def of m.metrics) {
        const key = `${m.id}.${def.id}`;
        if (bandSource[key] === 'manifest') continue;
        const effects = comparisons
          .filter((c) => c.assay === m.id && c.metric === def.id && benign.has(c.variant) && c.effect !== null)
          .map((c) => c.effect as number);
        const derived = bandFromBenignControls(effects, def.scale, { atLeast: BANDS[key] });
        if (derived.band) {
          bands[key] = derived.band;
          bandSource[key] = derived.rule;
        } else {
          bandSource[key] = `${defaultBandSource(key)}: ${derived.reason}`;
        }
      }
    }
    comparisons = modules.flatMap((m) => compareAssay(m.id, m.metrics, units, compareOptions));
  }

  // 3. WT control charts (Westgard); a comparison made in a rejected batch carries the flag.
  const controlCharts: ControlChart[] = modules.flatMap((m) => wtControlCharts(m, units, variants, study.thresholds.wtBaselines));
  for (const chart of controlCharts) {
    if (chart.rejectedBatches.length === 0) continue;
    for (const c of comparisons) {
      if (c.assay !== chart.assay || c.metric !== chart.metric) continue;
      const rejected = c.batches.filter((b) => chart.rejectedBatches.includes(b));
      if (rejected.length === 0) continue;
      const rules = [...new Set(chart.points.filter((p) => rejected.includes(p.batch)).flatMap((p) => p.rules).filter((r) => r !== '1-2s'))];
      c.flags.push(ANALYSIS_MSG.comparedInRejectedBatch(rejected, c.metric, rules));
    }
  }

  // 4. Calls: multiplicity across test variants and across each variant's primary metrics; then assay and variant calls.
  const equivalenceAlpha = study.thresholds.equivalenceAlpha ?? STATS.equivalenceAlpha;
  const defs = new Map(modules.flatMap((m) => m.metrics.map((d) => [`${m.id}.${d.id}`, d] as const)));
  const controlIds = new Set(variants.filter((v) => v.control && !v.isWT).map((v) => v.id));
  comparisons = callComparisons(comparisons, defs, { qThreshold, equivalenceAlpha, controls: controlIds });
  const labels: Record<string, string> = Object.fromEntries(modules.map((m) => [m.id, m.label]));
  const assayCalls: AssayCall[] = [];
  const comparisonsByVariant = groupBy(comparisons, (c) => c.variant);
  for (const v of variants) {
    if (v.isWT) continue;
    for (const m of modules) {
      const mine = (comparisonsByVariant.get(v.id) ?? []).filter((c) => c.assay === m.id);
      assayCalls.push(assayCall(m.id, v.id, mine, m.metrics, study.direction));
    }
  }

  // 5. Calibration per assay and overall, from the controls' readouts.
  const callsByVariant = groupBy(assayCalls, (a) => a.variant);
  const cap = study.thresholds.evidenceCap;
  const controls = variants.filter((v) => v.control && !v.isWT);
  const calibration: Calibration[] = modules.map((m) =>
    calibrate(
      m.id,
      controls.map((v) => ({
        id: v.id,
        knownClass: v.control!.class,
        readout: callsByVariant.get(v.id)?.find((a) => a.assay === m.id)?.readout ?? null,
      })),
      { cap },
    ),
  );
  const overallByVariant = new Map<string, ReturnType<typeof variantCall>>();
  for (const v of variants) {
    if (v.isWT) continue;
    overallByVariant.set(v.id, variantCall(callsByVariant.get(v.id) ?? [], labels, study.direction));
  }
  const overallCal = calibrate(
    'overall',
    controls.map((v) => ({ id: v.id, knownClass: v.control!.class, readout: overallByVariant.get(v.id)?.readout ?? null })),
    { cap },
  );
  calibration.push(overallCal);

  // 6. Checks that need the units, with the loader's issues; each variant carries the warnings about it.
  const checks = studyChecks(study, units, modules);
  // A column whose unit is the likely cause of an implausible fitted value: that one warning
  // stands for the loader's cell-by-cell warnings on the same column.
  const explained = new Set(checks.filter((i) => i.code === 'study.implausible-wt').map((i) => `${i.at.file}\0${i.at.column}`));
  const loaded = (options.issues ?? []).filter((i) => !(i.code === 'csv.implausible' && explained.has(`${i.at.file}\0${i.at.column}`)));
  const issues = groupIssues([...loaded, ...checks]);
  const warningsOf = new Map<string, Issue[]>();
  for (const i of issues) {
    if (i.severity !== 'warning') continue;
    for (const id of i.variants ?? []) {
      const list = warningsOf.get(id);
      if (list) list.push(i);
      else warningsOf.set(id, [i]);
    }
  }

  // 7. Variant results.
  const unitsByVariant = groupBy(units, (u) => u.variant);
  const variantResults: VariantResult[] = variants.map((v) => {
    const overall = v.isWT
      ? { call: 'reference' as const, sentence: 'Wild-type reference: each variant is compared with the WT measured in the same batches; WT is not called against itself.', readout: null }
      : overallByVariant.get(v.id)!;
    const flags = variantFlags(v, unitsByVariant.get(v.id) ?? [], comparisonsByVariant.get(v.id) ?? [], controlCharts, labels);
    let evidence: VariantResult['evidence'];
    if (v.isWT) evidence = { level: 'none', scope: 'overall', sentence: 'Not applicable: wild-type reference.' };
    else if (v.control)
      evidence = {
        level: 'none',
        scope: 'overall',
        sentence: `Calibration control (known class: ${v.control.class}; source: ${v.control.source}). Its readout calibrates the assays; it is not scored as evidence for itself.`,
      };
    else if (overall.readout === null && (overall.call === 'hypercontractile' || overall.call === 'hypocontractile'))
      evidence = {
        level: 'none',
        scope: 'overall',
        sentence: `No evidence level: the readout is ${overall.call}, the opposite of the disease mechanism this study calibrates (${study.direction}), so the calibration of abnormal readouts does not apply to it. The calibration suggests a strength of functional evidence and never classifies the variant.`,
      };
    else evidence = { scope: 'overall', ...evidenceForReadout(overallCal, overall.readout) };
    const gene = study.genes.find((g) => g.symbol === v.gene);
    const domain = v.residue === undefined ? undefined : gene?.domains.find((d) => v.residue! >= d.start && v.residue! <= d.end)?.name;
    return {
      id: v.id,
      gene: v.gene,
      hgvs: v.hgvs,
      short: v.short,
      label: v.label,
      isWT: v.isWT,
      ...(v.residue !== undefined ? { residue: v.residue } : {}),
      ...(domain ? { domain } : {}),
      ...(v.control ? { control: v.control } : {}),
      ...(v.note ? { note: v.note } : {}),
      assayCalls: callsByVariant.get(v.id) ?? [],
      overall,
      evidence,
      flags,
      warnings: warningsOf.get(v.id) ?? [],
    };
  });

  return {
    schemaVersion: 1,
    tool: { name: 'myofolio', version: options.toolVersion },
    study: {
      title: study.title,
      lab: study.lab,
      dates: study.dates,
      synthetic: study.synthetic,
      ...(study.description ? { description: study.description } : {}),
      direction: study.direction,
      caveats: study.caveats,
      genes: study.genes.map((g) => ({ symbol: g.symbol, ...(g.sequence ? { length: g.sequence.length } : {}), domains: g.domains })),
    },
    settings: {
      qThreshold,
      equivalenceAlpha,
      combiningRule: combiningRule(qThreshold, equivalenceAlpha),
      bands,
      bandSource,
      comparisonMethod: COMPARISON_METHOD,
      ...(cap ? { evidenceCap: cap } : {}),
    },
    assays: modules.map((m) => ({ id: m.id, label: m.label, metrics: m.metrics, methods: m.methods })),
    variants: variantResults,
    units,
    comparisons,
    calibration,
    controlCharts,
    exclusions: study.exclusions.map(({ at: _at, ...rest }) => rest),
    provenance: {
      files: study.files.map((f) => ({ path: f.path, kind: f.kind, sha256: f.sha256, rows: f.rows })),
      manifestSha256: study.manifestSha256,
      manifest: study.manifestRaw,
      builtAt: options.builtAt,
    },
    issues,
  };
}

/**
 * Flags about the variant as a whole: excluded preparations and comparisons made in batches whose WT control
 * values broke a Westgard rejection rule. Fit and comparison flags stay on their unit and comparison records.
 * `units` and `comparisons` are the variant's own (indexed once by the caller, not scanned per variant).
 */
function variantFlags(v: Variant, units: UnitResult[], comparisons: MetricComparison[], charts: ControlChart[], labels: Record<string, string>): Flag[] {
  const flags: Flag[] = [];
  for (const u of units) {
    if (u.excluded) flags.push(ANALYSIS_MSG.excluded(labels[u.assay] ?? u.assay, u.unit, u.batch, u.excluded));
  }
  if (v.isWT) return flags;
  for (const chart of charts) {
    const batches = new Set(comparisons.filter((c) => c.assay === chart.assay).flatMap((c) => c.batches));
    for (const b of chart.rejectedBatches) {
      if (!batches.has(b)) continue;
      const rules = [...new Set(chart.points.filter((p) => p.batch === b).flatMap((p) => p.rules).filter((r) => r !== '1-2s'))];
      flags.push(ANALYSIS_MSG.variantInRejectedBatch(chart.assay, chart.metric, b, rules));
    }
  }
  return flags;
}
