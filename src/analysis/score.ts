/**
 * Scoring: metric comparisons → metric calls → assay calls → variant call, and the readout used for
 * calibration. Rules, applied the same way every time, with errors bounded against
 * the WT-like band rather than against "no change":
 *
 * - Metric: increased / decreased when the minimum-effect test shows the effect beyond the nearer
 *   band edge (`q` below qThreshold; src/stats/band-tests.ts); within WT range when two one-sided
 *   tests show it inside the band (p below equivalenceAlpha, i.e. the 90% interval inside the band);
 *   no estimate → not estimable; otherwise indeterminate.
 * - Multiplicity (`callComparisons`): per metric, Benjamini–Hochberg across the study's test
 *   variants (known controls are outside that family: each control's q is its p adjusted as if it
 *   were added to the test variants, so controls are scored exactly as a test variant would be and
 *   change no test variant's q); then, for primary metrics, Holm's step-down across the variant's
 *   primary metrics of every assay. A variant with no effect beyond any band is called abnormal with
 *   probability at most the threshold: Holm needs only that each null q be no smaller than uniform,
 *   and a q is never below its p.
 * - Assay (primary metrics only), each changed metric mapped through its hyper direction: changes
 *   both ways → mixed; one way → that direction (even if another primary metric is indeterminate:
 *   the measured change stands, and the sentence names the rest); all within → within WT range;
 *   otherwise indeterminate.
 * - Variant (across measured assays): the same rule over assay calls (COMBINING_RULE). "Within WT
 *   range" overall needs every primary metric shown inside its band: an intersection–union test,
 *   at the equivalence level with no adjustment (Berger 1982, Technometrics 24:295).
 * - Readout for calibration, by the study's disease direction: the abnormal readout is a change in
 *   that direction ('either': any change, mixed included); within WT range is normal; anything else
 *   (indeterminate, the opposite direction) is not counted.
 */
import type { AssayCall, FunctionCall, MetricCall, MetricComparison, MetricDef } from '../results/types.js';
import { benjaminiHochberg } from '../stats/bh.js';
import { tQuantile } from '../stats/distributions.js';
import { holm } from '../stats/holm.js';
import type { DiseaseDirection } from '../study/types.js';
import { fmt, fmtBand, fmtEffect, fmtEffectCi, fmtP, fmtRange, fmtValue, effectDecimals, fixed } from '../results/format.js';

export interface CallOptions {
  /** Adjusted p (q) below which an effect beyond the band is called. */
  qThreshold: number;
  /** TOST p below which an effect is called within WT range. */
  equivalenceAlpha: number;
  /** Ids of the known controls (scored, but outside the test variants' Benjamini–Hochberg family). */
  controls: ReadonlySet<string>;
}

/** The rule that combines metrics and assays into the overall call, stated on every report. */
export function combiningRule(qThreshold: number, equivalenceAlpha: number): string {
  return (
    `Overall call: hypercontractile or hypocontractile when at least one primary metric of a measured assay lies beyond its WT-like band in that direction ` +
    `(minimum-effect test, q < ${fmt(qThreshold, 2)} after Benjamini–Hochberg across the study's test variants and Holm across this variant's primary metrics); ` +
    `mixed when primary metrics point both ways; within WT range when every primary metric of every measured assay lies inside its band ` +
    `(two one-sided tests, p < ${fmt(equivalenceAlpha, 2)}); otherwise indeterminate. ` +
    `For a variant with no effect beyond any band, the chance of an abnormal overall call is at most ${fmt(qThreshold, 2)}.`
  );
}

/** The call of one comparison from its adjusted beyond-band q and its equivalence p. */
export function metricCall(c: Pick<MetricComparison, 'effect' | 'q' | 'pWithin' | 'band'>, options: Omit<CallOptions, 'controls'>): MetricCall {
  if (c.effect === null || !Number.isFinite(c.effect)) return 'not estimable';
  if (c.q !== null && c.q < options.qThreshold) return c.effect > (c.band[0] + c.band[1]) / 2 ? 'increased' : 'decreased';
  if (c.pWithin !== null && c.pWithin < options.equivalenceAlpha) return 'within WT range';
  return 'indeterminate';
}

/**
 * Adjust and call every comparison of the study (all assays at once), then write its sentence.
 * `defs` maps `<assay>.<metric>` to its definition. Returns new objects; the input is not changed.
 */
