/**
 * Scoring: metric comparison → metric call → assay call → variant call, and the
 * readout used for calibration. Rules (DESIGN.md §6), applied the same way every time:
 *
 * - Metric: effect outside the WT-like band and q < qThreshold → increased/decreased;
 *   95% CI entirely inside the band → within WT range; no estimate → not estimable;
 *   otherwise indeterminate.
 * - Assay (primary metrics only), each changed metric mapped through its hyper direction:
 *   changes both ways → mixed; changes one way → that direction (even if another primary
 *   metric is indeterminate: the measured change stands, and the sentence names the rest);
 *   all within WT range → within WT range; otherwise indeterminate.
 * - Variant (across measured assays): the same rule over assay calls, with 'mixed' assays
 *   counting as changes both ways.
 * - Readout for calibration, by the study's disease direction: the abnormal readout is a
 *   change in that direction ('either': any change, mixed included); within WT range is
 *   normal; anything else (indeterminate, the opposite direction) is not counted.
 */
import type { AssayCall, FunctionCall, MetricCall, MetricComparison, MetricDef } from '../results/types.js';
import type { DiseaseDirection } from '../study/types.js';
import { fmt, fmtEffect, fmtP } from '../results/format.js';

export function metricCall(
  effect: number | null,
  ciLow: number | null,
  ciHigh: number | null,
  q: number | null,
  band: [number, number],
  qThreshold: number,
): MetricCall {
  if (effect === null || !Number.isFinite(effect)) return 'not estimable';
  const [lo, hi] = band;
  if ((effect < lo || effect > hi) && q !== null && q < qThreshold) return effect > hi ? 'increased' : 'decreased';
  if (ciLow !== null && ciHigh !== null && ciLow >= lo && ciHigh <= hi) return 'within WT range';
  return 'indeterminate';
}

/** One sentence stating the numbers behind a metric call. */
export function metricSentence(c: MetricComparison, def: MetricDef, qThreshold: number): string {
  const what = c.scale === 'ratio' ? `${def.label} variant/WT` : `${def.label} variant − WT`;
  if (c.effect === null) {
    return `${what}: not estimable (${c.nVariantUnits} variant and ${c.nWtUnits} WT units with a value).`;
  }
  const ci = c.ciLow === null ? 'no 95% CI (too few units for a residual variance)' : `95% CI ${fmtEffect(c.ciLow, c.scale)} to ${fmtEffect(c.ciHigh, c.scale)}`;
  const band = `WT-like band ${fmtEffect(c.band[0], c.scale)} to ${fmtEffect(c.band[1], c.scale)}`;
  const n = `${c.nVariantUnits} variant vs ${c.nWtUnits} WT units, ${c.batches.length} batch${c.batches.length === 1 ? '' : 'es'}`;
  const reason: Record<MetricCall, string> = {
    increased: `outside the band and q < ${fmt(qThreshold, 2)}`,
    decreased: `outside the band and q < ${fmt(qThreshold, 2)}`,
    'within WT range': 'the whole interval lies inside the band',
    indeterminate: 'neither clearly outside the band nor with its interval inside it',
    'not estimable': 'no estimate',
  };
  return `${what} ${fmtEffect(c.effect, c.scale)} (${ci}; q = ${fmtP(c.q)}; ${n}); ${band}: ${c.call}, ${reason[c.call]}.`;
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
  comparisons: MetricComparison[],
  metrics: MetricDef[],
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
    parts.push(`${m.label} ${c.call}${c.effect === null ? '' : ` (${fmtEffect(c.effect, c.scale)})`}`);
  }
  const call = combine(dirs, allWithin, any);
  const sentence =
    call === 'not measured'
      ? 'Not measured in this assay.'
      : `${capitalise(call)}: ${parts.join('; ')}.`;
  return { assay, variant, call, sentence, readout: readoutOf(call, direction) };
}

/** Variant call across assays. */
export function variantCall(
  assayCalls: AssayCall[],
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
