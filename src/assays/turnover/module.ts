/**
 * Single turnover (mant-nucleotide chase): fluorescence decay of each chase trace.
 *
 *   rows ──group by unit, then trace──▶ (t, F) of one trace
 *        ──fit single and double exponential + offset──▶ choose (F test, rate ratio, amplitudes)
 *        ──one phase only: refit with the other phase's rate fixed at the batch's WT rate──▶
 *        ──▶ per trace: slow fraction, kFast, kSlow ──mean over traces──▶ UnitResult
 *
 * Traces are technical replicates of their protein preparation: each is fitted on its own
 * and the unit's metrics are the mean of its traces' metrics. A unit's result depends on the
 * WT traces of its batch (their rates tell which phase a one-phase trace shows), so the module
 * analyses a batch at a time. Pure: no I/O.
 */
import { FIT } from '../../defaults.js';
import { extraSumOfSquaresF } from '../../numeric/compare.js';
import { exponentialDouble, slowFraction } from '../../numeric/models/exponential-double.js';
import { exponentialDoubleFixedRate } from '../../numeric/models/exponential-double-fixed.js';
import { exponentialSingle } from '../../numeric/models/exponential-single.js';
import { fitCurve } from '../../numeric/nls.js';
import type { CurveModel, FitResult } from '../../numeric/types.js';
import type { SourceRef } from '../../results/source.js';
import type { UnitResult } from '../../results/types.js';
import { mean, se } from '../../stats/descriptive.js';
import { assaySetting, groupBy, rowsOf } from '../assay-common.js';
import { UNIT_CHART_HEIGHT, UNIT_CHART_WIDTH, groupChannel, groupCurveLayers, groupParams } from '../chart-common.js';
import { groupUnits, relativeSeFlags } from '../assay-common.js';
import type { AssayChartInput, AssayModule, AssayStudy, ChartSpec, SettingsBag } from '../types.js';
import { TURNOVER, type TurnoverRow } from './inputs.js';
import { TURNOVER_FLAG_WORDS, TURNOVER_MSG, type TurnoverFlag } from './messages.js';
import { TURNOVER_BANDS, TURNOVER_METRICS, TURNOVER_PLAUSIBLE } from './metrics.js';
import { TURNOVER_SETTINGS as SETTINGS } from './settings.js';

/** Thresholds in force for the turnover analysis. */
export interface TurnoverSettings {
  fTestAlpha: number;
  minRateRatio: number;
  minSlowTimeConstants: number;
}

/** Read the turnover settings: later bags (more specific) override earlier ones, then the defaults (settings.ts). */
export function turnoverSettings(...bags: SettingsBag[]): TurnoverSettings {
  return {
    fTestAlpha: assaySetting(SETTINGS, 'turnoverFTestAlpha', ...bags),
    minRateRatio: assaySetting(SETTINGS, 'turnoverMinRateRatio', ...bags),
    minSlowTimeConstants: assaySetting(SETTINGS, 'turnoverMinSlowTimeConstants', ...bags),
  };
}

/** One trace's fits, the model chosen and its metrics. */
export interface TraceResult {
  /** 'one-phase': single exponential chosen, then refitted with the other rate fixed (resolveOnePhase). */
  model: 'double' | 'single' | 'one-phase' | 'none';
  /** The fit chosen (double, or single as the fall-back); absent when neither converged. */
  fit?: FitResult;
  single: FitResult;
  double: FitResult;
  /** Why the double exponential was kept or rejected, in words. */
  reason: string;
  slowFraction: number | null;
  slowFractionSe: number | null;
  kFast: number | null;
  kSlow: number | null;
  /** Rate of the single-exponential fall-back (reported in notes only). */
  kSingle: number | null;
  durationS: number;
  /** With model 'one-phase': which phase's rate was fixed, and at what (s⁻¹). */
  fixedRate?: { phase: 'slow' | 'fast'; rate: number };
  flags: TurnoverFlag[];
}

function param(fit: FitResult, name: string): number {
  return fit.parameters.find((p) => p.name === name)?.estimate ?? NaN;
}