export function callComparisons(
  comparisons: readonly MetricComparison[],
  defs: ReadonlyMap<string, MetricDef>,
  options: CallOptions,
): MetricComparison[] {
  const out = comparisons.map((c) => ({ ...c, flags: [...c.flags] }));
  // 1. Benjamini–Hochberg per metric across test variants; each control as if added to them.
  const families = new Map<string, MetricComparison[]>();
  for (const c of out) {
    const key = `${c.assay}.${c.metric}`;
    const list = families.get(key);
    if (list) list.push(c);
    else families.set(key, [c]);
  }
  for (const family of families.values()) {
    const tests = family.filter((c) => !options.controls.has(c.variant));
    const testP = tests.map((c) => c.pBeyond);
    benjaminiHochberg(testP).forEach((q, i) => (tests[i]!.q = q));
    for (const c of family) {
      if (!options.controls.has(c.variant)) continue;
      c.q = c.pBeyond === null ? null : benjaminiHochberg([...testP, c.pBeyond])[testP.length] ?? null;
    }
  }
  // 2. Holm across each variant's primary metrics.
  const primaryByVariant = new Map<string, MetricComparison[]>();
  for (const c of out) {
    if (!defs.get(`${c.assay}.${c.metric}`)?.primary) continue;
    const list = primaryByVariant.get(c.variant);
    if (list) list.push(c);
    else primaryByVariant.set(c.variant, [c]);
  }
  for (const list of primaryByVariant.values()) {
    holm(list.map((c) => c.q)).forEach((q, i) => (list[i]!.q = q));
  }
  // 3. Calls and sentences.
  for (const c of out) {
    const def = defs.get(`${c.assay}.${c.metric}`);
    if (!def) throw new Error(`No metric definition for ${c.assay}.${c.metric}.`);
    c.call = metricCall(c, options);
    c.sentence = metricSentence(c, def, options, primaryByVariant.get(c.variant)?.length ?? 0);
  }
  return out;
}

/** One sentence stating the numbers behind a metric call. */
export function metricSentence(c: MetricComparison, def: MetricDef, options: Omit<CallOptions, 'controls'>, primaryCount: number): string {
  const what = c.scale === 'ratio' ? `${def.label} variant/WT` : `${def.label} variant − WT`;
  const flagNote = c.flags.filter((f) => f.severity !== 'info').map((f) => f.message);
  const caveats = flagNote.length > 0 ? ` Caveats: ${flagNote.join(' ')}` : '';
  if (c.effect === null) {
    return `${what}: not estimable (${c.nVariantUnits} variant and ${c.nWtUnits} WT preparations).${caveats}`;
  }
  const means =
    c.variantMean !== null && c.wtMean !== null
      ? `; variant ${fmtValue(c.variantMean, c.unit, c.scale, c.band)}, WT ${fmtValue(c.wtMean, c.unit, c.scale, c.band)} (${c.scale === 'ratio' ? 'geometric means' : 'means'} of the preparations compared)`
      : '';
  const ci = c.ciLow === null ? 'no 95% CI (too few preparations for a variance)' : `95% CI ${fmtEffectCi(c.ciLow, c.ciHigh, c.scale, c.effect, c.band)}`;
  const band = `WT-like band ${fmtBand(c.band, c.scale)}`;
  const n = `${c.nVariantUnits} variant vs ${c.nWtUnits} WT preparations, ${c.batches.length} batch${c.batches.length === 1 ? '' : 'es'}`;
  const adjust = def.primary && primaryCount > 1 ? `, adjusted across test variants and this variant's ${primaryCount} primary metrics` : ', adjusted across test variants';
  const q = `q = ${fmtP(c.q)} for an effect beyond the band${adjust}`;
  let reason: string;
  switch (c.call) {
    case 'increased':
    case 'decreased':
      reason = `the effect lies beyond the band's ${c.call === 'increased' ? 'upper' : 'lower'} edge (${q})`;
      break;
    case 'within WT range': {
      const t = c.se !== null && c.df !== null ? tQuantile(1 - options.equivalenceAlpha, c.df) : NaN;
      const analysis = c.scale === 'ratio' ? Math.log(c.effect) : c.effect;
      const lo = c.scale === 'ratio' ? Math.exp(analysis - t * (c.se ?? NaN)) : analysis - t * (c.se ?? NaN);
      const hi = c.scale === 'ratio' ? Math.exp(analysis + t * (c.se ?? NaN)) : analysis + t * (c.se ?? NaN);
      const level = Math.round((1 - 2 * options.equivalenceAlpha) * 100);
      const d = effectDecimals(c.scale, c.effect, c.band);
      reason = `the ${level}% interval ${fmtRange(lo, hi, (x) => fixed(x, d))} lies inside the band (two one-sided tests, p = ${fmtP(c.pWithin)})`;
      break;
    }
    default:
      reason = `the data show the effect neither beyond the band (${q}) nor inside it (two one-sided tests, p = ${fmtP(c.pWithin)})`;
  }
  return `${what} ${fmtEffect(c.effect, c.scale, c.band)} (${ci}${means}; ${n}); ${band}: ${c.call}, ${reason}.${caveats}`;
}

