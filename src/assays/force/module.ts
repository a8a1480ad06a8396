/**
 * Force–pCa relation of a muscle preparation (skinned fibre, myocyte, myofibril).
 *
 *   rows ──group by (variant, unit, batch)──▶ (pCa, tension) points of one preparation
 *        ──Hill fit with passive term (src/numeric/models/hill-force-pca.ts)──▶ Fmax, pCa50, nH, passive
 *        ──flags──▶ UnitResult, with normalised force (F − passive)/Fmax and a fitted curve grid
 *
 * Repeated measurements at a pCa (replicate rows) are technical replicates: every point
 * enters the one fit of its preparation; the statistics later count preparations.
 * Pure: no I/O.
 */
import { FIT } from '../../defaults.js';
import { fitCurve } from '../../numeric/nls.js';
import { hillForcePca } from '../../numeric/models/hill-force-pca.js';
import type { FitResult } from '../../numeric/types.js';
import type { UnitResult } from '../../results/types.js';
import { assaySetting, rowsOf } from '../assay-common.js';
import { groupEncoding, unitChart } from '../chart-common.js';
import { groupUnits, relativeSeFlags } from '../assay-common.js';
import type { AssayChartInput, AssayModule, AssayStudy, ChartSpec, SettingsBag } from '../types.js';
import { FORCE_PCA, type ForceRow } from './inputs.js';
import { FORCE_FLAG_WORDS, FORCE_MSG, type ForceFlag } from './messages.js';
import { FORCE_BANDS, FORCE_METRICS, FORCE_PLAUSIBLE } from './metrics.js';
import { FORCE_SETTINGS as SETTINGS } from './settings.js';

/** Points of the fitted-curve grid per preparation (0.083 pCa apart over the usual 9.25–4.25 span: about 8 points across a steep transition). */
const CURVE_POINTS = 61;
/** Plot values to 7 significant digits (chart and results.json only; fits use full precision). @example plotValue(0.123456789) // → 0.1234568 */
function plotValue(x: number): number {
  return Number.isFinite(x) ? Number(x.toPrecision(7)) : x;
}

/** The curve grid extends this far (pCa units) beyond the measured range on each side. */
const CURVE_MARGIN_PCA = 0.25;

/**
 * Relative uncertainty of pCa50 expressed on the concentration scale: the SE of
 * log10([Ca²⁺]50) is SE(pCa50), so the relative SE of [Ca²⁺]50 is ≈ ln(10)·SE(pCa50)
 * (delta method). A relative SE of pCa50 itself (SE/5.8) would hide poor determination.
 * @example pCa50RelativeSe(0.1) // → 0.2303
 */
export function pCa50RelativeSe(sePCa50: number): number {
  return Math.LN10 * sePCa50;
}

/**
 * Fit and flag one preparation's force–pCa points.
 *
 * Method: F = Fpassive + Fmax/(1 + 10^(nH·(pCa − pCa50))) by Levenberg–Marquardt nonlinear
 * least squares (src/numeric/nls.ts), unweighted, all replicate points of the preparation,
 * start values from the model's own grid scan (no user guess).
 * Source: Hill 1910, J Physiol 40:iv–vii, pCa form as in Moss 1992, Circ Res 70:865.
 * Flags: fewer distinct pCa values than `forceMinPoints`; no convergence (no values
 * reported); pCa50 outside the measured pCa range (extrapolated); relative SE above
 * FIT.maxRelativeSe for Fmax and nH, and for [Ca²⁺]50 (ln10·SE(pCa50)); Fmax ≤ 0.
 * Passive tension is not checked for relative SE: it is often near zero, where any SE is
 * large relative to the value.
 * @example analyseForceUnit(rowsOfFibre, 6) // synthetic fibre with passive 2, Fmax 30, pCa50 5.8, nH 3
 *   // → metrics ≈ { passive: 2, fmax: 30, pCa50: 5.8, nH: 3 }, fit.converged true
 */
