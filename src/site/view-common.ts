/** Shapes of the data handed to the templates, and small helpers shared by the page builders. */
import type { ChartDef, DataTable } from '../charts/chart-def.js';
import { FUNCTION_CALL_STYLE } from '../charts/palette.js';
import type { ChartSpec } from '../assays/types.js';
import { renderSvg, type RenderOptions } from '../charts/render.js';
import type { Calibration, Flag, FunctionCall, HyperDirection, MetricCall } from '../results/types.js';
import type { SourceRef } from '../study/types.js';
import { flagAnchor, flagWords } from '../analysis/flag-words.js';
import { PATHS, slug } from './paths.js';

export interface ChartBlock {
  /** HTML id of the figure. */
  id: string;
  title: string;
  description: string;
  svg: string;
  table: DataTable;
  /** Site-relative path of the chart's standalone SVG file, set when it is written (src/site/chart-files.ts). */
  file?: string;
}

/**
 * The biological reading of a mark, which decides its glyph and colour everywhere on the site:
 * 'hyper' and 'hypo' only for a call, or a metric change, that implies that direction of
 * contractility; 'neutral' for a metric change that implies none.
 */
export type Direction = 'hyper' | 'hypo' | 'neutral' | 'within' | 'mixed' | 'indeterminate' | 'none' | 'reference';

export interface CallView {
  /** The call in words, e.g. 'hypercontractile', 'decreased'. */
  call: string;
  glyph: string;
  /** CSS classes: 'mark mark-<direction>' (colour by direction). */
  cls: string;
  direction: Direction;
  /** What a metric call implies, e.g. 'towards hypercontractile' (empty for function calls). */
  implies: string;
}

const FUNCTION_DIRECTION: Record<FunctionCall, Direction> = {
  hypercontractile: 'hyper',
  hypocontractile: 'hypo',
  'within WT range': 'within',
  mixed: 'mixed',
  indeterminate: 'indeterminate',
  'not measured': 'none',
  reference: 'reference',
};

const view = (call: string, glyph: string, direction: Direction, implies = ''): CallView => ({ call, glyph, cls: `mark mark-${direction}`, direction, implies });

export function functionCall(call: FunctionCall): CallView {
  return view(call, FUNCTION_CALL_STYLE[call]?.glyph ?? '?', FUNCTION_DIRECTION[call] ?? 'none');
}

/** Glyphs of a metric change that implies no disease direction (hollow, pointing the way the value moved). */
const NEUTRAL_GLYPH = { increased: '△', decreased: '▽' } as const;

/**
 * A metric call marked by the direction it implies for contractility, never by the sign of the
 * change: with `hyper` 'up' an increase is towards hypercontractile, with 'down' a decrease is
 * (a decreased slow-phase fraction is ▲ hypercontractile), with 'none' a change implies no
 * direction and gets a neutral hollow △ or ▽.
 * @example metricCall('decreased', 'down') // → { call: 'decreased', glyph: '▲', direction: 'hyper', implies: 'towards hypercontractile', … }
 */
export function metricCall(call: MetricCall, hyper: HyperDirection): CallView {
  if (call === 'increased' || call === 'decreased') {
    if (hyper === 'none') return view(call, NEUTRAL_GLYPH[call], 'neutral', 'no disease direction');
    const towardsHyper = (call === 'increased') === (hyper === 'up');
    const as = towardsHyper ? 'hypercontractile' : 'hypocontractile';
    return view(call, FUNCTION_CALL_STYLE[as].glyph, towardsHyper ? 'hyper' : 'hypo', `towards ${as}`);
  }
  if (call === 'within WT range') return view(call, FUNCTION_CALL_STYLE['within WT range'].glyph, 'within');
  if (call === 'indeterminate') return view(call, FUNCTION_CALL_STYLE.indeterminate.glyph, 'indeterminate');
  return view(call, FUNCTION_CALL_STYLE['not measured'].glyph, 'none');
}