/**
 * Fit one chase trace and decide between two phases and one.
 *
 * Method: y = Afast·exp(−kFast·t) + Aslow·exp(−kSlow·t) + c and y = A·exp(−k·t) + c, both
 * by Levenberg–Marquardt least squares (src/numeric/nls.ts), t as recorded (amplitudes
 * refer to t = 0). The double exponential is kept only when all of these hold:
 * (1) the extra-sum-of-squares F test of double against single gives p < turnoverFTestAlpha
 * (src/numeric/compare.ts; Motulsky & Christopoulos 2004, ch. 22), which also requires
 * the double fit to have converged; (2) kFast/kSlow ≥ turnoverMinRateRatio; (3) both
 * amplitudes are positive; (4) both rates and both amplitudes are determined, relative SE at most
 * FIT.maxRelativeSe (a spurious split of one phase into two fits the data but leaves them loose).
 * Otherwise the single exponential is the trace's model and the
 * slow fraction, kFast and kSlow are not estimable for that trace (a single rate cannot be
 * assigned to either phase). Slow fraction = Aslow/(Afast + Aslow), SE by the delta method.
 * A trace shorter than turnoverMinSlowTimeConstants/kSlow is flagged (slow phase not
 * followed long enough).
 * Source: model and slow fraction as in Hooijman, Stewart & Cooke 2011, Biophys J
 * 100:1969, and Sarkar et al., Sci Adv 2020.
 * @example fitTurnoverTrace(t, 0.7·e^(−0.03t) + 0.3·e^(−0.0034t) sampled 0–1800 s, settings)
 *   // → { model: 'double', slowFraction: 0.30, kFast: 0.030, kSlow: 0.0034, … }
 */
export function fitTurnoverTrace(
  timeS: readonly number[],
  fluorescence: readonly number[],
  settings: TurnoverSettings,
  label = 'trace',
  at?: SourceRef,
): TraceResult {
  const single = fitCurve(exponentialSingle, timeS, fluorescence);
  const double = fitCurve(exponentialDouble, timeS, fluorescence);
  const durationS = Math.max(...timeS) - Math.min(...timeS);
  const flags: TurnoverFlag[] = [];
  const test = extraSumOfSquaresF(single, double, settings.fTestAlpha);
  const aFast = param(double, 'aFast');
  const aSlow = param(double, 'aSlow');
  const kFast = param(double, 'kFast');
  const kSlow = param(double, 'kSlow');
  const problems: string[] = [];
  if (test.keep !== 'complex') problems.push(test.reason);
  else {
    if (!(kSlow > 0) || !(kFast / kSlow >= settings.minRateRatio)) {
      problems.push(`the rates differ by a factor ${(kFast / kSlow).toPrecision(3)}, less than ${settings.minRateRatio}`);
    }
    if (!(aFast > 0) || !(aSlow > 0)) problems.push('an amplitude is not positive');
    const loose = relativeSeFlags(double, FIT.maxRelativeSe, { kFast: 'kFast', kSlow: 'kSlow', aFast: 'the fast amplitude', aSlow: 'the slow amplitude' }, ['kFast', 'kSlow', 'aFast', 'aSlow']);
    if (loose.length > 0) {
      problems.push(`the two-phase fit is not determined (${loose.map((f) => f.message.replace(/\.$/, '')).join('; ')})`);
    }
  }
  const base = { single, double, durationS };
  if (problems.length === 0) {
    const sf = slowFraction(double);
    if (durationS < settings.minSlowTimeConstants / kSlow) {
      flags.push(TURNOVER_MSG.windowTooShort(label, durationS, settings.minSlowTimeConstants, kSlow, at));
    }
    return {
      ...base,
      model: 'double',
      fit: double,
      reason: `two phases kept: ${test.reason}`,
      slowFraction: sf.estimate,
      slowFractionSe: Number.isFinite(sf.se) ? sf.se : null,
      kFast,
      kSlow,
      kSingle: null,
      flags,
    };
  }
  const reason = `phases not separated (${problems.join('; ')})`;
  if (!single.converged) {
    flags.push(TURNOVER_MSG.noFit(label, single.stopReason, at));
    return { ...base, model: 'none', reason, slowFraction: null, slowFractionSe: null, kFast: null, kSlow: null, kSingle: null, flags };
  }
  const k = param(single, 'k');
  flags.push(TURNOVER_MSG.onePhase(label, reason, k, at));
  return { ...base, model: 'single', fit: single, reason, slowFraction: null, slowFractionSe: null, kFast: null, kSlow: null, kSingle: k, flags };
}

