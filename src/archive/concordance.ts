/**
 * Do the studies that measured a variant agree? Calls are compared, not effects: each study's call
 * already states its own uncertainty against its own WT-like band (src/analysis/score.ts), while
 * effects of different studies may sit against different bands or scales. Pure.
 *
 * Per scope (the overall call, or one metric), over the studies' determinate calls:
 *   discordant    one study shows a change and another shows the variant within WT range
 *                 (increased or decreased vs within WT range; hyper-, hypocontractile or mixed vs
 *                 within WT range), or two studies show opposite directions (increased vs decreased,
 *                 hypercontractile vs hypocontractile);
 *   concordant    at least two determinate calls, all the same;
 *   inconclusive  determinate calls that differ without contradicting each other (mixed beside
 *                 hypercontractile), or fewer than two determinate calls while two or more
 *                 studies measured the scope.
 * Determinate: increased, decreased, within WT range (metrics); hypercontractile, hypocontractile,
 * within WT range, mixed (overall). Indeterminate, not estimable and not measured are not compared:
 * a study that could not tell neither confirms nor contradicts one that could.
 *
 * For the variant: discordant when any scope is; single study when fewer than two studies count;
 * concordant when some scope is concordant and none is inconclusive by differing calls; otherwise
 * inconclusive. "Concordant" is thus never said of two studies of which only one could make a call
 * (a refinement of "all determinate calls agree", which would say it of one call).
 */
import type { FunctionCall, MetricCall } from '../results/types.js';
import { joinAnd } from './words.js';
import { pushTo } from './maps.js';

export type Agreement = 'discordant' | 'concordant' | 'inconclusive' | 'single study';

/** One study's call in one scope. */
export interface ScopeCall {
  studyId: string;
  /** How the sentence names the study, e.g. 'Panel 2025 (2025-03-10)'. */
  studyName: string;
  call: MetricCall | FunctionCall;
}

/** A scope in which the studies disagree, with every study's call in it. */
export interface Disagreement {
  /** 'overall', or the metric key '<assay>.<metric>'. */
  scope: string;
  /** Words for the scope, e.g. 'overall call' or 'kcat (Actin-activated ATPase)'. */
  label: string;
  kind: 'change vs within WT range' | 'opposite directions' | 'different changes';
  calls: ScopeCall[];
}

export interface ScopeAgreement {
  scope: string;
  label: string;
  status: Exclude<Agreement, 'single study'> | 'not comparable';
  calls: ScopeCall[];
  disagreement?: Disagreement;
}

export interface Concordance {
  status: Agreement;
  /** Studies whose latest analysis measured the variant, in archive order. */
  studies: string[];
  /** Scopes that are discordant, or differ without contradicting each other. */
  disagreements: Disagreement[];
  /** Scopes in which two or more determinate calls agree. */
  agreements: Array<{ scope: string; label: string; call: string }>;
  /** One sentence for the variant's history page and the gene page, stating which calls differ where. */
  sentence: string;
}

type Reading = 'up' | 'down' | 'both' | 'within';

/** What a determinate call says about the direction of change; undefined for calls that cannot be compared. */
function reading(call: MetricCall | FunctionCall): Reading | undefined {
  switch (call) {
    case 'increased':
    case 'hypercontractile':
      return 'up';
    case 'decreased':
    case 'hypocontractile':
      return 'down';
    case 'mixed':
      return 'both';
    case 'within WT range':
      return 'within';
    default:
      return undefined;
  }
}

