/** Data for the index table and the per-variant reports (site pages and single-file reports). */
import { groupBy } from '../assays/assay-common.js';
import { type ChartsFor, drawnSpec, specTable } from '../charts/assay-charts.js';
import { variantNames } from '../charts/chart-def.js';
import { forestChart, forestTable } from '../charts/forest.js';
import { NONE, fmt, fmtBand, fmtEffect, fmtEffectCi, fmtP, fmtValue } from '../results/format.js';
import type { FunctionCall, MetricComparison, MetricDef, StudyResults, UnitResult, VariantResult } from '../results/types.js';
import type { SourceRef } from '../study/types.js';
import { PATHS, slug } from './paths.js';
import {
  type BlockFn,
  type CalibrationView,
  type CallView,
  type ChartBlock,
  type ExclusionView,
  type FlagChip,
  type FlagView,
  type RenderFn,
  exclusionView,
  flagChip,
  flagView,
  functionCall,
  lineRanges,
  mapLimit,
  metricCall,
  renderBlocks,
} from './view-common.js';
import { type ControlRow, controlRows, fmtCalibration } from './view-study.js';

export interface IndexRow {
  id: string;
  name: string;
  href: string;
  /** The variant's single-file report. */
  report: string;
  gene: string;
  hgvs: string;
  residue: string;
  domain: string;
  isWT: boolean;
  control: string;
  assayCalls: Array<CallView & { assay: string; label: string; detail: string }>;
  overall: CallView;
  evidence: string;
  /** Flag codes (for the filter) and their plain words, linked to the glossary. */
  flags: string[];
  flagChips: FlagChip[];
  /** Lower-case text the search box matches. */
  search: string;
}

export interface MetricRow {
  metric: string;
  unit: string;
  primary: boolean;
  scale: string;
  /** Absolute values in the metric's unit: the variant's and WT's means of the preparations compared. */
  variantMean: string;
  wtMean: string;
  effect: string;
  ci: string;
  band: string;
  q: string;
  nVariant: number;
  nWt: number;
  batches: string;
  call: CallView;
  flags: FlagChip[];
}

/** One cell of the summary strip: an assay's call and the effect that carries it. */
export interface GlanceCell {
  assay: string;
  label: string;
  href: string;
  call: CallView;
  /** The key metric, its effect and 95% CI, e.g. 'pCa50', '+0.172', '0.132 to 0.211'. */
  metric: string;
  effect: string;
  ci: string;
  /** Absolute values: 'variant 5.962 · WT 5.790' with the unit. */
  absolute: string;
  /** For WT: how much reference data the assay has, e.g. '12 preparations in 3 batches'. */
  detail: string;
}

/**
 * A block shown right under the summary, for anything a reader must see before the details
 * (input warnings, a change since the last release, …). Empty unless a builder adds one:
 * VariantPage.notices is the slot for such blocks (templates/_includes/variant/notices.njk).
 */
export interface Notice {
  /** Short machine name, also the block's CSS class suffix, e.g. 'input-warnings'. */
  kind: string;
  title: string;
  /** Sentences or list items, plain text. */
  items: string[];
}

/** The input warnings that touch a variant (VariantResult.warnings), as the notice under its summary. */
export function inputWarnings(v: VariantResult): Notice[] {
  const warnings = v.warnings ?? [];
  if (warnings.length === 0) return [];
  const where = (w: (typeof warnings)[number]) =>
    `${w.at.file}${w.at.line !== undefined ? (w.at.lineEnd !== undefined && w.at.lineEnd !== w.at.line ? `, lines ${w.at.line}–${w.at.lineEnd}` : `, line ${w.at.line}`) : ''}${w.at.column ? `, column ${w.at.column}` : ''}${w.at.jsonPath ? `, ${w.at.jsonPath}` : ''}`;
  return [{ kind: 'input-warnings', title: 'Warnings about the input', items: warnings.map((w) => `${w.message} ${w.fix} [${where(w)}; ${w.code}]`) }];
}

export interface SourceRows {
  file: string;
  rows: number;
  lines: string;
}