/** WT rates of a batch against which a one-phase trace is placed. */
export interface ReferenceRates {
  kFast: number;
  kSlow: number;
  /** Where they come from, in words (e.g. 'geometric means of 6 WT traces of batch B1'). */
  source: string;
}

/**
 * Give a one-phase trace (model 'single') a slow fraction, by a stated rule.
 *
 * Rule: the resolved rate k is the fast phase when k ≥ √(kFast·kSlow) of the batch's WT traces (the
 * geometric midpoint of the two WT rates), else the slow phase. The trace is then refitted with
 * both phases and the other phase's rate fixed at the WT rate (src/numeric/models/exponential-double-fixed.ts):
 * the other phase's amplitude, which may come out near zero or negative, and so the slow fraction
 * Aslow/(Afast + Aslow) and its standard error (delta method) come from the data. A trace with no
 * slow phase thus gives a slow fraction near 0, one with only a slow phase near 1, each with its
 * uncertainty, instead of no value. The free rate is that phase's rate; the fixed one is not reported.
 * Without reference rates, or when the refit does not converge, the trace keeps no values and a flag says why.
 * @example resolveOnePhase(traceOfOnlyFastPhase, t, y, { kFast: 0.03, kSlow: 0.0034, … }) // → slowFraction ≈ 0, kFast ≈ 0.03
 */
export function resolveOnePhase(
  trace: TraceResult,
  timeS: readonly number[],
  fluorescence: readonly number[],
  reference: ReferenceRates | null,
  label = 'trace',
  at?: SourceRef,
): TraceResult {
  if (trace.model !== 'single' || trace.kSingle === null) return trace;
  if (!reference) {
    return {
      ...trace,
      flags: [...trace.flags, TURNOVER_MSG.noReferenceRates(label, at)],
    };
  }
  const midpoint = Math.sqrt(reference.kFast * reference.kSlow);
  const isFast = trace.kSingle >= midpoint;
  const fixedRate = isFast ? reference.kSlow : reference.kFast;
  const fit = fitCurve(exponentialDoubleFixedRate(isFast ? 'slow' : 'fast', fixedRate), timeS, fluorescence);
  const other = isFast ? 'slow' : 'fast';
  if (!fit.converged) {
    return {
      ...trace,
      flags: [...trace.flags, TURNOVER_MSG.refitNotConverged(label, other, fixedRate, fit.stopReason, at)],
    };
  }
  const sf = slowFraction(fit);
  const free = param(fit, isFast ? 'kFast' : 'kSlow');
  const placed = TURNOVER_MSG.onePhasePlaced(label, { reason: trace.reason, kSingle: trace.kSingle, isFast, midpoint, source: reference.source, fixedRate, slowFraction: sf.estimate, slowFractionSe: sf.se }, at);
  return {
    ...trace,
    model: 'one-phase',
    fit,
    fixedRate: { phase: isFast ? 'slow' : 'fast', rate: fixedRate },
    slowFraction: sf.estimate,
    slowFractionSe: Number.isFinite(sf.se) ? sf.se : null,
    kFast: isFast ? free : null,
    kSlow: isFast ? null : free,
    flags: [...trace.flags.filter((f) => f.code !== 'one-phase-trace'), placed],
  };
}

/**
 * Readings plotted per trace at most: longer traces show every k-th reading (all readings are
 * fitted). Keeps results.json and the charts small for 400-point traces in large studies.
 */
export const MAX_PLOTTED_READINGS = 100;

/** Points of the fitted-curve grid per trace (spaced quadratically in time, see curveTime). */
const CURVE_POINTS = 40;

/** Readings drawn per trace at most on the variant-report chart (every k-th of the stored ones). */
export const MAX_CHART_READINGS = 40;