type Direction = 'hyper' | 'hypo';

function metricDirection(call: MetricCall, def: MetricDef): Direction | null {
  if (def.hyper === 'none') return null;
  if (call === 'increased') return def.hyper === 'up' ? 'hyper' : 'hypo';
  if (call === 'decreased') return def.hyper === 'up' ? 'hypo' : 'hyper';
  return null;
}

const HYPER = 'hypercontractile';
const HYPO = 'hypocontractile';

/** Combine directions and the remaining calls into one function call. */
function combine(directions: Direction[], allWithin: boolean, any: boolean): FunctionCall {
  if (!any) return 'not measured';
  const hyper = directions.includes('hyper');
  const hypo = directions.includes('hypo');
  if (hyper && hypo) return 'mixed';
  if (hyper) return HYPER;
  if (hypo) return HYPO;
  if (allWithin) return 'within WT range';
  return 'indeterminate';
}

/** Assay call from the variant's comparisons of that assay's primary metrics. */
export function assayCall(
  assay: string,
  variant: string,
  comparisons: readonly MetricComparison[],
  metrics: readonly MetricDef[],
  direction: DiseaseDirection,
): AssayCall {
  const primary = metrics.filter((m) => m.primary);
  const parts: string[] = [];
  const dirs: Direction[] = [];
  let allWithin = true;
  let any = false;
  for (const m of primary) {
    const c = comparisons.find((x) => x.metric === m.id);
    if (!c) continue;
    any = true;
    const d = metricDirection(c.call, m);
    if (d) dirs.push(d);
    if (c.call !== 'within WT range') allWithin = false;
    parts.push(`${m.label} ${c.call}${c.effect === null ? '' : ` (${fmtEffect(c.effect, c.scale, c.band)})`}`);
  }
  const call = combine(dirs, allWithin, any);
  const sentence = call === 'not measured' ? 'Not measured in this assay.' : `${capitalise(call)}: ${parts.join('; ')}.`;
  return { assay, variant, call, sentence, readout: readoutOf(call, direction) };
}

/** Variant call across assays (COMBINING_RULE: the same rule over the assay calls). */
export function variantCall(
  assayCalls: readonly AssayCall[],
  labels: Record<string, string>,
  direction: DiseaseDirection,
): { call: FunctionCall; sentence: string; readout: 'abnormal' | 'normal' | null } {
  const measured = assayCalls.filter((a) => a.call !== 'not measured');
  const dirs: Direction[] = [];
  for (const a of measured) {
    if (a.call === HYPER || a.call === 'mixed') dirs.push('hyper');
    if (a.call === HYPO || a.call === 'mixed') dirs.push('hypo');
  }
  const allWithin = measured.every((a) => a.call === 'within WT range');
  const call = combine(dirs, allWithin, measured.length > 0);
  // How many assays changed is said outright: "hypercontractile across 4 assays" read as if all
  // four were, when one was and three were within WT range.
  const n = measured.length;
  const changed = measured.filter((a) => a.call === HYPER || a.call === HYPO || a.call === 'mixed').length;
  const count =
    changed === 0 ? `no change in ${n === 1 ? 'the one assay' : `any of the ${n} assays`} measured` : `a change in ${changed} of ${n} assay${n === 1 ? '' : 's'} measured`;
  const sentence =
    call === 'not measured'
      ? 'No assay measured this variant.'
      : `${capitalise(call)} overall, from ${count}: ${measured.map((a) => `${labels[a.assay] ?? a.assay} ${a.call}`).join('; ')}.`;
  return { call, sentence, readout: readoutOf(call, direction) };
}

/** The calibration readout of a call under the study's disease direction. */
export function readoutOf(call: FunctionCall, direction: DiseaseDirection): 'abnormal' | 'normal' | null {
  if (call === 'within WT range') return 'normal';
  if (direction === 'either') return call === HYPER || call === HYPO || call === 'mixed' ? 'abnormal' : null;
  if (direction === 'hypercontractile') return call === HYPER ? 'abnormal' : null;
  return call === HYPO ? 'abnormal' : null;
}

function capitalise(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
