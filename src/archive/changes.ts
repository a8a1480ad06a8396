/**
 * What changed since a study's latest release: a clinician who received a report must hear when a
 * later analysis changes its call or its evidence level. Pure: the current StudyResults and the
 * released StudyResults of the same study in, plain data and one sentence per change out.
 *
 *   1. reasons: what differs between the two builds' inputs and settings (reasons.ts)
 *   2. per variant, matched by identity (gene + HGVS, identity.ts; never the wild type), in the
 *      released order, then the new variants in the current order:
 *        overall call changed · evidence level changed ·
 *        a metric's estimate now outside its released 95% CI · a metric released with an estimate
 *        and now not estimable or not compared · a metric now compared on another scale (its
 *        estimate cannot be set against the released interval) ·
 *        withdrawn (released, not in the current build: still listed) · new (not released)
 *   3. each change with the reasons that can move that kind of change (reasonsFor), and its sentence
 */
import { fmtEffect } from '../results/format.js';
import type { EvidenceLevel, FunctionCall, MetricCall, MetricComparison, MetricScale, StudyResults, VariantResult } from '../results/types.js';
import { variantKey, variantsByKey } from './identity.js';
import { pushTo } from './maps.js';
import { reasonsFor, studyReasons, variantFileIndex, type ChangeKind, type ChangeReason } from './reasons.js';
import { releaseName, type ReleaseRef } from './release.js';
import { capitalise, joinAnd, rangeText } from './words.js';

/** A metric as a change names it. */
export interface MetricRef {
  /** '<assay>.<metric>'. */
  key: string;
  assay: string;
  metric: string;
  label: string;
  assayLabel: string;
  /** Whether the metric drives its assay's call (in the current build, else as released). */
  primary: boolean;
}

/** One build's comparison of a metric, as a change reports it. */
export interface Estimate {
  effect: number | null;
  ciLow: number | null;
  ciHigh: number | null;
  scale: MetricScale;
  unit: string;
  call: MetricCall;
}

interface ChangeBase {
  /** The reasons found that can move this kind of change (never empty: 'none-found' says so). */
  reasons: ChangeReason[];
  /** The change in words, as a clause: 'overall call was hypercontractile, now indeterminate'. */
  text: string;
  /** The whole sentence: release, note, change, reasons. */
  sentence: string;
}

export type VariantChange =
  | (ChangeBase & { kind: 'overall-call'; was: FunctionCall; now: FunctionCall })
  | (ChangeBase & { kind: 'evidence-level'; was: EvidenceLevel; now: EvidenceLevel })
  | (ChangeBase & { kind: 'estimate-outside-ci'; metric: MetricRef; released: Estimate; current: Estimate })
  | (ChangeBase & { kind: 'estimate-lost'; metric: MetricRef; released: Estimate; current?: Estimate })
  | (ChangeBase & { kind: 'scale-changed'; metric: MetricRef; released: Estimate; current: Estimate })
  | (ChangeBase & { kind: 'withdrawn'; released: { call: FunctionCall; evidence: EvidenceLevel } })
  | (ChangeBase & { kind: 'new'; current: { call: FunctionCall; evidence: EvidenceLevel } });

export type VariantStatus = 'changed' | 'withdrawn' | 'new';

/** A change before its reasons and sentence are added (Omit over each member of the union). */
type Draft<T = VariantChange> = T extends unknown ? Omit<T, 'reasons' | 'sentence'> : never;
type MetricDraft = Extract<Draft, { metric: MetricRef }>;

export interface VariantChanges {
  /** '<gene>:<hgvs>'. */
  key: string;
  gene: string;
  hgvs: string;
  short: string;
  status: VariantStatus;
  /** The variant's id in the current build (absent when withdrawn) and in the release (absent when new). */
  currentId?: string;
  releasedId?: string;
  changes: VariantChange[];
  /** Every reason of its changes, once each, in order. */
  reasons: ChangeReason[];
  /** The line for the variant's report: every change and the reasons, in one sentence. */
  sentence: string;
}

export interface ReleaseComparison {
  study: string;
  release: ReleaseRef;
  releasedToolVersion: string;
  currentToolVersion: string;
  /** Everything found to differ between the two builds (also what changes no call: caveats, titles). */
  reasons: ChangeReason[];
  /** Variants with at least one change; unchanged variants are counted, not listed. */
  variants: VariantChanges[];
  unchanged: number;
  /** One sentence for the changes page and the end of the build's output. */
  summary: string;
}