/** Judge one scope from the studies' calls in it. */
export function judgeScope(scope: string, label: string, calls: readonly ScopeCall[]): ScopeAgreement {
  const determinate = calls.filter((c) => reading(c.call) !== undefined);
  const base = { scope, label, calls: [...calls] };
  if (determinate.length < 2) return { ...base, status: 'not comparable' };
  const readings = new Set(determinate.map((c) => reading(c.call)!));
  const changed = readings.has('up') || readings.has('down') || readings.has('both');
  let kind: Disagreement['kind'] | undefined;
  if (readings.has('up') && readings.has('down')) kind = 'opposite directions';
  else if (changed && readings.has('within')) kind = 'change vs within WT range';
  if (kind) return { ...base, status: 'discordant', disagreement: { scope, label, kind, calls: determinate } };
  if (readings.size === 1) return { ...base, status: 'concordant' };
  return { ...base, status: 'inconclusive', disagreement: { scope, label, kind: 'different changes', calls: determinate } };
}

/**
 * "increased in A and C, but within WT range in B": the calls grouped, in order of first appearance.
 * @example describeCalls([{ studyName: 'A', call: 'increased' }, { studyName: 'B', call: 'within WT range' }]) // 'increased in A, but within WT range in B'
 */
export function describeCalls(calls: ReadonlyArray<Pick<ScopeCall, 'studyName' | 'call'>>): string {
  const groups = new Map<string, string[]>();
  for (const c of calls) pushTo(groups, c.call, c.studyName);
  return [...groups].map(([call, names]) => `${call} in ${joinAnd(names)}`).join(', but ');
}

/**
 * The variant's concordance from its scopes. `studies` are the names of the studies counted
 * (whose latest analysis measured the variant); `withdrawnFrom` names studies whose releases held
 * the variant but whose latest analysis no longer does.
 */
export function judgeVariant(
  scopes: readonly ScopeAgreement[],
  studies: ReadonlyArray<{ studyId: string; studyName: string }>,
  withdrawnFrom: readonly string[] = [],
): Concordance {
  const disagreements = scopes.filter((s) => s.disagreement).map((s) => s.disagreement!);
  const agreements = scopes
    .filter((s) => s.status === 'concordant')
    .map((s) => ({ scope: s.scope, label: s.label, call: s.calls.find((c) => reading(c.call) !== undefined)!.call }));
  const ids = studies.map((s) => s.studyId);
  const withdrawn = withdrawnFrom.length ? ` It was withdrawn from ${joinAnd(withdrawnFrom)} after a release there, so that study's released calls are shown but not compared.` : '';
  if (studies.length < 2) {
    const where = studies.length ? `Measured in one study only, ${studies[0]!.studyName}; there is nothing to compare it with.` : 'Not measured in the latest analysis of any study.';
    return { status: 'single study', studies: ids, disagreements: [], agreements: [], sentence: `${where}${withdrawn}` };
  }
  const n = `the ${studies.length} studies that measured it`;
  const discordant = disagreements.filter((d) => d.kind !== 'different changes');
  if (discordant.length) {
    const parts = discordant.map((d) => `${d.label}${d.kind === 'opposite directions' ? ', in opposite directions:' : ''} ${describeCalls(d.calls)}`);
    return { status: 'discordant', studies: ids, disagreements, agreements, sentence: `Discordant between ${n}: ${parts.join('; ')}.${withdrawn}` };
  }
  if (disagreements.length) {
    const parts = disagreements.map((d) => `${d.label} ${describeCalls(d.calls)}`);
    return {
      status: 'inconclusive',
      studies: ids,
      disagreements,
      agreements,
      sentence: `Not concordant, though not contradictory: ${n} show different changes — ${parts.join('; ')}.${withdrawn}`,
    };
  }
  if (agreements.length) {
    const parts = agreements.map((a) => `${a.label} ${a.call}`);
    return { status: 'concordant', studies: ids, disagreements, agreements, sentence: `Concordant: ${n} agree on every call two or more of them could make — ${parts.join('; ')}.${withdrawn}` };
  }
  return {
    status: 'inconclusive',
    studies: ids,
    disagreements,
    agreements,
    sentence: `Not comparable yet: ${n} made no call that two of them could determine (indeterminate or not estimable elsewhere).${withdrawn}`,
  };
}
