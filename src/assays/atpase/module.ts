/**
 * Steady-state actin-activated ATPase.
 *
 * Input: per-head rates (s⁻¹) at each [actin] (atpase-rates), or raw NADH-coupled A340
 * traces (atpase-nadh) turned into per-head rates by nadh.ts first.
 * Per biological unit (protein preparation), every well at every [actin] enters one fit of
 *
 *     v = v0 + kcat·[A] / (KM + [A])        (Michaelis–Menten with a basal term)
 *
 * by nonlinear least squares (src/numeric/nls.ts). Wells are technical replicates: they
 * inform that unit's curve; the statistics later count units, never wells.
 */
import { FIT } from '../../defaults.js';
import { fitCurve } from '../../numeric/nls.js';
import { michaelisMentenBasal } from '../../numeric/models/michaelis-menten-basal.js';
import type { FitResult } from '../../numeric/types.js';
import type { UnitResult } from '../../results/types.js';
import { assaySetting, groupUnits, relativeSeFlags, rowsOf } from '../assay-common.js';
import { groupEncoding, unitChart } from '../chart-common.js';
import type { AssayChartInput, AssayModule, AssayStudy, ChartSpec } from '../types.js';
import { ATPASE_NADH, ATPASE_RATES, type AtpaseRateRow } from './inputs.js';
import { ATPASE_FLAG_WORDS, ATPASE_MSG, type AtpaseFlag } from './messages.js';
import { ATPASE_BANDS, ATPASE_METRICS as METRICS, ATPASE_PLAUSIBLE } from './metrics.js';
import { nadhToRates } from './nadh.js';
import { ATPASE_SETTINGS as SETTINGS } from './settings.js';

/**
 * kcat/KM of a fit with its standard error by the delta method, using the fit's correlation of
 * kcat and KM: Var(r) = r²·(se_k²/k² + se_K²/K² − 2·ρ·se_k·se_K/(k·K)).
 * @example kcatOverKmOf(fit with kcat 5 (SE 0.5), KM 50 (SE 10), correlation 0.9) // → { estimate: 0.1, se: 0.0118 }
 */
export function kcatOverKmOf(fit: FitResult): { estimate: number; se: number | null } {
  const iK = fit.parameters.findIndex((p) => p.name === 'kcat');
  const iM = fit.parameters.findIndex((p) => p.name === 'km');
  const k = fit.parameters[iK]!;
  const m = fit.parameters[iM]!;
  const r = k.estimate / m.estimate;
  const rho = fit.correlation[iK]?.[iM] ?? NaN;
  const v = r * r * ((k.se / k.estimate) ** 2 + (m.se / m.estimate) ** 2 - (2 * rho * k.se * m.se) / (k.estimate * m.estimate));
  return { estimate: r, se: Number.isFinite(v) && v >= 0 ? Math.sqrt(v) : null };
}

/** Fit one unit's rates, with its flags. */
export function analyseAtpaseUnit(rows: AtpaseRateRow[], minPoints: number): Omit<UnitResult, 'assay' | 'variant' | 'unit' | 'batch' | 'source'> {
  const x = rows.map((r) => r.actinUM);
  const y = rows.map((r) => r.ratePerS);
  const flags: AtpaseFlag[] = [];
  const concentrations = new Set(x).size;
  const maxActin = Math.max(...x);
  const fit: FitResult = fitCurve(michaelisMentenBasal, x, y);
  const metrics: Record<string, number | null> = { kcat: null, km: null, kcatOverKm: null, basal: null };
  const metricSe: Record<string, number | null> = { kcat: null, km: null, kcatOverKm: null, basal: null };
  if (concentrations < minPoints) {
    flags.push(ATPASE_MSG.tooFewPoints(concentrations, minPoints));
  }
  if (!fit.converged) {
    flags.push(ATPASE_MSG.notConverged(fit.stopReason));
  } else {
    for (const p of fit.parameters) {
      metrics[p.name] = p.estimate;
      metricSe[p.name] = Number.isFinite(p.se) ? p.se : null;
    }
    const slope = kcatOverKmOf(fit);
    metrics.kcatOverKm = slope.estimate;
    metricSe.kcatOverKm = slope.se;
    const km = metrics.km as number;
    if (km > maxActin) {
      flags.push(ATPASE_MSG.kmAboveRange(km, maxActin));
    }
    flags.push(...relativeSeFlags(fit, FIT.maxRelativeSe, { kcat: 'kcat', km: 'KM', basal: 'basal rate' }, ['kcat', 'km']));
  }
  const points = rows.map((r) => ({ actin: r.actinUM, rate: r.ratePerS }));
  const curve: Array<Record<string, number>> = [];
  if (fit.converged) {
    const p = fit.parameters.map((q) => q.estimate);
    // 40 points: a hyperbola is smooth at this spacing; values to 6 significant digits (plot only).
    const steps = 39;
    for (let i = 0; i <= steps; i++) {
      const a = Number(((maxActin * i) / steps).toPrecision(6));
      curve.push({ actin: a, rate: Number(michaelisMentenBasal.f(a, p).toPrecision(6)) });
    }
  }
  return { metrics, metricSe, fit, flags, nTechnical: rows.length, plot: { points, curve } };
}