/**
 * The site's one legend: what each glyph and colour means, for calls and for metric changes.
 * Shown on the index, on every report and on the assay pages.
 */
export function siteLegend() {
  const calls = (['hypercontractile', 'hypocontractile', 'within WT range', 'mixed', 'indeterminate', 'not measured', 'reference'] as FunctionCall[]).map((c) => ({
    ...functionCall(c),
    text: c === 'reference' ? 'reference (WT itself)' : c,
  }));
  const metrics = [
    { ...metricCall('increased', 'up'), text: 'metric changed towards hypercontractile' },
    { ...metricCall('decreased', 'up'), text: 'metric changed towards hypocontractile' },
    { ...metricCall('increased', 'none'), text: 'metric higher than WT, no disease direction' },
    { ...metricCall('decreased', 'none'), text: 'metric lower than WT, no disease direction' },
  ];
  return { calls, metrics };
}

/** Renders one chart to SVG: renderSvg, or the build's render through the store (src/pipeline/stored-render.ts). */
export type RenderFn = (spec: ChartSpec, options: RenderOptions) => Promise<string>;

/** What a chart block shows besides its id and title. */
export type BlockContent = Pick<ChartBlock, 'svg' | 'description' | 'table'>;

/**
 * A chart block found by what it is drawn from (`inputs`: any JSON value), or made by `make` and
 * kept: the build's store (src/pipeline/stored-render.ts). Without one, every block is made.
 */
export type BlockFn = (inputs: unknown, make: () => Promise<BlockContent>) => Promise<BlockContent>;

/**
 * Render chart definitions to blocks, in order (deterministic).
 */
export async function renderBlocks(defs: Array<ChartDef | null>, render: RenderFn = renderSvg): Promise<ChartBlock[]> {
  const present = defs.filter((d): d is ChartDef => d !== null);
  return Promise.all(
    present.map(async (d) => ({ id: `chart-${slug(d.key)}`, title: d.title, description: d.description, svg: await render(d.spec, { key: d.key, title: d.title, description: d.description }), table: d.table })),
  );
}

/**
 * Map over items with at most `limit` calls in flight; results in input order.
 * Bounds memory: specs and SVGs of only `limit` items are alive at once.
 */
export async function mapLimit<T, R>(items: readonly T[], limit: number, fn: (item: T, index: number) => Promise<R>): Promise<R[]> {
  const out = new Array<R>(items.length);
  let next = 0;
  const lane = async () => {
    while (next < items.length) {
      const i = next++;
      // i < items.length (the loop's condition): an item of the list, even if T itself admits undefined.
      out[i] = await fn(items[i] as T, i);
    }
  };
  await Promise.all(Array.from({ length: Math.max(1, Math.min(limit, items.length)) }, lane));
  return out;
}

/** 'file.csv line 12' / 'manifest.json /variants/3' style location text. */
export function where(at: SourceRef | undefined): string {
  if (!at) return '';
  const parts = [at.file];
  if (at.line !== undefined) parts.push(`line ${at.line}`);
  if (at.column) parts.push(`column ${at.column}`);
  if (at.jsonPath) parts.push(at.jsonPath);
  return parts.join(', ');
}

export interface FlagView {
  severity: string;
  code: string;
  /** Plain words for the code (src/analysis/flag-words.ts); the code itself when this version does not know it. */
  label: string;
  /** What the code means, or '' when unknown. */
  explanation: string;
  /** What happened to this record, with its numbers (Flag.message). */
  message: string;
  where: string;
  context: string;
  /** Link to the code's entry on the glossary page, relative to the site root ('' when unknown). */
  href: string;
  /** Id of the code's entry (on the glossary page, and in a single-file report's own list). */
  anchor: string;
}

export function flagView(f: Flag, context: string): FlagView {
  const words = flagWords(f.code);
  return {
    severity: f.severity,
    code: f.code,
    label: words?.label ?? f.code,
    explanation: words?.explanation ?? '',
    message: f.message,
    where: where(f.at),
    context,
    href: words ? `${PATHS.glossary}#${flagAnchor(f.code)}` : '',
    anchor: flagAnchor(f.code),
  };
}