function reasonsClause(reasons: readonly ChangeReason[]): string {
  return `${reasons.length === 1 ? 'reason' : 'reasons'}: ${joinAnd(reasons.map((r) => r.text))}`;
}

function estimateOf(c: MetricComparison): Estimate {
  return { effect: c.effect, ciLow: c.ciLow, ciHigh: c.ciHigh, scale: c.scale, unit: c.unit, call: c.call };
}

function metricRef(key: string, current: StudyResults, released: StudyResults): MetricRef {
  const [assay = key, ...rest] = key.split('.');
  const metric = rest.join('.');
  const find = (r: StudyResults) => {
    const a = r.assays.find((x) => x.id === assay);
    const m = a?.metrics.find((x) => x.id === metric);
    return a && m ? { assayLabel: a.label, label: m.label, primary: m.primary } : undefined;
  };
  const names = find(current) ?? find(released) ?? { assayLabel: assay, label: metric, primary: false };
  return { key, assay, metric, ...names };
}

/** Is `x` outside the closed interval [lo, hi]? Null anywhere: not decidable, so no. */
export function outsideInterval(x: number | null, lo: number | null, hi: number | null): boolean {
  if (x === null || lo === null || hi === null) return false;
  return x < lo || x > hi;
}

/** Changes of the metric estimates of a variant present in both builds. */
function estimateChanges(
  released: readonly MetricComparison[],
  current: readonly MetricComparison[],
  ref: (key: string) => MetricRef,
): MetricDraft[] {
  const out: MetricDraft[] = [];
  for (const r of released) {
    const key = `${r.assay}.${r.metric}`;
    const c = current.find((x) => x.assay === r.assay && x.metric === r.metric);
    const metric = ref(key);
    const name = `${metric.label} (${metric.assayLabel})`;
    const was = estimateOf(r);
    const released95 = `${fmtEffect(r.effect, r.scale)} (95% CI ${rangeText(r.ciLow, r.ciHigh, r.scale)})`;
    if (r.effect === null) continue; // nothing was said about it at release
    if (!c || c.effect === null) {
      const now = c ? estimateOf(c) : undefined;
      out.push({ kind: 'estimate-lost', metric, released: was, ...(now ? { current: now } : {}), text: `${name} was ${released95} and is now ${c ? 'not estimable' : 'not compared'}` });
    } else if (c.scale !== r.scale) {
      out.push({
        kind: 'scale-changed',
        metric,
        released: was,
        current: estimateOf(c),
        text: `${name} is now compared as a ${c.scale} (${fmtEffect(c.effect, c.scale)}), not as a ${r.scale} (released ${released95}), so it cannot be set against the released interval`,
      });
    } else if (outsideInterval(c.effect, r.ciLow, r.ciHigh)) {
      out.push({
        kind: 'estimate-outside-ci',
        metric,
        released: was,
        current: estimateOf(c),
        text: `${name} is now ${fmtEffect(c.effect, c.scale)}, outside its released 95% CI ${rangeText(r.ciLow, r.ciHigh, r.scale)} (released estimate ${fmtEffect(r.effect, r.scale)})`,
      });
    }
  }
  return out;
}

const CHANGE_KIND: Record<VariantChange['kind'], ChangeKind> = {
  'overall-call': 'overall-call',
  'evidence-level': 'evidence-level',
  'estimate-outside-ci': 'estimate',
  'estimate-lost': 'estimate',
  'scale-changed': 'estimate',
  withdrawn: 'presence',
  new: 'presence',
};

const STATUS_WORD: Record<VariantStatus, string> = { changed: 'Changed', withdrawn: 'Withdrawn', new: 'New' };

/**
 * Compare the current build of a study with its latest release. `release` names the release (its id,
 * date and note); `studyId` is the study's id in archive.json.
 */