/**
 * Time of curve point i of n on [t0, t1], spaced quadratically: t0 + (t1 − t0)·(i/(n − 1))².
 * Dense early, where the fast phase falls, sparse on the slow tail: with 40 points over 1,800 s
 * the first step is 1.2 s and the last 91 s (a linear grid would step 46 s throughout and cut
 * the corner of a 0.03 s⁻¹ fast phase).
 * @example curveTime(0, 1800, 1, 40) // → 1.18 (1800/39²)
 */
export function curveTime(t0: number, t1: number, i: number, n: number): number {
  const f = i / (n - 1);
  return t0 + (t1 - t0) * f * f;
}

/** Plot values to 7 significant digits (chart and results.json only; fits use full precision). @example plotValue(0.3603512345) // → 0.3603512 */
function plotValue(x: number): number {
  return Number.isFinite(x) ? Number(x.toPrecision(7)) : x;
}

/** The curve model of a trace's chosen fit. */
function modelOf(trace: TraceResult): CurveModel {
  if (trace.model === 'double') return exponentialDouble;
  if (trace.model === 'one-phase' && trace.fixedRate) return exponentialDoubleFixedRate(trace.fixedRate.phase, trace.fixedRate.rate);
  return exponentialSingle;
}

/**
 * Normalised fluorescence of a trace: (F − c)/(F̂(t_first) − c) from the chosen fit
 * (offset c, fitted value at the first time), so each fitted trace falls from 1 to 0.
 * Without a fit: (F − F_last)/(F_first − F_last) with the readings themselves.
 * @example normaliser(doubleFitWithOffset120AndAmplitude500, t, y)(300.2) // → 0.36035 (t = 60 s of the double-exponential check curve: slow fraction 0.30, 0.030 and 0.0034 s⁻¹, computed)
 */
function normaliser(trace: TraceResult, t: readonly number[], y: readonly number[]): (value: number) => number {
  if (trace.fit) {
    const p = trace.fit.parameters.map((q) => q.estimate);
    const c = param(trace.fit, 'offset');
    const top = modelOf(trace).f(Math.min(...t), p) - c;
    return (v) => (v - c) / top;
  }
  const first = y[t.indexOf(Math.min(...t))]!;
  const last = y[t.indexOf(Math.max(...t))]!;
  return (v) => (v - last) / (first - last);
}

/** One trace's readings in time order with its free fit (fitTurnoverTrace). */
export interface FittedTrace {
  trace: string;
  t: number[];
  y: number[];
  at: SourceRef;
  result: TraceResult;
}

/** Fit every trace of one unit on its own (`fitTurnoverTrace`), in order of first appearance. */
export function fitUnitTraces(rows: readonly TurnoverRow[], settings: TurnoverSettings): FittedTrace[] {
  return [...groupBy(rows, (r) => r.trace).values()].map((traceRows) => {
    const sorted = [...traceRows].sort((a, b) => a.timeS - b.timeS);
    const t = sorted.map((r) => r.timeS);
    const y = sorted.map((r) => r.fluorescence);
    const first = sorted[0]!;
    return { trace: first.trace, t, y, at: first.at, result: fitTurnoverTrace(t, y, settings, `Trace ${first.trace}`, first.at) };
  });
}

/**
 * WT reference rates of a batch: the geometric means of kFast and of kSlow over its WT traces with
 * two resolved phases; null when it has none.
 * @example referenceRates([wtTraceWithRates(0.03, 0.0034), wtTraceWithRates(0.033, 0.0031)], 'B1') // → { kFast: 0.0315, kSlow: 0.00325, … }
 */
export function referenceRates(wtTraces: readonly FittedTrace[], batch: string): ReferenceRates | null {
  const double = wtTraces.filter((f) => f.result.model === 'double' && f.result.kFast !== null && f.result.kSlow !== null);
  if (double.length === 0) return null;
  const geo = (xs: number[]) => Math.exp(xs.reduce((s, x) => s + Math.log(x), 0) / xs.length);
  return {
    kFast: geo(double.map((f) => f.result.kFast as number)),
    kSlow: geo(double.map((f) => f.result.kSlow as number)),
    source: `geometric means of ${double.length} WT trace${double.length === 1 ? '' : 's'} of batch ${batch}`,
  };
}