export interface VariantPage {
  path: string;
  /** Path of the single-file report of this variant. */
  reportPath: string;
  root: string;
  /** Page title (HTML <title>). */
  title: string;
  v: VariantResult;
  name: string;
  overall: CallView;
  control: string;
  glance: {
    cells: GlanceCell[];
    /** The rule that combines the assays into the overall call, in one sentence. */
    rule: string;
    evidence: string;
    evidenceNote: string;
  };
  notices: Notice[];
  assays: Array<{
    id: string;
    label: string;
    href: string;
    call: CallView;
    sentence: string;
    metrics: MetricRow[];
    charts: ChartBlock[];
    units: Array<{ unit: string; batch: string; values: string; n: number; excluded: string; flags: FlagChip[] }>;
  }>;
  forest: ChartBlock | null;
  flags: FlagView[];
  /** Each flag code on this report once, with its words: the single-file report explains them in place of the glossary link. */
  flagCodes: Array<{ code: string; label: string; explanation: string; anchor: string }>;
  exclusions: ExclusionView[];
  sources: { variant: SourceRows[]; wt: SourceRows[]; wtBatches: string };
  evidence: { level: string; scope: string; sentence: string; calibration: CalibrationView | null; controls: ControlRow[] };
  /** Running header and footer of the printed report. */
  print: { head: string; foot: string };
  prev: { name: string; href: string } | null;
  next: { name: string; href: string } | null;
}

/** Comparisons and units of each variant, in results order (one pass instead of a scan per variant). */
function byVariant(results: StudyResults) {
  const comps = groupBy(results.comparisons, (c) => c.variant);
  const units = groupBy(results.units, (u) => u.variant);
  return { comps: (id: string) => comps.get(id) ?? [], units: (id: string) => units.get(id) ?? [] };
}

function metricDefs(results: StudyResults): Map<string, MetricDef> {
  return new Map(results.assays.flatMap((a) => a.metrics.map((m) => [`${a.id}.${m.id}`, m] as const)));
}

/** '12 preparations in 3 batches' */
function unitCount(units: readonly UnitResult[]): string {
  const used = units.filter((u) => !u.excluded);
  const batches = new Set(used.map((u) => u.batch)).size;
  return `${used.length} preparation${used.length === 1 ? '' : 's'} in ${batches} batch${batches === 1 ? '' : 'es'}`;
}

/** The evidence level as the index and the summary state it. */
function evidenceText(v: VariantResult): string {
  if (v.isWT) return 'not applicable (reference)';
  if (v.control) return 'not scored (calibration control)';
  return v.evidence.level === 'none' ? 'no evidence level' : `at most ${v.evidence.level}`;
}

export function indexRows(results: StudyResults, slugs: Map<string, string>): IndexRow[] {
  const names = variantNames(results);
  const idx = byVariant(results);
  return results.variants.map((v) => {
    const flags = [...new Set(variantFlagCodes(v, idx.comps(v.id), idx.units(v.id)))].sort();
    const units = idx.units(v.id);
    const assayCalls = results.assays.map((a) => {
      const mine = units.filter((u) => u.assay === a.id);
      if (v.isWT) return { assay: a.id, label: a.label, ...functionCall(mine.length ? 'reference' : 'not measured'), detail: mine.length ? unitCount(mine) : '' };
      const c = v.assayCalls.find((x) => x.assay === a.id);
      return { assay: a.id, label: a.label, ...functionCall(c?.call ?? 'not measured'), detail: '' };
    });
    const control = v.control ? `${v.control.class} control` : '';
    const name = names.get(v.id) ?? v.short;
    return {
      id: v.id,
      name,
      href: PATHS.variant(slugs.get(v.id) as string),
      report: PATHS.report(slugs.get(v.id) as string),
      gene: v.gene,
      hgvs: v.hgvs,
      residue: v.residue === undefined ? '' : String(v.residue),
      domain: v.domain ?? '',
      isWT: v.isWT,
      control: v.isWT ? 'reference' : control,
      assayCalls,
      overall: functionCall(v.isWT ? 'reference' : v.overall.call),
      evidence: evidenceText(v),
      flags,
      flagChips: flags.map(flagChip),
      search: [name, v.gene, v.hgvs, v.short, v.label, v.domain ?? '', control, v.note ?? ''].join(' ').toLowerCase(),
    };
  });
}

function variantFlagCodes(v: VariantResult, comps: StudyResults['comparisons'], units: StudyResults['units']): string[] {
  return [...v.flags.map((f) => f.code), ...comps.flatMap((c) => c.flags.map((f) => f.code)), ...units.flatMap((u) => u.flags.map((f) => f.code))];
}

