/**
 * Text on the charts, measured from the drawn SVG: no two labels overlap, no variant label covers
 * a mark, no text is cut short with '…', and Levey–Jennings markers do not overlap. Checked on
 * every chart of the demo study (study pages and variant reports) and on crowded invented studies.
 * Boxes come from tests/site/svg-boxes.ts (the chart font's advance widths, vega's anchors).
 */
import { describe, expect, it } from 'vitest';
import { type AssayChart, chartsFromModules, drawnSpec } from '../../src/charts/assay-charts.js';
import type { ChartDef } from '../../src/charts/chart-def.js';
import { effectsChart } from '../../src/charts/effects.js';
import { forestChart } from '../../src/charts/forest.js';
import { leveyJenningsChart } from '../../src/charts/levey-jennings.js';
import { placeLabels } from '../../src/charts/labels.js';
import { drawRaw } from '../../src/charts/render.js';
import { residueMapChart } from '../../src/charts/residue-map.js';
import { SCATTER_LABEL_ALL_MAX, scatterCharts } from '../../src/charts/scatter.js';
import { ASSAYS } from '../../src/assays/registry.js';
import type { ChartSpec } from '../../src/assays/types.js';
import { loadAndAnalyse } from '../../src/pipeline/build-study.js';
import type { FunctionCall, StudyResults } from '../../src/results/types.js';
import { makeFixture } from '../fixtures/results-fixture.js';
import { overlap, overlappingPairs, svgBoxes } from './svg-boxes.js';

/** Every problem with the text of one drawn chart. */
async function textProblems(name: string, spec: ChartSpec): Promise<string[]> {
  const { texts, symbols } = svgBoxes(await drawRaw(spec));
  const problems = overlappingPairs(texts, (t) => `"${t.text}" (${t.role})`).map((p) => `${name}: text overlaps text: ${p}`);
  for (const t of texts) if (t.text.includes('…')) problems.push(`${name}: text cut short: "${t.text}"`);
  // Labels drawn as marks (variant names, notes) never cover a data mark.
  for (const t of texts.filter((x) => x.role === 'mark')) {
    for (const s of symbols.filter((x) => x.role === 'mark')) if (overlap(t, s) > 0.5) problems.push(`${name}: label "${t.text}" covers a mark at ${Math.round(s.x0)},${Math.round(s.y0)}`);
  }
  return problems;
}

/** Every chart of a study's pages and reports, as [name, spec]. */
function allCharts(results: StudyResults): Array<[string, ChartSpec]> {
  const defs: Array<ChartDef | null> = [
    ...results.assays.flatMap((a) => a.metrics.map((m) => effectsChart(results, a.id, m.id))),
    ...results.controlCharts.map((c) => leveyJenningsChart(results, c)),
    ...results.study.genes.map((g) => residueMapChart(results, g.symbol)),
    ...scatterCharts(results),
    ...results.variants.map((v) => forestChart(results, v, v.short)),
  ];
  const out: Array<[string, ChartSpec]> = defs.filter((d): d is ChartDef => d !== null).map((d) => [d.key, d.spec]);
  const charts = chartsFromModules(results, ASSAYS);
  for (const v of results.variants) for (const c of charts(v.id) as AssayChart[]) out.push([`${c.assay}:${v.short}`, drawnSpec(c.spec)]);
  return out;
}

describe('the box check itself (it can fail)', () => {
  it('finds two labels drawn over each other, and a label over a mark', async () => {
    const spec = {
      width: 200,
      height: 100,
      layer: [
        { data: { values: [{ x: 10, y: 50 }] }, mark: { type: 'point', filled: true, size: 100 }, encoding: { x: { field: 'x', type: 'quantitative', scale: null }, y: { field: 'y', type: 'quantitative', scale: null } } },
        {
          data: { values: [{ x: 5, y: 50, t: 'A318T' }, { x: 20, y: 52, t: 'C262M' }, { x: 150, y: 20, t: 'E91K' }] },
          mark: { type: 'text', align: 'left', baseline: 'middle', fontSize: 11 },
          encoding: { x: { field: 'x', type: 'quantitative', scale: null }, y: { field: 'y', type: 'quantitative', scale: null }, text: { field: 't', type: 'nominal' } },
        },
      ],
    };
    const problems = await textProblems('probe', spec);
    expect(problems.some((p) => p.includes('"A318T" (mark) × "C262M" (mark)'))).toBe(true);
    expect(problems.some((p) => p.includes('label "A318T" covers a mark'))).toBe(true);
    expect(problems.some((p) => p.includes('E91K'))).toBe(false);
  });

  it('places labels that do not overlap, with leaders when crowded, and reports those with no room', () => {
    // 12 marks crowded within 6 px of one spot: a few labels go beside their marks, the rest further out with a leader.
    const crowd = Array.from({ length: 12 }, (_, i) => ({ id: `v${i}`, text: `V${i}00K`, x: 100 + 6 * Math.cos(i), y: 60 + 6 * Math.sin(i), r: 5 }));
    const { placed, unplaced } = placeLabels(crowd, { width: 200, height: 120, fontSize: 11 });
    expect(placed[0]?.leader).toBeUndefined();
    expect(placed.length).toBeGreaterThan(0);
    // Beside the mark there is room for a few; the rest hang further out on leader lines.
    expect(placed.filter((p) => p.leader === undefined).length).toBeLessThanOrEqual(8);
    expect(placed.filter((p) => p.leader !== undefined).length).toBeGreaterThan(0);
    expect(overlappingPairs(placed.map((p) => p.box), (b) => JSON.stringify(b), 0)).toEqual([]);
    expect(placed.length + unplaced.length).toBe(12);
    // A plot too small for any label: none placed, all reported.
    expect(placeLabels(crowd, { width: 30, height: 12, fontSize: 11 }).unplaced).toHaveLength(12);
  });
});