/**
 * Summarise one unit from its fitted traces: one-phase traces are first resolved against the
 * batch's WT rates (`resolveOnePhase`); the unit's slow fraction, kFast and kSlow are then the
 * arithmetic means over the traces where they are estimable; their SE is the fit's SE with one
 * trace and the standard error of the mean across traces with several. Every trace that gives no
 * value keeps a flag saying why. nTechnical = number of traces.
 * @example summariseTurnoverUnit(tracesWithSlowFractions0.2And0.4, reference) // → metrics.slowFraction ≈ 0.3, nTechnical 2
 */
export function summariseTurnoverUnit(
  fitted: readonly FittedTrace[],
  reference: ReferenceRates | null,
): Pick<UnitResult, 'metrics' | 'metricSe' | 'fit' | 'modelNote' | 'flags' | 'nTechnical' | 'plot'> {
  const flags: TurnoverFlag[] = [];
  const points: Array<Record<string, number | string>> = [];
  const curve: Array<Record<string, number | string>> = [];
  const results: TraceResult[] = [];
  for (const f of fitted) {
    const result = resolveOnePhase(f.result, f.t, f.y, reference, `Trace ${f.trace}`, f.at);
    results.push(result);
    flags.push(...result.flags);
    const { t, y, trace } = f;
    const norm = normaliser(result, t, y);
    const every = Math.max(1, Math.ceil(t.length / MAX_PLOTTED_READINGS));
    for (let i = 0; i < t.length; i += every) {
      const value = norm(y[i]!);
      // One object literal per shape (no property added later), same keys in the same order.
      // Raw fluorescence only when the reading cannot be normalised (it is in the input file).
      points.push(Number.isFinite(value) ? { trace, time: t[i]!, normFluorescence: plotValue(value) } : { trace, time: t[i]!, fluorescence: y[i]! });
    }
    if (result.fit) {
      const p = result.fit.parameters.map((q) => q.estimate);
      const model = modelOf(result);
      const t0 = t[0]!;
      const t1 = t[t.length - 1]!;
      for (let i = 0; i < CURVE_POINTS; i++) {
        const time = plotValue(curveTime(t0, t1, i, CURVE_POINTS));
        curve.push({ trace, model: result.model, time, normFluorescence: plotValue(norm(model.f(time, p))) });
      }
    }
  }
  const metrics: Record<string, number | null> = {};
  const metricSe: Record<string, number | null> = {};
  for (const [id, seOf] of [
    ['slowFraction', (r: TraceResult) => r.slowFractionSe],
    ['kFast', (r: TraceResult) => seOfParam(r, 'kFast')],
    ['kSlow', (r: TraceResult) => seOfParam(r, 'kSlow')],
  ] as const) {
    const estimable = results.filter((r) => r[id] !== null);
    const values = estimable.map((r) => r[id] as number);
    metrics[id] = values.length > 0 ? mean(values) : null;
    // One trace: the fit's SE; several: the standard error of the mean across traces.
    metricSe[id] = values.length === 1 ? seOf(estimable[0]!) : values.length > 1 ? se(values) : null;
  }
  const count = (model: TraceResult['model']) => results.filter((r) => r.model === model).length;
  const nDouble = count('double');
  const parts = [
    `double exponential in ${nDouble} of ${results.length} trace(s)`,
    count('one-phase') > 0 ? `one phase resolved in ${count('one-phase')} (the other phase's rate fixed at WT's)` : '',
    count('single') > 0 ? `one phase that could not be placed in ${count('single')} (no value)` : '',
    count('none') > 0 ? `no converged fit in ${count('none')} (no value)` : '',
  ].filter((x) => x !== '');
  const modelNote = nDouble === results.length ? undefined : parts.join('; ');
  return {
    metrics,
    metricSe,
    fit: results.length === 1 ? results[0]!.fit : undefined,
    ...(modelNote ? { modelNote } : {}),
    flags,
    nTechnical: results.length,
    plot: { points, curve },
  };
}