export function compareWithRelease(studyId: string, current: StudyResults, released: StudyResults, release: ReleaseRef): ReleaseComparison {
  // 1. Reasons.
  const reasons = studyReasons(released, current);
  const since = `${releaseName(release)} (note: ${release.note})`;
  const group = (cs: readonly MetricComparison[]) => {
    const m = new Map<string, MetricComparison[]>();
    for (const c of cs) pushTo(m, c.variant, c);
    return m;
  };
  const comparisonsNow = group(current.comparisons);
  const comparisonsThen = group(released.comparisons);
  const ref = (key: string) => metricRef(key, current, released);
  const filesNow = variantFileIndex(current);
  const filesThen = variantFileIndex(released);

  // 2. Per variant.
  const now = variantsByKey(current);
  const then = variantsByKey(released);
  const keys = [...then.keys(), ...[...now.keys()].filter((k) => !then.has(k))];
  const variants: VariantChanges[] = [];
  let unchanged = 0;
  for (const key of keys) {
    const a = then.get(key);
    const b = now.get(key);
    const files = new Set([...(a ? filesThen(a.id) : []), ...(b ? filesNow(b.id) : [])]);
    const drafts: Draft[] = [];
    if (a && !b) {
      drafts.push({
        kind: 'withdrawn',
        released: { call: a.overall.call, evidence: a.evidence.level },
        text: `in the released results (overall call ${a.overall.call}, evidence level ${a.evidence.level}) but not in the current build; the released results stay as they were released`,
      });
    } else if (b && !a) {
      drafts.push({
        kind: 'new',
        current: { call: b.overall.call, evidence: b.evidence.level },
        text: `not in the released results; overall call now ${b.overall.call} (evidence level ${b.evidence.level})`,
      });
    } else if (a && b) {
      if (a.overall.call !== b.overall.call) drafts.push({ kind: 'overall-call', was: a.overall.call, now: b.overall.call, text: `overall call was ${a.overall.call}, now ${b.overall.call}` });
      if (a.evidence.level !== b.evidence.level) drafts.push({ kind: 'evidence-level', was: a.evidence.level, now: b.evidence.level, text: `evidence level was ${a.evidence.level}, now ${b.evidence.level}` });
      drafts.push(...estimateChanges(comparisonsThen.get(a.id) ?? [], comparisonsNow.get(b.id) ?? [], ref));
    }
    if (drafts.length === 0) {
      unchanged++;
      continue;
    }
    // 3. Reasons and sentences.
    const status: VariantStatus = a && b ? 'changed' : a ? 'withdrawn' : 'new';
    const lead = `${STATUS_WORD[status]} since ${since}`;
    const changes = drafts.map((d) => {
      const rs = reasonsFor(reasons, CHANGE_KIND[d.kind], files);
      return { ...d, reasons: rs, sentence: `${lead}: ${d.text}; ${reasonsClause(rs)}.` } as VariantChange;
    });
    const all: ChangeReason[] = [];
    for (const c of changes) for (const r of c.reasons) if (!all.some((x) => x.text === r.text)) all.push(r);
    const informative = all.some((r) => r.kind !== 'none-found') ? all.filter((r) => r.kind !== 'none-found') : all;
    const info = (b ?? a) as VariantResult;
    variants.push({
      key,
      gene: info.gene,
      hgvs: info.hgvs,
      short: info.short,
      status,
      ...(b ? { currentId: b.id } : {}),
      ...(a ? { releasedId: a.id } : {}),
      changes,
      reasons: informative,
      sentence: `${lead}: ${changes.map((c) => c.text).join('; ')}; ${reasonsClause(informative)}.`,
    });
  }

  const count = (s: VariantStatus) => variants.filter((v) => v.status === s).length;
  const parts = [
    count('changed') ? `${count('changed')} variant${count('changed') === 1 ? '' : 's'} changed` : '',
    count('withdrawn') ? `${count('withdrawn')} withdrawn` : '',
    count('new') ? `${count('new')} new` : '',
  ].filter(Boolean);
  const counts = variants.length
    ? `Since ${since}: ${joinAnd(parts)}; ${unchanged} unchanged (same overall call and evidence level, no estimate outside its released 95% CI).`
    : `No call changed since ${since}: every variant has the same overall call and evidence level, and no estimate lies outside its released 95% CI.`;
  const caveats = reasons.find((r) => r.kind === 'caveats-changed');
  const summary = caveats ? `${counts} ${capitalise(caveats.text)} since the release.` : counts;
  return {
    study: studyId,
    release,
    releasedToolVersion: released.tool.version,
    currentToolVersion: current.tool.version,
    reasons,
    variants,
    unchanged,
    summary,
  };
}

/** The lines the CLI prints at the end of a build: the summary, then one line per changed variant. */
export function changeLines(comparison: ReleaseComparison): string[] {
  return [comparison.summary, ...comparison.variants.map((v) => `${v.short} (${v.gene} ${v.hgvs}): ${v.sentence}`)];
}

/** For the variant's report: the change line of one variant of the current build, if it changed. */
export function changeFor(comparison: ReleaseComparison, variant: Pick<VariantResult, 'gene' | 'hgvs'>): VariantChanges | undefined {
  const key = variantKey(variant);
  return comparison.variants.find((v) => v.key === key);
}