describe('text on every chart of the demo study', () => {
  it('has no overlapping or cut text and no label over a mark', async () => {
    const { results } = loadAndAnalyse('data-demo', {});
    expect(results).toBeDefined();
    const charts = allCharts(results!);
    expect(charts.length).toBeGreaterThan(100);
    const problems: string[] = [];
    for (const [name, spec] of charts) problems.push(...(await textProblems(name, spec)));
    expect(problems).toEqual([]);
  }, 120_000);
});

/** A fixture study with `n` invented variants whose kcat and velocity effects crowd round 1, at neighbouring residues. */
function crowded(n: number, calls: FunctionCall[] = ['hypercontractile', 'within WT range', 'indeterminate']): StudyResults {
  const r = makeFixture();
  const template = r.variants.find((v) => !v.isWT)!;
  const variants = Array.from({ length: n }, (_, i) => ({ ...template, id: `v${i}`, short: `X${100 + i}Y`, residue: 300 + 3 * i, overall: { ...template.overall, call: calls[i % calls.length]! }, control: undefined }));
  const base = (assay: string, metric: string) => r.comparisons.find((c) => c.assay === assay && c.metric === metric)!;
  let seed = 7;
  const next = () => ((seed = (seed * 16807) % 2147483647) / 2147483647);
  const comparisons = variants.flatMap((v) =>
    (['kcat', 'velocity'] as const).map((metric) => {
      const e = 1 + (next() - 0.5) * 0.12;
      return { ...base(metric === 'kcat' ? 'atpase' : 'motility', metric), variant: v.id, effect: e, ciLow: e * 0.95, ciHigh: e * 1.05 };
    }),
  );
  return { ...r, variants: [...r.variants.filter((v) => v.isWT), ...variants], comparisons };
}

describe('text on crowded charts', () => {
  for (const n of [12, 40, SCATTER_LABEL_ALL_MAX + 20]) {
    it(`${n} variants crowded on the scatter and the residue map: no overlap, and every unlabelled variant named`, async () => {
      const r = crowded(n);
      const defs = [...scatterCharts(r).filter((d) => d.key === 'scatter:atpase.kcat:motility.velocity'), residueMapChart(r, r.study.genes[0]!.symbol)!];
      expect(defs).toHaveLength(2);
      for (const d of defs) {
        expect(await textProblems(d.key, d.spec)).toEqual([]);
        const { texts } = svgBoxes(await drawRaw(d.spec));
        const labelled = new Set(texts.filter((t) => t.role === 'mark').map((t) => t.text));
        const missing = d.table.rows.map(([name = '']) => name).filter((name) => !labelled.has(name));
        // Whoever has no label on the chart is named in the table's note (and every variant is in the table).
        for (const name of missing) expect(d.table.note ?? '', `${d.key} ${name}`).toContain(name);
        if (n <= 12) expect(missing, d.key).toEqual([]);
      }
    }, 60_000);
  }
});

describe('Levey–Jennings markers', () => {
  it('sit side by side in run order without overlapping, however many runs', async () => {
    const r = makeFixture();
    const cc = r.controlCharts[0]!;
    for (const n of [9, 60, 200]) {
      const points = Array.from({ length: n }, (_, i) => ({ ...cc.points[i % cc.points.length]!, batch: `B${Math.floor(i / 3) + 1}` }));
      const def = leveyJenningsChart(r, { ...cc, points })!;
      const { symbols } = svgBoxes(await drawRaw(def.spec));
      const marks = symbols.filter((s) => s.role === 'mark');
      expect(marks).toHaveLength(n);
      // In run order: each marker right of the one before.
      const centres = marks.map((s) => s.x0 + s.x1);
      expect(centres).toEqual([...centres].sort((a, b) => a - b));
      expect(new Set(centres).size).toBe(centres.length);
      expect(overlappingPairs(marks, (s) => `${Math.round(s.x0)},${Math.round(s.y0)}`, 0.2)).toEqual([]);
    }
  }, 60_000);
});