/**
 * Analyse one unit's traces on their own: fit each, then summarise with the given WT reference
 * rates (none: one-phase traces then give no value, with a flag).
 */
export function analyseTurnoverUnit(
  rows: readonly TurnoverRow[],
  settings: TurnoverSettings,
  reference: ReferenceRates | null = null,
): Pick<UnitResult, 'metrics' | 'metricSe' | 'fit' | 'modelNote' | 'flags' | 'nTechnical' | 'plot'> {
  return summariseTurnoverUnit(fitUnitTraces(rows, settings), reference);
}

function seOfParam(r: TraceResult, name: string): number | null {
  const s = r.fit?.parameters.find((p) => p.name === name)?.se;
  return s !== undefined && Number.isFinite(s) ? s : null;
}

/** Settings of the input file a row came from (manifest per-file settings), if any. */
function fileSettings(study: AssayStudy, file: string | undefined): SettingsBag {
  return study.files.find((f) => f.path === file)?.settings;
}

/**
 * Per-unit analysis of a study's single-turnover traces, a batch at a time: every trace is fitted,
 * the batch's WT traces give the reference rates (`referenceRates`), and each unit is summarised
 * with them.
 */
export function analyseTurnover(study: AssayStudy): UnitResult[] {
  const wt = new Set(study.variants.filter((v) => v.isWT).map((v) => v.id));
  const groups = groupUnits(rowsOf(study, TURNOVER));
  const fitted = groups.map((g) => fitUnitTraces(g.rows, turnoverSettings(study.settings, fileSettings(study, g.rows[0]!.at.file))));
  const references = new Map<string, ReferenceRates | null>();
  for (const batch of new Set(groups.map((g) => g.batch))) {
    const wtTraces = groups.flatMap((g, i) => (g.batch === batch && wt.has(g.variant) ? fitted[i]! : []));
    references.set(batch, referenceRates(wtTraces, batch));
  }
  return groups.map((g, i) => ({
    assay: 'turnover',
    variant: g.variant,
    unit: g.unit,
    batch: g.batch,
    ...summariseTurnoverUnit(fitted[i]!, references.get(g.batch) ?? null),
    source: g.source,
  }));
}

const num3 = (x: number | null | undefined) => (typeof x === 'number' && Number.isFinite(x) ? String(Number(x.toPrecision(3))) : '—');

/** Numbers table of the turnover chart: one row per preparation (its metrics and fitted model), not the drawn points. */
function turnoverTable(input: AssayChartInput) {
  const rows = [
    ...input.wtUnits.map((u) => ({ u, group: 'WT' })),
    ...input.variantUnits.map((u) => ({ u, group: input.variantLabel })),
  ].map(({ u, group }) => [
    group,
    u.unit,
    u.batch,
    String(u.nTechnical),
    num3(u.metrics.slowFraction),
    num3(u.metrics.kFast),
    num3(u.metrics.kSlow),
    u.modelNote ?? 'double exponential in every trace',
  ]);
  return {
    columns: ['Group', 'Preparation', 'Batch', 'Traces', 'Slow fraction', 'kFast (s⁻¹)', 'kSlow (s⁻¹)', 'Model'],
    rows,
    note: `The chart draws at most ${MAX_CHART_READINGS} readings per trace and each trace's fitted curve at ${CURVE_POINTS} times; the plotted readings and curves are in results.json (plot of each preparation).`,
  };
}

/**
 * Every k-th row of each trace so that no trace keeps more than `max` rows (k = ⌈n/max⌉, first row kept).
 * @example thinPerTrace(rowsOfOneTraceWith100Readings, 40) // → 34 rows (k = 3)
 */
export function thinPerTrace<T extends Record<string, unknown>>(rows: readonly T[], max: number): T[] {
  const byTrace = new Map<unknown, T[]>();
  for (const r of rows) (byTrace.get(r.trace) ?? byTrace.set(r.trace, []).get(r.trace)!).push(r);
  const out: T[] = [];
  for (const list of byTrace.values()) {
    const every = Math.max(1, Math.ceil(list.length / max));
    for (let i = 0; i < list.length; i += every) out.push(list[i]!);
  }
  return out;
}

