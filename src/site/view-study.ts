/** Data for the study-level pages: assays, residue map, cross-assay comparison, methods, provenance. */
import { METHOD_CHANGES } from '../analysis/method-changes.js';
import { fmt } from '../charts/chart-def.js';
import { effectsChart } from '../charts/effects.js';
import { leveyJenningsChart } from '../charts/levey-jennings.js';
import { residueMapChart } from '../charts/residue-map.js';
import { scatterCharts } from '../charts/scatter.js';
import type { Calibration, StudyResults } from '../results/types.js';
import { PATHS } from './paths.js';
import { type CalibrationView, type ChartBlock, ODDSPATH_THRESHOLDS, type RenderFn, renderBlocks } from './view-common.js';

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
  exclusions: StudyResults['exclusions'];
}

export async function assayPages(results: StudyResults, render?: RenderFn): Promise<AssayPage[]> {
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
        chart: controlBlocks[i],
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
        exclusions: results.exclusions.filter((e) => e.assay === a.id || e.assay === undefined),
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

export function methodsData(results: StudyResults) {
  const bands = Object.keys(results.settings.bands)
    .sort()
    .map((key) => {
      const [assay, metric] = key.split('.');
      const a = results.assays.find((x) => x.id === assay);
      const m = a?.metrics.find((x) => x.id === metric);
      const [lo, hi] = results.settings.bands[key];
      return {
        key,
        label: `${a?.label ?? assay}: ${m?.label ?? metric}`,
        scale: m?.scale === 'difference' ? 'difference from WT' : 'ratio to WT',
        band: `${fmt(lo)} to ${fmt(hi)}`,
        source: results.settings.bandSource[key] ?? '',
      };
    });
  const calibration = results.calibration.map(fmtCalibration);
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
