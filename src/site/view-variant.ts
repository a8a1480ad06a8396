/** Data for the index table and the per-variant reports. */
import { type ChartsFor, drawnSpec, specTable } from '../charts/assay-charts.js';
import { fmt, fmtCi, fmtP, variantNames } from '../charts/chart-def.js';
import { forestChart, forestTable } from '../charts/forest.js';
import type { StudyResults, VariantResult } from '../results/types.js';
import { type CalibrationView, type CallView, type ChartBlock, type BlockFn, type FlagView, type RenderFn, flagView, functionCall, lineRanges, mapLimit, metricCall, renderBlocks } from './view-common.js';
import { fmtCalibration } from './view-study.js';
import { PATHS, slug } from './paths.js';
import { groupBy } from '../assays/assay-common.js';

export interface IndexRow {
  id: string;
  name: string;
  href: string;
  gene: string;
  hgvs: string;
  residue: string;
  domain: string;
  isWT: boolean;
  control: string;
  assayCalls: Array<CallView & { assay: string }>;
  overall: CallView;
  evidence: string;
  flags: string[];
  /** Lower-case text the search box matches. */
  search: string;
}

export interface MetricRow {
  metric: string;
  unit: string;
  scale: string;
  effect: string;
  ci: string;
  q: string;
  n: string;
  batches: string;
  call: CallView;
  flags: string;
}

export interface VariantPage {
  path: string;
  root: string;
  /** Page title (HTML <title>). */
  title: string;
  v: VariantResult;
  name: string;
  overall: CallView;
  control: string;
  assays: Array<{ id: string; label: string; href: string; call: CallView; sentence: string; metrics: MetricRow[]; charts: ChartBlock[]; units: Array<{ unit: string; batch: string; values: string; n: number; excluded: string; flags: string }> }>;
  forest: ChartBlock | null;
  flags: FlagView[];
  exclusions: StudyResults['exclusions'];
  sources: Array<{ file: string; lines: string }>;
  evidence: { level: string; scope: string; sentence: string; calibration: CalibrationView | null };
  prev: { name: string; href: string } | null;
  next: { name: string; href: string } | null;
}

/** Comparisons and units of each variant, in results order (one pass instead of a scan per variant). */
function byVariant(results: StudyResults) {
  const comps = groupBy(results.comparisons, (c) => c.variant);
  const units = groupBy(results.units, (u) => u.variant);
  return { comps: (id: string) => comps.get(id) ?? [], units: (id: string) => units.get(id) ?? [] };
}

export function indexRows(results: StudyResults, slugs: Map<string, string>): IndexRow[] {
  const names = variantNames(results);
  const idx = byVariant(results);
  return results.variants.map((v) => {
    const flags = [...new Set(variantFlagCodes(v, idx.comps(v.id), idx.units(v.id)))].sort();
    const assayCalls = results.assays.map((a) => {
      const c = v.assayCalls.find((x) => x.assay === a.id);
      return { assay: a.id, ...functionCall(c?.call ?? 'not measured') };
    });
    const control = v.control ? `${v.control.class} control` : '';
    const name = names.get(v.id) ?? v.short;
    return {
      id: v.id,
      name,
      href: PATHS.variant(slugs.get(v.id) as string),
      gene: v.gene,
      hgvs: v.hgvs,
      residue: v.residue === undefined ? '' : String(v.residue),
      domain: v.domain ?? '',
      isWT: v.isWT,
      control: v.isWT ? 'reference' : control,
      assayCalls,
      overall: functionCall(v.overall.call),
      evidence: v.control ? 'n/a (calibration control)' : v.evidence.level,
      flags,
      search: [name, v.gene, v.hgvs, v.short, v.label, v.domain ?? '', control, v.note ?? ''].join(' ').toLowerCase(),
    };
  });
}

function variantFlagCodes(v: VariantResult, comps: StudyResults['comparisons'], units: StudyResults['units']): string[] {
  return [...v.flags.map((f) => f.code), ...comps.flatMap((c) => c.flags.map((f) => f.code)), ...units.flatMap((u) => u.flags.map((f) => f.code))];
}

const unitsLabel = (results: StudyResults, assay: string, metric: string) =>
  results.assays.find((a) => a.id === assay)?.metrics.find((m) => m.id === metric);

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
}

/**
 * A builder of variant pages for any subset of the study's variants (e.g. batches of 100, so
 * that only one batch's SVGs are in memory at a time). Indexes are built once; prev/next links
 * follow results.variants whatever the subset; `onVariant` counts across all calls.
 */