function analyse(study: AssayStudy): UnitResult[] {
  const minPoints = assaySetting(SETTINGS, 'atpaseMinPoints', study.settings);
  const direct = rowsOf(study, ATPASE_RATES);
  const traces = rowsOf(study, ATPASE_NADH);
  const fromTraces = traces.length ? nadhToRates(traces, study.settings) : null;
  const rows = [...direct, ...(fromTraces?.rates ?? [])];
  const out: UnitResult[] = [];
  for (const g of groupUnits(rows)) {
    const r = analyseAtpaseUnit(g.rows, minPoints);
    const traceFlags = (fromTraces?.flags ?? []).filter((f) => g.rows.some((row) => f.at && row.at.file === f.at.file && row.unit === g.unit));
    out.push({ assay: 'atpase', variant: g.variant, unit: g.unit, batch: g.batch, ...r, flags: [...r.flags, ...traceFlags], source: g.source });
  }
  return out;
}

function chart(input: AssayChartInput): ChartSpec {
  return unitChart(input, {
    title: `Actin-activated ATPase: ${input.variantLabel} beside WT of the same batches`,
    description: `Rate per head against actin concentration for each protein preparation of ${input.variantLabel} and of WT in the same batches, with the fitted Michaelis–Menten curve of each preparation.`,
    x: { field: 'actin', title: '[actin] (µM)' },
    y: { field: 'rate', title: 'ATPase rate per head (s⁻¹)' },
    encodingExtra: groupEncoding(),
    metrics: METRICS,
  });
}

export const atpase: AssayModule = {
  id: 'atpase',
  label: 'Actin-activated ATPase',
  inputs: [ATPASE_RATES, ATPASE_NADH],
  metrics: METRICS,
  bands: ATPASE_BANDS,
  plausible: ATPASE_PLAUSIBLE,
  flagWords: ATPASE_FLAG_WORDS,
  settings: SETTINGS,
  analyse,
  chart,
  methods: [
    `Per protein preparation, all wells at all actin concentrations are fitted together with ${michaelisMentenBasal.formula} by Levenberg–Marquardt nonlinear least squares; wells are technical replicates and do not count as n.`,
    'kcat/KM, the initial slope of the curve, is reported beside kcat and KM (standard error by the delta method from the fit’s covariance): it stays well determined when KM lies above the actin range. The basal rate is compared as a difference in s⁻¹ (it lies near zero and a fit may put it below zero).',
    `A preparation with fewer than ${SETTINGS.atpaseMinPoints} actin concentrations is flagged; KM above the highest actin concentration is flagged because kcat and KM are then extrapolations: such a WT preparation is left out of the kcat and KM comparisons, and a variant with such a preparation gets no kcat or KM comparison (not estimable, with the reason), while its kcat/KM is compared as usual; a parameter whose standard error exceeds ${FIT.maxRelativeSe * 100}% of its value is flagged as poorly determined; a fit that does not converge reports no values and is flagged, never dropped.`,
    `Raw NADH-coupled traces: the initial rate is the least-squares slope of A340 over the first ${SETTINGS.nadhWindowS} s, converted with ε340 = ${SETTINGS.nadhEpsilon340} M⁻¹cm⁻¹ and the path length (one NADH oxidised per ATP hydrolysed), minus the actin-only background of the same batch and actin concentration, divided by the myosin head concentration.`,
  ],
};
