/** Shapes of the data handed to the templates, and small helpers shared by the page builders. */
import type { ChartDef, DataTable } from '../charts/chart-def.js';
import { FUNCTION_CALL_STYLE, METRIC_CALL_STYLE } from '../charts/palette.js';
import type { ChartSpec } from '../assays/types.js';
import { renderSvg, type RenderOptions } from '../charts/render.js';
import type { Calibration, Flag, FunctionCall, MetricCall } from '../results/types.js';
import type { SourceRef } from '../study/types.js';
import { slug } from './paths.js';

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

export interface CallView {
  call: string;
  glyph: string;
  /** CSS class, e.g. 'call-hypercontractile'. */
  cls: string;
}

export function functionCall(call: FunctionCall): CallView {
  return { call, glyph: FUNCTION_CALL_STYLE[call]?.glyph ?? '?', cls: `call-${slug(call)}` };
}

export function metricCall(call: MetricCall): CallView {
  return { call, glyph: METRIC_CALL_STYLE[call]?.glyph ?? '?', cls: `call-${slug(call)}` };
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
  const svgs = await Promise.all(present.map((d) => render(d.spec, { key: d.key, title: d.title, description: d.description })));
  return present.map((d, i) => ({ id: `chart-${slug(d.key)}`, title: d.title, description: d.description, svg: svgs[i], table: d.table }));
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
      out[i] = await fn(items[i], i);
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
  message: string;
  where: string;
  context: string;
}

export function flagView(f: Flag, context: string): FlagView {
  return { severity: f.severity, code: f.code, message: f.message, where: where(f.at), context };
}

/**
 * Compress sorted line numbers into ranges. Example: lineRanges([2, 3, 4, 9]) → '2–4, 9'.
 */
export function lineRanges(lines: number[]): string {
  const s = [...new Set(lines)].sort((a, b) => a - b);
  const parts: string[] = [];
  for (let i = 0; i < s.length; ) {
    let j = i;
    while (j + 1 < s.length && s[j + 1] === s[j] + 1) j++;
    parts.push(i === j ? `${s[i]}` : `${s[i]}–${s[j]}`);
    i = j + 1;
  }
  return parts.join(', ');
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
