/** Data for the study-level pages: assays, residue map, cross-assay comparison, methods, provenance. */
import { METHOD_CHANGES } from '../analysis/method-changes.js';
import { variantNames } from '../charts/chart-def.js';
import { effectsChart } from '../charts/effects.js';
import { leveyJenningsChart } from '../charts/levey-jennings.js';
import { residueMapChart } from '../charts/residue-map.js';
import { scatterCharts } from '../charts/scatter.js';
import { FLAG_WORDS, flagAnchor } from '../analysis/flag-words.js';
import { fmt, fmtBand } from '../results/format.js';
import type { Calibration, StudyResults } from '../results/types.js';
import { PATHS } from './paths.js';
import { type CalibrationView, type CallView, type ChartBlock, type ExclusionView, ODDSPATH_THRESHOLDS, exclusionView, type RenderFn, functionCall, renderBlocks } from './view-common.js';

/** One known control in a calibration: how it read out and whether, and why, it was counted. */
export interface ControlRow {
  name: string;
  href: string;
  knownClass: string;
  source: string;
  call: CallView;
  readout: string;
  counted: boolean;
  why: string;
}

/**
 * The known controls behind one calibration scope (an assay id, or 'overall'), each with its
 * readout and whether it was counted, by the rule of src/calibrate/oddspath.ts: a control counts
 * when its readout is abnormal or normal; anything else (indeterminate, mixed, not measured, a
 * change opposite to the study's direction) is not counted.
 */
export function controlRows(results: StudyResults, scope: string, slugs: Map<string, string>): ControlRow[] {
  const names = variantNames(results);
  const direction = results.study.direction;
  return results.variants
    .filter((v) => v.control && !v.isWT)
    .map((v) => {
      const a = scope === 'overall' ? null : v.assayCalls.find((x) => x.assay === scope);
      const call = scope === 'overall' ? v.overall.call : (a?.call ?? 'not measured');
      const readout = scope === 'overall' ? v.overall.readout : (a?.readout ?? null);
      const knownClass = v.control!.class;
      const pathogenic = knownClass === 'pathogenic' || knownClass === 'likely pathogenic';
      let why: string;
      if (readout === 'abnormal') why = pathogenic ? 'counted: abnormal, as expected of a pathogenic control' : 'counted: abnormal, against expectation for a benign control (weighs against the assay)';
      else if (readout === 'normal') why = pathogenic ? 'counted: normal, against expectation for a pathogenic control (weighs against the assay)' : 'counted: normal, as expected of a benign control';
      else if (call === 'not measured') why = scope === 'overall' ? 'not counted: not measured in any assay' : 'not counted: not measured in this assay';
      else if (call === 'indeterminate') why = 'not counted: indeterminate (the data show the effect neither beyond the WT-like band nor inside it)';
      else if (call === 'mixed') why = `not counted: mixed (changes in both directions), not a readout under the study's direction (${direction})`;
      else why = `not counted: ${call}, the opposite of the study's disease direction (${direction})`;
      return {
        name: names.get(v.id) ?? v.short,
        href: PATHS.variant(slugs.get(v.id) as string),
        knownClass,
        source: v.control!.source,
        call: functionCall(call),
        readout: readout ?? '—',
        counted: readout !== null,
        why,
      };
    });
}

/** What a flag is attached to, in the study's words (the level 'unit' is a preparation). */
const LEVEL_WORDS: Record<string, string> = { unit: 'a preparation', comparison: 'a comparison with WT', variant: 'a variant' };

/** Every flag code with its words, for the glossary page, in alphabetical order of the words. */
export function glossaryData() {
  return Object.entries(FLAG_WORDS)
    .map(([code, w]) => ({ code, anchor: flagAnchor(code), label: w.label, explanation: w.explanation, levels: w.levels.map((l) => LEVEL_WORDS[l] ?? l).join(', ') }))
    .sort((a, b) => a.label.localeCompare(b.label, 'en'));
}

export function fmtCalibration(c: Calibration): CalibrationView {
  return {
    scope: c.scope,
    c: c.counts,
    total: c.totalControls,
    oddsPathAbnormal: fmt(c.oddsPathAbnormal),
    oddsPathNormal: fmt(c.oddsPathNormal),
    levelAbnormal: c.levelAbnormal,
    levelNormal: c.levelNormal,
    notes: c.notes,
  };
}