/** Time ticks of the turnover chart's log axis (s): 1–2–5 steps. */
const LOG_TIME_TICKS = [0.1, 0.2, 0.5, 1, 2, 5, 10, 20, 50, 100, 200, 500, 1000, 2000, 5000, 10000, 20000, 50000, 100000];

/**
 * Variant-report chart: normalised fluorescence against time on a log axis, readings as points
 * and each trace's chosen fit as a line; WT (light grey, dashed, circles) drawn first and the
 * variant (near-black, solid, crosses) over it, the legend naming the variant. On a log axis the
 * fast and slow phases each take their own stretch of the chart, so a change in the slow-phase
 * fraction shows as a different height of the shoulder between them. Readings and curve points
 * at time 0 (the chase start) cannot sit on a log axis and are not drawn (they are in
 * results.json); the axis starts at the first fitted-curve time after 0 (the early fall of the
 * fast phase), or at the latest 20 times before the first later reading.
 */
export function turnoverChart(input: AssayChartInput): ChartSpec {
  // Readings: at most MAX_CHART_READINGS per trace (every k-th stored reading); curves as stored.
  const flatten = (units: AssayChartInput['wtUnits'], group: 'WT' | 'Variant', part: 'points' | 'curve') =>
    units.flatMap((u) => {
      const rows = (u.plot[part] ?? []).filter((r) => part === 'curve' || typeof r.normFluorescence === 'number');
      const shown = part === 'curve' ? rows : thinPerTrace(rows, MAX_CHART_READINGS);
      return shown.map((r) =>
        part === 'curve'
          ? { group, unit: `${u.unit} (${u.batch})`, trace: r.trace, traceKey: `${group} ${u.unit} (${u.batch}) ${r.trace}`, time: r.time, normFluorescence: r.normFluorescence }
          : { group, unit: `${u.unit} (${u.batch})`, trace: r.trace, time: r.time, normFluorescence: r.normFluorescence },
      );
    });
  const positive = (r: { time: unknown }) => typeof r.time === 'number' && r.time > 0;
  const allPoints = [...flatten(input.wtUnits, 'WT', 'points'), ...flatten(input.variantUnits, 'Variant', 'points')];
  const allCurve = [...flatten(input.wtUnits, 'WT', 'curve'), ...flatten(input.variantUnits, 'Variant', 'curve')];
  const times = [...allPoints, ...allCurve].filter(positive).map((r) => r.time as number);
  // From the first fitted-curve time after the start (the curve's fall from 1 is the fast phase),
  // but at most 20 times earlier than the first reading after the start.
  const firstReading = Math.min(...allPoints.filter(positive).map((r) => r.time as number));
  const firstCurve = Math.min(...allCurve.filter(positive).map((r) => r.time as number));
  const start = Number.isFinite(firstReading) ? Math.max(Math.min(firstCurve, firstReading / 2), firstReading / 20) : Number.isFinite(firstCurve) ? firstCurve : 1;
  const tMin = Number(start.toPrecision(3));
  const tMax = Number((times.length ? Math.max(...times) * 1.05 : 10).toPrecision(3));
  const ticks = LOG_TIME_TICKS.filter((t) => t >= tMin && t <= tMax);
  const inRange = (r: { time: unknown }) => positive(r) && (r.time as number) >= tMin;
  const points = allPoints.filter(inRange);
  // One broken path per group (see brokenPaths): the same lines as one per trace, far fewer vega operators.
  const curve = allCurve.filter(inRange);
  const x = {
    field: 'time',
    type: 'quantitative',
    title: 'Time after chase (s, log scale)',
    scale: { type: 'log', domain: { expr: 'timeDomain' }, nice: false },
    axis: { values: { expr: 'timeTicks' }, format: '~g' },
  };
  const y = { field: 'normFluorescence', type: 'quantitative', title: 'Normalised fluorescence' };
  return {
    title: `Single turnover: ${input.variantLabel} beside WT of the same batches`,
    description:
      `Fluorescence of each chase trace of ${input.variantLabel} and of WT in the same batches, normalised so that each trace's fit falls from 1 at the first reading to 0 at its plateau, ` +
      `with the fitted curve of each trace (double exponential where two phases were resolved, single exponential otherwise), against time on a log scale: the fast phase falls first, the slow phase later, and a larger slow-phase fraction shows as a higher shoulder between them. ` +
      `Each trace shows at most ${MAX_CHART_READINGS} readings (every k-th reading of longer traces) and no reading at time 0; all readings were fitted.`,
    usermeta: {
      table: turnoverTable(input),
    },
    // Axis range and ticks depend on the data: parameters, so that every turnover chart has one shape.
    params: [...groupParams(input), { name: 'timeDomain', value: [tMin, tMax] }, { name: 'timeTicks', value: ticks }],
    width: UNIT_CHART_WIDTH,
    height: UNIT_CHART_HEIGHT,
    layer: [
      {
        data: { values: points },
        mark: { type: 'point', filled: true, size: 14, opacity: 0.45 },
        encoding: { x, y, color: groupChannel('colour'), shape: groupChannel('shape') },
      },
      ...groupCurveLayers(
        curve.filter((r) => r.group === 'WT'),
        curve.filter((r) => r.group === 'Variant'),
        'traceKey',
        x,
        y,
        { strokeWidth: 1.6, interpolate: 'monotone' },
      ),
    ],
  };
}