export function variantPageBuilder(results: StudyResults, slugs: Map<string, string>, chartsFor?: ChartsFor, options: VariantPagesOptions = {}): (subset: readonly VariantResult[]) => Promise<VariantPage[]> {
  const names = variantNames(results);
  const assaySlugs = new Map(results.assays.map((a) => [a.id, a.id]));
  const idx = byVariant(results);
  const render = options.render;
  const position = new Map(results.variants.map((v, i) => [v.id, i]));
  const link = (q: VariantResult | undefined) => (q ? { name: names.get(q.id) ?? q.short, href: PATHS.variant(slugs.get(q.id) as string) } : null);
  let done = 0;
  /** The variant's forest plot, with its table of effects and q values. */
  const forestBlock = async (v: VariantResult, name: string): Promise<ChartBlock | null> => {
    const b = (await renderBlocks([forestChart(results, v, name)], render))[0];
    return b ? { ...b, table: forestTable(results, v) } : null;
  };
  return (subset) => mapLimit(subset, options.concurrency ?? 8, async (v): Promise<VariantPage> => {
    const name = names.get(v.id) ?? v.short;
    const extra = chartsFor ? await chartsFor(v.id) : [];
    const myComps = idx.comps(v.id);
    const myUnits = idx.units(v.id);
    const assays = [];
    for (const a of results.assays) {
      const comps = myComps.filter((c) => c.assay === a.id);
      const units = myUnits.filter((u) => u.assay === a.id);
      const call = v.assayCalls.find((c) => c.assay === a.id);
      if (comps.length === 0 && units.length === 0 && !call) continue;
      const charts = await Promise.all(
        extra
          .filter((c) => c.assay === a.id)
          .map(async (c, i): Promise<ChartBlock> => {
            const key = `assay:${v.id}:${a.id}:${i}`;
            const make = async () => {
              const description = c.description ?? `${c.title}. The variant's data and fitted curves beside the WT of the same batches; the values are in the table below.`;
              const [b] = await renderBlocks([{ key, title: c.title, description, spec: drawnSpec(c.spec), table: specTable(c.spec) }], options.block ? (options.blockRender ?? render) : render);
              return { svg: b!.svg, description: b!.description, table: b!.table };
            };
            const content = options.block ? await options.block(['assay-chart', a.id, key, c.title, c.inputs], make) : await make();
            return { id: `chart-${slug(key)}`, title: c.title, ...content };
          }),
      );
      assays.push({
        id: a.id,
        label: a.label,
        href: PATHS.assay(assaySlugs.get(a.id) as string),
        call: functionCall(call?.call ?? 'not measured'),
        sentence: call?.sentence ?? '',
        metrics: comps.map((c) => {
          const def = unitsLabel(results, c.assay, c.metric);
          return {
            metric: def?.label ?? c.metric,
            unit: def?.unit ?? '',
            scale: c.scale === 'ratio' ? 'ratio to WT' : 'difference from WT',
            effect: fmt(c.effect),
            ci: fmtCi(c.ciLow, c.ciHigh),
            q: fmtP(c.q),
            n: `${c.nVariantUnits} / ${c.nWtUnits}`,
            batches: c.batches.join(', '),
            call: metricCall(c.call),
            flags: c.flags.map((f) => f.code).join(', '),
          };
        }),
        charts,
        units: units.map((u) => ({
          unit: u.unit,
          batch: u.batch,
          values: Object.entries(u.metrics).map(([k, x]) => `${unitsLabel(results, a.id, k)?.label ?? k} ${fmt(x)}`).join('; '),
          n: u.nTechnical,
          excluded: u.excluded ?? '',
          flags: u.flags.map((f) => f.code).join(', '),
        })),
      });
    }
    const flags: FlagView[] = [
      ...v.flags.map((f) => flagView(f, 'variant')),
      ...myComps.flatMap((c) => c.flags.map((f) => flagView(f, `${c.assay} ${c.metric}`))),
      ...myUnits.flatMap((u) => u.flags.map((f) => flagView(f, `${u.assay} unit ${u.unit}`))),
    ];
    const myBatches = new Set(myUnits.map((u) => `${u.assay}|${u.batch}`));
    const exclusions = results.exclusions.filter(
      (e) => e.variant === v.id || (e.unit !== undefined && myUnits.some((u) => u.unit === e.unit)) || (e.kind === 'batch' && e.batch !== undefined && [...myBatches].some((k) => k.endsWith(`|${e.batch}`) && (!e.assay || k.startsWith(`${e.assay}|`)))),
    );
    const lines = new Map<string, number[]>();
    for (const u of myUnits) for (const s of u.source) {
      const list = lines.get(s.file) ?? [];
      if (s.line !== undefined) list.push(s.line);
      lines.set(s.file, list);
    }
    const cal = results.calibration.find((c) => c.scope === v.evidence.scope);
    const forest = await forestBlock(v, name);
    options.onVariant?.(++done, results.variants.length);
    const page: VariantPage = {
      path: PATHS.variant(slugs.get(v.id) as string),
      root: '../',
      title: v.isWT ? `${v.gene} wild type` : `${name} (${v.gene} ${v.hgvs})`,
      v,
      name,
      overall: functionCall(v.overall.call),
      control: v.control ? `${v.control.class} control (${v.control.source})` : '',
      assays,
      forest,
      flags,
      exclusions,
      sources: [...lines.keys()].sort().map((file) => ({ file, lines: lineRanges(lines.get(file) as number[]) || 'whole file' })),
      evidence: { level: v.evidence.level, scope: v.evidence.scope, sentence: v.evidence.sentence, calibration: cal ? fmtCalibration(cal) : null },
      prev: link(results.variants[(position.get(v.id) as number) - 1]),
      next: link(results.variants[(position.get(v.id) as number) + 1]),
    };
    return page;
  });
}