/** A flag code as a short link for tables: plain words, linked to the glossary. */
export interface FlagChip {
  code: string;
  label: string;
  href: string;
  anchor: string;
}

export function flagChip(code: string): FlagChip {
  const words = flagWords(code);
  return { code, label: words?.label ?? code, href: words ? `${PATHS.glossary}#${flagAnchor(code)}` : '', anchor: flagAnchor(code) };
}

/** One exclusion from the manifest as a page states it (results.json's exclusions, worded). */
export interface ExclusionView {
  /** What was excluded, e.g. 'Preparation E333V-p2 (Force–pCa)'. */
  what: string;
  reason: string;
}

/**
 * The words pages use for an exclusion's kind. results.json keeps the kind 'unit' (its schema is
 * stable); the study's column, and every page, calls it a preparation.
 */
const EXCLUSION_WORDS: Record<string, string> = { batch: 'Batch', unit: 'Preparation', preparation: 'Preparation', variant: 'Variant' };

/**
 * An exclusion worded for a page: the kind as the study names it (never 'unit'), the excluded
 * batch, preparation or variant, then (as asked) the variant it belongs to and the assay; names
 * of assays and variants come from `names` (ids when not given).
 * @example exclusionView({ kind: 'unit', assay: 'force', unit: 'E333V-p2', reason: 'Torn.' }, { assay: (id) => 'Force–pCa' }) // → { what: 'Preparation E333V-p2 (Force–pCa)', reason: 'Torn.' }
 */
export function exclusionView(
  e: { kind: string; assay?: string; batch?: string; unit?: string; variant?: string; reason: string },
  names: { assay?: (id: string) => string; variant?: (id: string) => string; ofVariant?: boolean },
): ExclusionView {
  const word = EXCLUSION_WORDS[e.kind] ?? (e.kind ? e.kind.charAt(0).toUpperCase() + e.kind.slice(1) : 'Data');
  const variantName = (id: string) => names.variant?.(id) ?? id;
  const id = e.kind === 'batch' ? e.batch : e.kind === 'variant' ? (e.variant !== undefined ? variantName(e.variant) : undefined) : (e.unit ?? e.batch);
  let what = id ? `${word} ${id}` : word;
  if (e.kind !== 'batch' && e.kind !== 'variant' && e.batch !== undefined && e.unit !== undefined) what += ` (batch ${e.batch})`;
  if (e.kind !== 'variant' && e.variant !== undefined && names.ofVariant) what += ` of ${variantName(e.variant)}`;
  if (e.assay !== undefined && names.assay) what += ` (${names.assay(e.assay)})`;
  return { what, reason: e.reason };
}

/**
 * Compress line numbers into ranges. Beyond `maxRuns` runs, the first ones and a count of the rest,
 * with the span they lie in (a report's table stays readable; every line is in results.json).
 * @example lineRanges([2, 3, 4, 9]) // → '2–4, 9'
 * @example lineRanges([1, 3, 5, 7], 2) // → '1, 3 and 2 more runs, all within lines 1–7'
 */
export function lineRanges(lines: number[], maxRuns = Infinity): string {
  const s = [...new Set(lines)].sort((a, b) => a - b);
  const runs: Array<[number, number]> = [];
  for (const n of s) {
    const run = runs[runs.length - 1];
    if (run && n === run[1] + 1) run[1] = n;
    else runs.push([n, n]);
  }
  const text = (run: [number, number]) => (run[0] === run[1] ? `${run[0]}` : `${run[0]}–${run[1]}`);
  const first = runs[0];
  const last = runs[runs.length - 1];
  if (runs.length <= maxRuns || !first || !last) return runs.map(text).join(', ');
  const more = runs.length - maxRuns;
  return `${runs.slice(0, maxRuns).map(text).join(', ')} and ${more} more run${more === 1 ? '' : 's'}, all within lines ${first[0]}–${last[1]}`;
}