/** The first sentence of a text (the combining rule's second sentence is its error bound, stated on the methods page). */
export function firstSentence(text: string): string {
  const m = /^(.*?[.!?])(?:\s+(?=[A-Z])|$)/s.exec(text.trim());
  return (m?.[1] ?? text).trim();
}

/**
 * The comparison that carries an assay's call: for a change, the primary metric changed in the
 * call's direction with the smallest q; otherwise the assay's first primary metric with an
 * estimate (the one the assay is known by), else its first primary metric.
 */
export function keyComparison(call: FunctionCall, comps: readonly MetricComparison[], metrics: readonly MetricDef[]): MetricComparison | undefined {
  const primary = metrics.filter((m) => m.primary).flatMap((m) => comps.filter((c) => c.metric === m.id).map((c) => ({ c, m })));
  const byQ = (a: { c: MetricComparison }, b: { c: MetricComparison }) => (a.c.q ?? 1) - (b.c.q ?? 1);
  if (call === 'hypercontractile' || call === 'hypocontractile' || call === 'mixed') {
    const want = call === 'mixed' ? ['hyper', 'hypo'] : [call === 'hypercontractile' ? 'hyper' : 'hypo'];
    const changed = primary.filter(({ c, m }) => want.includes(metricCall(c.call, m.hyper).direction)).sort(byQ);
    if (changed[0]) return changed[0].c;
  }
  return (primary.find(({ c }) => c.effect !== null) ?? primary[0])?.c ?? comps[0];
}

/** Each file's rows as a count and line ranges, from units' sources (a SourceRef is one contiguous run of lines). */
/** Runs of lines a report lists per file before it counts the rest (results.json has every line). */
const PROVENANCE_RUNS = 12;

export function sourceRows(units: readonly UnitResult[]): SourceRows[] {
  const lines = new Map<string, Array<[number, number]>>();
  for (const u of units) {
    for (const s of u.source as SourceRef[]) {
      const list = lines.get(s.file) ?? [];
      if (s.line !== undefined) list.push([s.line, s.lineEnd ?? s.line]);
      lines.set(s.file, list);
    }
  }
  return [...lines.keys()].sort().map((file) => {
    const all: number[] = [];
    for (const [a, b] of lines.get(file) ?? []) for (let l = a; l <= b; l++) all.push(l);
    const unique = [...new Set(all)];
    return { file, rows: unique.length, lines: lineRanges(unique, PROVENANCE_RUNS) || 'whole file' };
  });
}

export interface VariantPagesOptions {
  /** Chart renderer (default: renderSvg in this thread, no cache). */
  render?: RenderFn;
  /** Assay chart blocks found by their inputs (the build's store), so that an unchanged chart's spec is never built. */
  block?: BlockFn;
  /** Renderer of the charts inside such blocks (the block is kept whole, its SVG need not be kept again); default `render`. */
  blockRender?: RenderFn;
  /** Variants whose pages are built at once (default 8). */
  concurrency?: number;
  /** Called after each variant page: (done, total). */
  onVariant?: (done: number, total: number) => void;
  /** Build time shown in the printed footer (default: the results' provenance.builtAt). */
  builtAt?: string;
}

/**
 * A builder of variant pages for any subset of the study's variants (e.g. batches of 100, so
 * that only one batch's SVGs are in memory at a time). Indexes are built once; prev/next links
 * follow results.variants whatever the subset; `onVariant` counts across all calls.
 */
