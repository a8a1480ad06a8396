/**
 * Residue map of one gene: the lab's declared domains as bars along the sequence, and every
 * variant with a residue as a mark above them, coloured and shaped by its overall call and
 * placed in a lane per call so the call can also be read from the lane label.
 */
import type { StudyResults } from '../results/types.js';
import { type ChartDef, variantNames } from './chart-def.js';
import { FUNCTION_CALL_STYLE, callScale } from './palette.js';

/** Colours of domain bars, alternating so neighbouring domains stay apart. */
const DOMAIN_FILLS = ['#c9d6e3', '#e3d5c1'];

/** Residue map of one gene, or null when no variant of the gene has a residue and no domain is declared. */
export function residueMapChart(results: StudyResults, gene: string): ChartDef | null {
  const names = variantNames(results);
  const g = results.study.genes.find((x) => x.symbol === gene);
  const variants = results.variants.filter((v) => v.gene === gene && !v.isWT && typeof v.residue === 'number');
  const domains = (g?.domains ?? []).slice().sort((a, b) => a.start - b.start);
  if (variants.length === 0 && domains.length === 0) return null;
  const maxResidue = Math.max(g?.length ?? 0, ...variants.map((v) => v.residue as number), ...domains.map((d) => d.end), 1);
  const points = variants
    .map((v) => ({ residue: v.residue as number, name: names.get(v.id) ?? v.short, call: v.overall.call, domain: v.domain ?? '' }))
    .sort((a, b) => a.residue - b.residue || (a.name < b.name ? -1 : 1));
  const bars = domains.map((d) => ({ name: d.name, start: d.start, end: d.end, mid: (d.start + d.end) / 2 }));
  const calls = [...new Set(points.map((p) => p.call))];
  const lanes = (Object.keys(FUNCTION_CALL_STYLE) as string[]).filter((c) => calls.includes(c as never));
  const x = { type: 'quantitative', scale: { domain: [1, maxResidue], nice: false, zero: false }, title: `Residue (${gene})` };
  const width = 640;
  const title = `Residue map of ${gene}: variants by overall call`;
  const variantLayer = {
    width,
    height: Math.max(50, lanes.length * 34),
    data: { values: points },
    layer: [
      {
        mark: { type: 'point', filled: true, size: 110, opacity: 1, stroke: '#ffffff', strokeWidth: 0.8 },
        encoding: {
          x: { field: 'residue', ...x, axis: { title: null, labels: false, ticks: false } },
          y: { field: 'call', type: 'nominal', sort: lanes, title: null },
          color: { field: 'call', type: 'nominal', title: 'Overall call', scale: callScale(FUNCTION_CALL_STYLE, calls as never, 'colour') },
          shape: { field: 'call', type: 'nominal', title: 'Overall call', scale: callScale(FUNCTION_CALL_STYLE, calls as never, 'shape') },
        },
      },
      ...(points.length <= 40
        ? [
            {
              mark: { type: 'text', dy: -11, fontSize: 10, color: '#222222' },
              encoding: {
                x: { field: 'residue', ...x },
                y: { field: 'call', type: 'nominal', sort: lanes },
                text: { field: 'name', type: 'nominal' },
              },
            },
          ]
        : []),
    ],
  };
  const barLayer = (fill: string, values: typeof bars) => ({
    data: { values },
    mark: { type: 'rect', height: 22, stroke: '#5a6570', strokeWidth: 0.6, color: fill },
    encoding: { x: { field: 'start', ...x }, x2: { field: 'end' } },
  });
  const domainLayer = {
    width,
    height: 44,
    layer: [
      barLayer(DOMAIN_FILLS[0], bars.filter((_b, i) => i % 2 === 0)),
      barLayer(DOMAIN_FILLS[1], bars.filter((_b, i) => i % 2 === 1)),
      {
        data: { values: bars },
        mark: { type: 'text', fontSize: 10, color: '#1b2530', limit: 120 },
        encoding: { x: { field: 'mid', ...x }, text: { field: 'name', type: 'nominal' } },
      },
    ],
  };
  const spec = {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title,
    vconcat: [variantLayer, domainLayer],
    spacing: 4,
    resolve: { scale: { x: 'shared' } },
  };
  const description =
    `Map of ${gene} residues 1–${maxResidue}` +
    (domains.length ? ` with lab-declared domains ${domains.map((d) => `${d.name} (${d.start}–${d.end})`).join(', ')}` : ' (no domains declared)') +
    `. ${points.length} variants with a residue: ` +
    (points.map((p) => `${p.name} at ${p.residue}, ${p.call}`).join('; ') || 'none') +
    '.';
  const table = {
    columns: ['Variant', 'Residue', 'Domain', 'Overall call'],
    rows: points.map((p) => [p.name, String(p.residue), p.domain || '—', p.call]),
  };
  return { key: `residues:${gene}`, title, description, spec, table };
}