/** Published OddsPath thresholds (Brnich et al. 2020, Genome Med 12:3, Table 3; strict inequalities). */
export const ODDSPATH_THRESHOLDS = [
  { level: 'PS3 very strong', rule: 'OddsPath > 350' },
  { level: 'PS3 strong', rule: 'OddsPath > 18.7' },
  { level: 'PS3 moderate', rule: 'OddsPath > 4.3' },
  { level: 'PS3 supporting', rule: 'OddsPath > 2.1' },
  { level: 'no evidence', rule: '0.48 ≤ OddsPath ≤ 2.1' },
  { level: 'BS3 supporting', rule: 'OddsPath < 0.48' },
  { level: 'BS3 moderate', rule: 'OddsPath < 0.23' },
  { level: 'BS3 strong', rule: 'OddsPath < 0.053' },
];

export interface CalibrationView {
  scope: string;
  c: Calibration['counts'];
  total: number;
  oddsPathAbnormal: string;
  oddsPathNormal: string;
  levelAbnormal: string;
  levelNormal: string;
  notes: string[];
}

/** Our own words for the caveats every report carries. */
export const STANDARD_CAVEATS = [
  'These are research measurements, not a clinical test, and they are not validated for diagnostic use.',
  'A functional assay result is one line of evidence about a variant; on its own it does not make a variant pathogenic or benign.',
  'Classifying a variant is the work of a qualified clinical laboratory applying its local rules; this report only suggests the strongest functional evidence level the calibration supports.',
];

/** The caveats in one line, for the first screen and page 1 of every report. */
export const RESEARCH_LINE =
  'Research data, not a clinical test: one line of functional evidence, not a classification, which belongs to a qualified clinical laboratory.';

/**
 * Phrases the standard caveats already say. A study caveat sentence made of these alone (and small
 * words) repeats a built-in caveat and is not shown twice; any other sentence is kept as written.
 */
const COVERED = [
  'research use only', 'research data', 'research measurements', 'research results', 'for research use', 'research only',
  'not a clinical test', 'not a diagnostic test', 'not for clinical use', 'not for diagnostic use', 'not validated for diagnostic use', 'not validated for clinical use',
  'functional evidence is one line of evidence', 'one line of evidence', 'classification belongs to qualified clinical laboratories',
  'classification belongs to a qualified clinical laboratory', 'classification is the work of a qualified clinical laboratory',
];
const SMALL_WORDS = new Set(['a', 'an', 'and', 'the', 'is', 'are', 'these', 'this', 'it', 'only', 'of', 'to', 'data', 'results']);

function normalise(text: string): string {
  return text.toLowerCase().replace(/[’']/g, '').replace(/[^a-z0-9]+/g, ' ').trim();
}

/** Whether a sentence only repeats the standard caveats. Example: 'Research data, not a clinical test.' → true. */
export function repeatsStandardCaveat(sentence: string): boolean {
  let rest = ` ${normalise(sentence)} `;
  for (const phrase of [...COVERED].sort((a, b) => b.length - a.length)) rest = rest.split(` ${normalise(phrase)} `).join(' ');
  return rest.split(' ').filter((w) => w && !SMALL_WORDS.has(w)).length === 0;
}

/**
 * The study's own caveats with the sentences that only repeat a standard caveat taken out (a
 * caveat left empty is dropped), in their order; exact repeats among them are shown once.
 * @example studyCaveats(['Research data, not a clinical test.', 'Cells of passage 20 or less.']) // → ['Cells of passage 20 or less.']
 */
export function studyCaveats(caveats: readonly string[]): string[] {
  const out: string[] = [];
  for (const c of caveats) {
    const sentences = c.split(/(?<=[.!?;])\s+/).filter((x) => x.trim() !== '');
    const kept = sentences.filter((x) => !repeatsStandardCaveat(x));
    const text = kept.join(' ').trim().replace(/;$/, '.');
    if (text && !out.includes(text)) out.push(text);
  }
  return out;
}