export function analyseForceUnit(
  rows: readonly ForceRow[],
  minPoints: number,
): Pick<UnitResult, 'metrics' | 'metricSe' | 'fit' | 'flags' | 'nTechnical' | 'plot'> {
  const [head] = rows;
  if (!head) throw new Error('analyseForceUnit: a preparation without rows');
  const at = head.at;
  const x = rows.map((r) => r.pCa);
  const y = rows.map((r) => r.tensionKPa);
  const flags: ForceFlag[] = [];
  const distinct = new Set(x).size;
  const lowPCa = Math.min(...x);
  const highPCa = Math.max(...x);
  const fit: FitResult = fitCurve(hillForcePca, x, y);
  const metrics: Record<string, number | null> = { fmax: null, pCa50: null, nH: null, passive: null };
  const metricSe: Record<string, number | null> = { fmax: null, pCa50: null, nH: null, passive: null };
  if (distinct < minPoints) {
    flags.push(FORCE_MSG.tooFewPoints(distinct, minPoints, at));
  }
  const byName = new Map(fit.parameters.map((p) => [p.name, p]));
  if (!fit.converged) {
    flags.push(FORCE_MSG.notConverged(fit.stopReason, at));
  } else {
    for (const p of fit.parameters) {
      metrics[p.name] = p.estimate;
      metricSe[p.name] = Number.isFinite(p.se) ? p.se : null;
    }
    const pCa50 = byName.get('pCa50')!;
    if (pCa50.estimate < lowPCa || pCa50.estimate > highPCa) {
      flags.push(FORCE_MSG.pCa50OutOfRange(pCa50.estimate, lowPCa, highPCa, at));
    }
    if (!(byName.get('fmax')!.estimate > 0)) {
      flags.push(FORCE_MSG.noActivation(at));
    }
    const seFlags: ForceFlag[] = relativeSeFlags(fit, FIT.maxRelativeSe, { fmax: 'Fmax', nH: 'Hill coefficient' }, ['fmax', 'nH']);
    const relCa = pCa50RelativeSe(pCa50.se);
    if (!Number.isFinite(relCa) || relCa > FIT.maxRelativeSe) {
      seFlags.push(Number.isFinite(relCa) ? FORCE_MSG.pCa50PoorlyDetermined(pCa50.se, relCa, FIT.maxRelativeSe) : FORCE_MSG.pCa50NoStandardError());
    }
    flags.push(...seFlags.map((f) => ({ ...f, at: f.at ?? at })));
  }

  const estimates = fit.parameters.map((p) => p.estimate);
  const { passive = null, fmax = null } = metrics;
  const normalise = (tension: number) => (passive !== null && fmax !== null && fmax !== 0 ? (tension - passive) / fmax : NaN);
  const points = rows.map((r) => {
    const point: Record<string, number | string> = { pCa: r.pCa, tension: r.tensionKPa };
    const norm = normalise(r.tensionKPa);
    if (Number.isFinite(norm)) point.normForce = plotValue(norm);
    return point;
  });
  const curve: Array<Record<string, number>> = [];
  if (fit.converged && fmax !== null && fmax !== 0) {
    const from = highPCa + CURVE_MARGIN_PCA;
    const to = lowPCa - CURVE_MARGIN_PCA;
    for (let i = 0; i < CURVE_POINTS; i++) {
      const pCa = from + ((to - from) * i) / (CURVE_POINTS - 1);
      const tension = hillForcePca.f(pCa, estimates);
      curve.push({ pCa: plotValue(pCa), tension: plotValue(tension), normForce: plotValue(normalise(tension)) });
    }
  }
  return { metrics, metricSe, fit, flags, nTechnical: rows.length, plot: { points, curve } };
}

/** Settings of the input file a row came from (manifest per-file settings), if any. */
function fileSettings(study: AssayStudy, file: string | undefined): SettingsBag {
  return study.files.find((f) => f.path === file)?.settings;
}

/** Per-preparation analysis of a study's force–pCa rows. */
export function analyseForce(study: AssayStudy): UnitResult[] {
  return groupUnits(rowsOf(study, FORCE_PCA)).map((g) => {
    const minPoints = assaySetting(SETTINGS, 'forceMinPoints', study.settings, fileSettings(study, g.rows[0]!.at.file)); // a group holds at least one row
    const r = analyseForceUnit(g.rows, minPoints);
    return { assay: 'force', variant: g.variant, unit: g.unit, batch: g.batch, ...r, source: g.source };
  });
}

/** Variant-report chart: normalised force against pCa (high pCa on the left), fitted curves, variant beside paired WT. */
export function forceChart(input: AssayChartInput): ChartSpec {
  return unitChart(input, {
    title: `Force–pCa: ${input.variantLabel} beside WT of the same batches`,
    description:
      `Normalised force, (F − passive)/Fmax from each preparation's own Hill fit, against pCa for every preparation of ${input.variantLabel} ` +
      `and of WT in the same batches, with each preparation's fitted curve; pCa decreases to the right (calcium rises), as is usual in the field. A curve shifted to the right of WT means less calcium sensitivity, to the left more.`,
    x: { field: 'pCa', title: 'pCa (−log10 [Ca²⁺])', reverse: true },
    y: { field: 'normForce', title: 'Force (F − Fpassive)/Fmax' },
    encodingExtra: groupEncoding(),
    metrics: FORCE_METRICS,
  });
}

export { FORCE_METRICS };

export const force: AssayModule = {
  id: 'force',
  label: 'Force–pCa',
  inputs: [FORCE_PCA],
  metrics: FORCE_METRICS,
  bands: FORCE_BANDS,
  plausible: FORCE_PLAUSIBLE,
  flagWords: FORCE_FLAG_WORDS,
  settings: SETTINGS,
  analyse: analyseForce,
  chart: forceChart,
  methods: [
    `Per preparation, all tension readings at all pCa values (replicates included) are fitted together with ${hillForcePca.formula} by Levenberg–Marquardt nonlinear least squares; start values come from a grid scan of pCa50 and nH with passive and Fmax solved linearly at each grid point.`,
    'Repeated readings at a pCa are technical replicates: they inform that preparation’s curve, and the preparation is the unit counted in the comparison with WT. Fmax (ratio scale, increase hypercontractile) and pCa50 (difference scale, increase = calcium sensitisation, hypercontractile) are primary; nH (ratio) and passive tension (difference in kPa, as it lies near zero) are reported only.',
    'A preparation whose pCa50 lies outside the measured pCa range, or whose fitted Fmax is not positive, gives extrapolated or meaningless Hill parameters: such a WT preparation is left out of the Fmax, pCa50 and nH comparisons, and a variant with such a preparation gets no comparison of them (not estimable, with the reason).',
    `Flags: fewer than ${SETTINGS.forceMinPoints} distinct pCa values (setting forceMinPoints); a fit that does not converge (shown, with no values); pCa50 outside the measured pCa range; a standard error above ${FIT.maxRelativeSe * 100}% of Fmax or nH, or of [Ca²⁺]50 (ln 10 × SE of pCa50); a fitted Fmax that is not positive. Passive tension is not checked for relative error because it is often close to zero.`,
    'Charts show normalised force (F − Fpassive)/Fmax, each preparation normalised by its own fit, with pCa decreasing to the right.',
  ],
};