export interface AssayPage {
  path: string;
  root: string;
  title: string;
  id: string;
  label: string;
  metrics: StudyResults['assays'][number]['metrics'];
  methods: string[];
  effects: ChartBlock[];
  calibration: CalibrationView | null;
  controlCharts: Array<{ metric: string; baseline: string; rejected: string; warnings: string; chart: ChartBlock | null }>;
  controls: ControlRow[];
  exclusions: ExclusionView[];
}

export async function assayPages(results: StudyResults, slugs: Map<string, string>, render?: RenderFn): Promise<AssayPage[]> {
  const names = variantNames(results);
  const variantName = (id: string) => names.get(id) ?? id;
  // Every chart of every assay is asked for at once, so a worker pool draws them side by side.
  return Promise.all(
    results.assays.map(async (a) => {
      const cal = results.calibration.find((c) => c.scope === a.id);
      const ccs = results.controlCharts.filter((c) => c.assay === a.id);
      const [controlBlocks, effects] = await Promise.all([
        Promise.all(ccs.map(async (cc) => (await renderBlocks([leveyJenningsChart(results, cc)], render))[0] ?? null)),
        renderBlocks(a.metrics.map((m) => effectsChart(results, a.id, m.id)), render),
      ]);
      const controlCharts = ccs.map((cc, i) => ({
        metric: a.metrics.find((m) => m.id === cc.metric)?.label ?? cc.metric,
        baseline: cc.baseline,
        rejected: cc.rejectedBatches.join(', '),
        warnings: cc.warningBatches.join(', '),
        chart: controlBlocks[i] ?? null,
      }));
      return {
        path: PATHS.assay(a.id),
        root: '../',
        title: a.label,
        id: a.id,
        label: a.label,
        metrics: a.metrics,
        methods: a.methods,
        effects,
        calibration: cal ? fmtCalibration(cal) : null,
        controlCharts,
        controls: cal ? controlRows(results, cal.scope, slugs) : [],
        exclusions: results.exclusions.filter((e) => e.assay === a.id || e.assay === undefined).map((e) => exclusionView(e, { variant: variantName, ofVariant: true })),
      };
    }),
  );
}

export async function residueCharts(results: StudyResults, render?: RenderFn): Promise<ChartBlock[]> {
  return renderBlocks(results.study.genes.map((g) => residueMapChart(results, g.symbol)), render);
}

export async function compareCharts(results: StudyResults, render?: RenderFn): Promise<ChartBlock[]> {
  return renderBlocks(scatterCharts(results), render);
}

export function methodsData(results: StudyResults, slugs: Map<string, string>) {
  const bands = Object.keys(results.settings.bands)
    .sort()
    .map((key) => {
      const [assay, metric] = key.split('.');
      const a = results.assays.find((x) => x.id === assay);
      const m = a?.metrics.find((x) => x.id === metric);
      const band = results.settings.bands[key]!;
      return {
        key,
        label: `${a?.label ?? assay}: ${m?.label ?? metric}`,
        scale: m?.scale === 'difference' ? 'difference from WT' : 'ratio to WT',
        band: fmtBand(band, m?.scale ?? 'ratio'),
        source: results.settings.bandSource[key] ?? '',
      };
    });
  const calibration = results.calibration.map(fmtCalibration);
  const overall = results.calibration.find((c) => c.scope === 'overall');
  return {
    assays: results.assays,
    bands,
    qThreshold: results.settings.qThreshold,
    equivalenceAlpha: results.settings.equivalenceAlpha,
    equivalenceLevel: Math.round((1 - 2 * results.settings.equivalenceAlpha) * 100),
    combiningRule: results.settings.combiningRule,
    comparisonMethod: results.settings.comparisonMethod,
    changes: METHOD_CHANGES,
    evidenceCap: results.settings.evidenceCap ?? '',
    direction: results.study.direction,
    thresholds: ODDSPATH_THRESHOLDS,
    calibration,
    overall: overall ? { calibration: fmtCalibration(overall), controls: controlRows(results, 'overall', slugs) } : null,
  };
}

export function provenanceData(results: StudyResults) {
  return {
    files: results.provenance.files,
    manifestSha256: results.provenance.manifestSha256,
    manifestText: JSON.stringify(results.provenance.manifest, null, 2) ?? 'null',
    tool: `${results.tool.name} ${results.tool.version}`,
    builtAt: results.provenance.builtAt,
    issues: results.issues,
  };
}