export { TURNOVER_METRICS };

export const turnover: AssayModule = {
  id: 'turnover',
  label: 'Single turnover (mant-nucleotide chase)',
  inputs: [TURNOVER],
  metrics: TURNOVER_METRICS,
  bands: TURNOVER_BANDS,
  plausible: TURNOVER_PLAUSIBLE,
  flagWords: TURNOVER_FLAG_WORDS,
  settings: SETTINGS,
  analyse: analyseTurnover,
  chart: turnoverChart,
  methods: [
    `Each chase trace is fitted with ${exponentialDouble.formula} and with ${exponentialSingle.formula} by Levenberg–Marquardt nonlinear least squares, time as recorded so that amplitudes refer to t = 0.`,
    `The two-phase model is kept only when the extra-sum-of-squares F test of the double against the single exponential gives p < ${SETTINGS.turnoverFTestAlpha} (setting turnoverFTestAlpha), the fast rate is at least ${SETTINGS.turnoverMinRateRatio} times the slow rate (setting turnoverMinRateRatio), both amplitudes are positive, and both rates and both amplitudes have a standard error of at most ${FIT.maxRelativeSe * 100}% of their value (a spurious split of one phase into two fits the data but leaves them loose). Otherwise only one phase is resolved and the trace is flagged.`,
    'A one-phase trace is placed by a stated rule: its rate is the fast phase when it is at least √(kFast·kSlow) of the WT traces of the same batch (geometric means over WT traces with two resolved phases), else the slow phase. It is then refitted with both phases and the other phase’s rate fixed at WT’s: the other amplitude is estimated from the data (it may come out near zero or below), so a trace with no slow phase gives a slow fraction near 0, and one with only a slow phase near 1, each with its standard error. A batch with no such WT trace leaves one-phase traces without a value, flagged.',
    'Slow-phase fraction = Aslow/(Afast + Aslow) (Sarkar et al., Sci Adv 2020), with its standard error by the delta method.',
    'Traces are technical replicates: each preparation’s metrics are the means of its traces’ estimable metrics (a trace left without a value is named in a flag on the preparation and on the comparison), and the preparation is the unit counted in the comparison with WT. The slow fraction is primary (difference scale; a decrease, more heads available, counts as hypercontractile); fast and slow rates are reported only.',
    `Flags: one phase resolved; no WT reference rates in the batch; a trace shorter than ${SETTINGS.turnoverMinSlowTimeConstants} slow-phase time constant(s) 1/kSlow (setting turnoverMinSlowTimeConstants); a rate or slow amplitude whose standard error exceeds ${FIT.maxRelativeSe * 100}% of its value; no converged fit.`,
  ],
};