export function variantPageBuilder(results: StudyResults, slugs: Map<string, string>, chartsFor?: ChartsFor, options: VariantPagesOptions = {}): (subset: readonly VariantResult[]) => Promise<VariantPage[]> {
  const names = variantNames(results);
  const idx = byVariant(results);
  const defs = metricDefs(results);
  const render = options.render;
  const position = new Map(results.variants.map((v, i) => [v.id, i]));
  const wtIds = new Set(results.variants.filter((v) => v.isWT).map((v) => v.id));
  const wtUnits = results.units.filter((u) => wtIds.has(u.variant));
  const link = (q: VariantResult | undefined) => (q ? { name: names.get(q.id) ?? q.short, href: PATHS.variant(slugs.get(q.id) as string) } : null);
  const rule = firstSentence(results.settings.combiningRule);
  const builtAt = options.builtAt ?? results.provenance.builtAt;
  let done = 0;
  /** The variant's forest plot, with its table of effects and q values. */
  const forestBlock = async (v: VariantResult, name: string): Promise<ChartBlock | null> => {
    const b = (await renderBlocks([forestChart(results, v, name)], render))[0];
    return b ? { ...b, table: forestTable(results, v) } : null;
  };
  const metricRow = (c: MetricComparison): MetricRow => {
    const def = defs.get(`${c.assay}.${c.metric}`);
    return {
      metric: def?.label ?? c.metric,
      unit: c.unit || def?.unit || '',
      primary: def?.primary ?? false,
      scale: c.scale === 'ratio' ? 'ratio to WT' : 'difference from WT',
      variantMean: fmtValue(c.variantMean, c.unit, c.scale, c.band),
      wtMean: fmtValue(c.wtMean, c.unit, c.scale, c.band),
      effect: fmtEffect(c.effect, c.scale, c.band),
      ci: fmtEffectCi(c.ciLow, c.ciHigh, c.scale, c.effect, c.band),
      band: fmtBand(c.band, c.scale),
      q: fmtP(c.q),
      nVariant: c.nVariantUnits,
      nWt: c.nWtUnits,
      batches: c.batches.join(', '),
      call: metricCall(c.call, def?.hyper ?? 'none'),
      flags: [...new Set(c.flags.map((f) => f.code))].map(flagChip),
    };
  };
  return (subset) =>
    mapLimit(subset, options.concurrency ?? 8, async (v): Promise<VariantPage> => {
      const name = names.get(v.id) ?? v.short;
      const extra = chartsFor ? await chartsFor(v.id) : [];
      const myComps = idx.comps(v.id);
      const myUnits = idx.units(v.id);
      const assays: VariantPage['assays'] = [];
      const cells: GlanceCell[] = [];
      for (const a of results.assays) {
        const comps = myComps.filter((c) => c.assay === a.id);
        const units = myUnits.filter((u) => u.assay === a.id);
        const call = v.assayCalls.find((c) => c.assay === a.id);
        const callView = functionCall(v.isWT ? (units.length ? 'reference' : 'not measured') : (call?.call ?? 'not measured'));
        const key = v.isWT ? undefined : keyComparison(call?.call ?? 'not measured', comps, a.metrics);
        const keyDef = key ? defs.get(`${key.assay}.${key.metric}`) : undefined;
        cells.push({
          assay: a.id,
          label: a.label,
          href: PATHS.assay(a.id),
          call: callView,
          metric: key ? (keyDef?.label ?? key.metric) : '',
          effect: key ? fmtEffect(key.effect, key.scale, key.band) : '',
          ci: key && key.ciLow !== null ? fmtEffectCi(key.ciLow, key.ciHigh, key.scale, key.effect, key.band) : '',
          absolute: key && key.variantMean !== null ? `${name} ${fmtValue(key.variantMean, key.unit, key.scale, key.band)} · WT ${fmtValue(key.wtMean, key.unit, key.scale, key.band)}` : '',
          detail: v.isWT ? (units.length ? unitCount(units) : 'no data') : comps.length === 0 && units.length === 0 ? 'no data' : '',
        });
        if (comps.length === 0 && units.length === 0 && !call) continue;
        const charts = await Promise.all(
          extra
            .filter((c) => c.assay === a.id)
            .map(async (c, i): Promise<ChartBlock> => {
              const chartKey = `assay:${v.id}:${a.id}:${i}`;
              const make = async () => {
                const description = c.description ?? `${c.title}. The variant's data and fitted curves beside the WT of the same batches; the values are in the table below.`;
                const [b] = await renderBlocks([{ key: chartKey, title: c.title, description, spec: drawnSpec(c.spec), table: specTable(c.spec) }], options.block ? (options.blockRender ?? render) : render);
                return { svg: b!.svg, description: b!.description, table: b!.table };
              };
              const content = options.block ? await options.block(['assay-chart', a.id, chartKey, c.title, c.inputs], make) : await make();
              return { id: `chart-${slug(chartKey)}`, title: c.title, ...content };
            }),
        );
        assays.push({
          id: a.id,
          label: a.label,
          href: PATHS.assay(a.id),
          call: callView,
          sentence: v.isWT ? `Reference: ${unitCount(units)}.` : (call?.sentence ?? ''),
          metrics: comps.map(metricRow),
          charts,
          units: units.map((u) => ({
            unit: u.unit,
            batch: u.batch,
            values: Object.entries(u.metrics)
              .map(([k, x]) => {
                const def = defs.get(`${a.id}.${k}`);
                return `${def?.label ?? k} ${x === null ? NONE : `${fmt(x)}${def?.unit ? ` ${def.unit}` : ''}`}`;
              })
              .join('; '),
            n: u.nTechnical,
            excluded: u.excluded ?? '',
            flags: [...new Set(u.flags.map((f) => f.code))].map(flagChip),
          })),
        });
      }
      const flags: FlagView[] = [
        ...v.flags.map((f) => flagView(f, 'variant')),
        ...myComps.flatMap((c) => c.flags.map((f) => flagView(f, `${results.assays.find((a) => a.id === c.assay)?.label ?? c.assay}, ${defs.get(`${c.assay}.${c.metric}`)?.label ?? c.metric}`))),
        ...myUnits.flatMap((u) => u.flags.map((f) => flagView(f, `${results.assays.find((a) => a.id === u.assay)?.label ?? u.assay}, preparation ${u.unit}`))),
      ];
      const flagCodes = [...new Map(flags.map((f) => [f.code, { code: f.code, label: f.label, explanation: f.explanation, anchor: f.anchor }])).values()].sort((a, b) => (a.code < b.code ? -1 : 1));
      const myBatches = new Set(myUnits.map((u) => `${u.assay}|${u.batch}`));
      const exclusions = results.exclusions
        .filter((e) => e.variant === v.id || (e.unit !== undefined && myUnits.some((u) => u.unit === e.unit)) || (e.kind === 'batch' && e.batch !== undefined && [...myBatches].some((k) => k.endsWith(`|${e.batch}`) && (!e.assay || k.startsWith(`${e.assay}|`)))))
        .map((e) => exclusionView(e, { assay: (id) => results.assays.find((a) => a.id === id)?.label ?? id, variant: (id) => names.get(id) ?? id }));
      // Paired WT: the WT preparations of the batches this variant was measured in (its own rows for WT).
      const pairedWt = v.isWT ? [] : wtUnits.filter((u) => myBatches.has(`${u.assay}|${u.batch}`));
      const cal = results.calibration.find((c) => c.scope === v.evidence.scope);
      const forest = v.isWT ? null : await forestBlock(v, name);
      options.onVariant?.(++done, results.variants.length);
      const title = v.isWT ? `${v.gene} wild type` : `${name} (${v.gene} ${v.hgvs})`;
      const evidenceNote = v.isWT
        ? 'WT is the reference every variant is compared with.'
        : v.control
          ? `This ${v.control.class} control calibrates the assays; it is not scored as evidence for itself.`
          : 'The strongest level the calibration supports for this readout: a suggestion for the classifying laboratory.';
      const page: VariantPage = {
        path: PATHS.variant(slugs.get(v.id) as string),
        reportPath: PATHS.report(slugs.get(v.id) as string),
        root: '../',
        title,
        v,
        name,
        overall: functionCall(v.isWT ? 'reference' : v.overall.call),
        control: v.control ? `${v.control.class} control (${v.control.source})` : '',
        glance: { cells, rule, evidence: evidenceText(v), evidenceNote },
        notices: inputWarnings(v),
        assays,
        forest,
        flags,
        flagCodes,
        exclusions,
        sources: {
          variant: sourceRows(myUnits),
          wt: sourceRows(pairedWt),
          wtBatches: [...new Set(pairedWt.map((u) => u.batch))].sort().join(', '),
        },
        evidence: {
          level: v.evidence.level,
          scope: v.evidence.scope,
          sentence: v.evidence.sentence,
          calibration: cal ? fmtCalibration(cal) : null,
          controls: cal ? controlRows(results, cal.scope, slugs) : [],
        },
        print: {
          head: `${results.study.title} · ${title}`,
          foot: `${results.tool.name} ${results.tool.version} · built ${builtAt} · research data, not a clinical test`,
        },
        prev: link(results.variants[(position.get(v.id) as number) - 1]),
        next: link(results.variants[(position.get(v.id) as number) + 1]),
      };
      return page;
    });
}
