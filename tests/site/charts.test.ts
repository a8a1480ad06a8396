import { describe, expect, it } from 'vitest';
import type { StudyResults } from '../../src/results/types.js';
import { effectScale, fmt, fmtP } from '../../src/charts/chart-def.js';
import { fmtP as formatP } from '../../src/results/format.js';
import { EFFECTS_LABELLED_MAX, effectsChart } from '../../src/charts/effects.js';
import { forestChart, forestPanels } from '../../src/charts/forest.js';
import { leveyJenningsChart } from '../../src/charts/levey-jennings.js';
import { chartKey, drawRaw, drawRawDirect, renderSvg, renumberIds, roundDecimal, roundSvgGeometry, splitSpec, stripRedundant } from '../../src/charts/render.js';
import { drawnSpec, specTable } from '../../src/charts/assay-charts.js';
import { motilityChart, motilityPlotPoints } from '../../src/assays/motility/module.js';
import { atpase } from '../../src/assays/atpase/module.js';
import { brokenPaths } from '../../src/assays/chart-common.js';
import { residueMapChart } from '../../src/charts/residue-map.js';
import { scatterCharts } from '../../src/charts/scatter.js';
import { lineRanges } from '../../src/site/view-common.js';
import { relLink, rootPrefix, slug, uniqueSlugs } from '../../src/site/paths.js';
import { XSS, makeFixture } from '../fixtures/results-fixture.js';
import { turnoverChart } from '../../src/assays/turnover/module.js';
import { FUNCTION_CALL_STYLE, METRIC_CALL_STYLE, METRIC_MARK_STYLE, metricMark } from '../../src/charts/palette.js';
import { chartTitle } from '../../src/charts/chart-def.js';
import { textWidth } from '../../src/charts/text-width.js';

const simple = { data: { values: [{ a: 1, b: 2 }, { a: 2, b: 3 }] }, mark: 'point', encoding: { x: { field: 'a', type: 'quantitative' }, y: { field: 'b', type: 'quantitative' } } };

describe('renderSvg', () => {
  it('gives the same bytes for the same key, whatever vega rendered before', async () => {
    const first = await renderSvg(simple, { key: 'k', title: 'T', description: 'D' });
    await renderSvg(simple, { key: 'other' }); // advances vega's global clip counter
    expect(await renderSvg(simple, { key: 'k', title: 'T', description: 'D' })).toBe(first);
  });

  it('prefixes ids per key so charts never collide, and rewrites references', async () => {
    const a = await renderSvg({ ...simple, mark: { type: 'point', clip: true } }, { key: 'a' });
    const b = await renderSvg({ ...simple, mark: { type: 'point', clip: true } }, { key: 'b' });
    const ids = (s: string) => [...s.matchAll(/\sid="([^"]+)"/g)].map((m) => m[1]);
    expect(ids(a).length).toBeGreaterThan(2);
    expect(ids(a).filter((id) => ids(b).includes(id))).toEqual([]);
    for (const m of a.matchAll(/url\(#([^)]+)\)/g)) expect(ids(a)).toContain(m[1]);
  });

  it('adds role, title and description, escaped', async () => {
    const svg = await renderSvg(simple, { key: 'x', title: `T ${XSS}`, description: 'two points' });
    expect(svg).toMatch(/^<svg[^>]* role="img" aria-labelledby="c[0-9a-f]+-title c[0-9a-f]+-desc"/);
    expect(svg).toContain('<desc id=');
    expect(svg).not.toContain('<script');
    expect(svg).toContain('DejaVu Sans');
  });

  it('renumbers ids in order of appearance', () => {
    const raw = '<svg><clipPath id="clip7"/><g clip-path="url(#clip7)"/><clipPath id="clip3"/><use href="#clip3"/></svg>';
    expect(renumberIds(raw, 'p')).toBe('<svg><clipPath id="p-1"/><g clip-path="url(#p-1)"/><clipPath id="p-2"/><use href="#p-2"/></svg>');
  });

  it('keys equal specs equally regardless of key order', () => {
    expect(chartKey({ a: 1, b: [1, { c: 2, d: 3 }] })).toBe(chartKey({ b: [1, { d: 3, c: 2 }], a: 1 }));
    expect(chartKey({ a: 1 })).not.toBe(chartKey({ a: 2 }));
  });
});

describe('chart shapes (compiled once, each chart a new View with its data)', () => {
  it('splits a spec into shape, datasets, title and parameter values', () => {
    expect(splitSpec({ title: 'A', description: 'D', params: [{ name: 'top', value: 3 }, { name: 'sel', select: 'point' }], layer: [{ data: { values: [{ x: 1 }] }, mark: 'point' }, { data: { values: [] }, mark: 'rule' }] })).toEqual({
      shape: { layer: [{ data: { name: 'myofolio_data_0' }, mark: 'point' }, { data: { name: 'myofolio_data_1' }, mark: 'rule' }], params: [{ name: 'top', value: null }, { name: 'sel', select: 'point' }] },
      datasets: [[{ x: 1 }], []],
      title: 'A',
      signals: [['top', 3]],
    });
  });

  // Vega numbers clip paths from a global counter: compare with ids renumbered the same way.
  const same = (svg: string) => renumberIds(svg, 'z');

  it('draws every chart of a shape exactly as compiling that chart on its own would, in any order', async () => {
    const r = makeFixture();
    const motility = (velocity: number, n: number) =>
      motilityChart({
        variantLabel: `V${n}`,
        variantUnits: [{ assay: 'motility', variant: 'v', unit: 'v-1', batch: 'B1', metrics: { velocity, fractionImmobile: 0.1 }, flags: [], nTechnical: n, plot: { points: Array.from({ length: n }, (_, i) => ({ velocity: (velocity * (i + 1)) / n, state: i === 0 ? 'immobile' : 'moving' })) }, source: [] }],
        wtUnits: [{ assay: 'motility', variant: 'wt', unit: 'wt-1', batch: 'B1', metrics: { velocity: 0.5, fractionImmobile: 0 }, flags: [], nTechnical: 5, plot: { points: [0.3, 0.4, 0.5, 0.6, 0.7].map((v) => ({ velocity: v, state: 'moving' })) }, source: [] }],
      } as never);
    const specs = [
      { ...simple, title: 'First' },
      { ...simple, title: '' },
      { ...simple, title: { text: ['Second', 'two lines'], subtitle: 'sub' }, data: { values: [{ a: 5, b: 1 }, { a: 9, b: 30 }] } },
      simple,
      ...r.variants.filter((v) => !v.isWT).map((v) => forestChart(r, v, v.short)?.spec).filter((s) => s !== undefined),
      drawnSpec(motility(0.4, 30)),
      drawnSpec(motility(1.3, 12)),
    ];
    // The two motility charts (different axis ranges, titles and data) share one shape.
    expect(splitSpec(specs.at(-1)!).shape).toEqual(splitSpec(specs.at(-2)!).shape);
    const direct = [];
    for (const spec of specs) direct.push(same(await drawRawDirect(spec)));
    for (const order of [specs.map((_, i) => i), specs.map((_, i) => specs.length - 1 - i)]) {
      for (const i of order) expect(same(await drawRaw(specs[i]!)), `chart ${i}`).toBe(direct[i]);
    }
  });
});

describe('assay unit charts (ATPase, force)', () => {
  it('break one path per group between preparations, in the given order', () => {
    const rows = [{ k: 'a', x: 1, y: 2 }, { k: 'a', x: 2, y: 3 }, { k: 'b', x: 1, y: 5 }];
    expect(brokenPaths(rows, 'k', 'x', 'y')).toEqual([
      { k: 'a', x: 1, y: 2, seq: 0 },
      { k: 'a', x: 2, y: 3, seq: 1 },
      { k: 'b', x: null, y: null, seq: 2 },
      { k: 'b', x: 1, y: 5, seq: 3 },
    ]);
    expect(brokenPaths([], 'k', 'x', 'y')).toEqual([]);
  });

  it('list each preparation and its metrics in the numbers table, and draw WT and variant curves apart', async () => {
    const unit = (variant: string, unitId: string, kcat: number) => ({
      assay: 'atpase', variant, unit: unitId, batch: 'B1', metrics: { kcat, km: 20.123, kcatOverKm: kcat / 20.123, basal: 0.0456 }, flags: [], nTechnical: 24, source: [],
      plot: { points: [{ actin: 10, rate: kcat / 3 }], curve: [0, 50, 100].map((actin) => ({ actin, rate: (kcat * actin) / (20 + actin) })) },
    });
    const spec = atpase.chart({ variantLabel: 'X9Y', variantUnits: [unit('v', 'v-1', 5.55555)], wtUnits: [unit('wt', 'wt-1', 4), unit('wt', 'wt-2', 4.2)] } as never);
    const table = specTable(spec);
    expect(table.columns.slice(0, 4)).toEqual(['Group', 'Preparation', 'Batch', 'Readings']);
    expect(table.rows).toEqual([
      ['WT', 'wt-1', 'B1', '24', '4.00', '20.1', '0.199', '0.0456'],
      ['WT', 'wt-2', 'B1', '24', '4.20', '20.1', '0.209', '0.0456'],
      ['X9Y', 'v-1', 'B1', '24', '5.56', '20.1', '0.276', '0.0456'],
    ]);
    // WT's 2 curves of 3 points in one path with a break between them, then the variant's curve in a layer of its own, drawn over WT's.
    const layers = spec.layer as Array<{ data: { values: Array<Record<string, unknown>> }; mark: { type: string; color?: string; strokeDash?: number[] } }>;
    const lines = layers.filter((l) => l.mark.type === 'line');
    expect(lines).toHaveLength(2);
    const [wtCurve, variantCurve] = lines as [(typeof lines)[number], (typeof lines)[number]];
    expect(wtCurve.data.values).toHaveLength(7);
    expect(wtCurve.data.values.filter((r) => r.rate === null).map((r) => r.seq)).toEqual([3]);
    expect(variantCurve.data.values).toHaveLength(3);
    expect(wtCurve.mark.strokeDash).toEqual([5, 3]);
    expect(variantCurve.mark.strokeDash).toEqual([1, 0]);
    expect(layers.indexOf(variantCurve)).toBeGreaterThan(layers.indexOf(wtCurve));
    expect(await renderSvg(drawnSpec(spec), { key: 'atpase-test' })).toMatch(/^<svg/);
  });
});

describe('effects chart at consortium scale', () => {
  it('labels each variant up to EFFECTS_LABELLED_MAX, ranks them beyond, and draws 10,000 without a sort list', async () => {
    const r = makeFixture();
    const base = r.comparisons.find((c) => c.assay === 'atpase' && c.metric === 'kcat')!;
    const withN = (n: number) => ({
      ...r,
      comparisons: [
        ...r.comparisons.filter((c) => !(c.assay === 'atpase' && c.metric === 'kcat')),
        ...Array.from({ length: n }, (_, i) => ({ ...base, variant: `v${i}`, effect: 0.5 + i / n, ciLow: 0.45 + i / n, ciHigh: 0.55 + i / n })),
      ],
    });
    const small = effectsChart(withN(EFFECTS_LABELLED_MAX), 'atpase', 'kcat')!;
    expect(JSON.stringify(small.spec)).toContain('"type":"nominal","sort":{"field":"rank","op":"min"}');
    const big = effectsChart(withN(10_000), 'atpase', 'kcat')!;
    const text = JSON.stringify(big.spec);
    expect(text).not.toMatch(/"sort":\[/);
    expect(big.spec.height).toBe(560);
    expect(big.table.rows).toHaveLength(10_000);
    expect(await renderSvg(big.spec, { key: big.key })).toMatch(/^<svg/);
  }, 60_000);
});

/** The fixture's G120S (its second variant, after WT). */
const g120s = (r: StudyResults) => r.variants.find((v) => v.id === 'synm1-g120s')!;

describe('study chart specs', () => {
  const r = makeFixture();
  const all = () => [
    forestChart(r, g120s(r), 'G120S'),
    effectsChart(r, 'atpase', 'kcat'),
    effectsChart(r, 'motility', 'fractionImmobile'),
    residueMapChart(r, 'SYNM1'),
    ...scatterCharts(r),
    ...r.controlCharts.map((c) => leveyJenningsChart(r, c)),
  ];

  it('all render, carry data as values (expressions only name constant parameters) and tables with one row per datum', async () => {
    for (const def of all()) {
      expect(def).not.toBeNull();
      const d = def!;
      // Data-dependent constants (axis ranges, ticks) are top-level { name, value } parameters,
      // referenced as { expr: name }: nothing is computed in the chart that the table does not show.
      const params = ((d.spec.params ?? []) as Array<{ name: string; value: unknown }>).map((p) => p.name);
      const text = JSON.stringify(d.spec, (k, v) => (k === 'params' ? undefined : v));
      const refs = [...text.matchAll(/"(?:expr|signal)":"([^"]*)"/g)].map((m) => m[1]);
      for (const ref of refs) expect(params).toContain(ref);
      expect(text).not.toMatch(/"(filter|calculate)"/);
      expect(d.table.rows.length).toBeGreaterThan(0);
      expect(d.table.rows.every((row) => row.length === d.table.columns.length)).toBe(true);
      expect(await renderSvg(d.spec, { key: d.key, title: d.title, description: d.description })).toMatch(/^<svg/);
    }
  });

  it('puts ratio metrics on a log axis and difference metrics on their own linear panel', () => {
    const spec = forestChart(r, g120s(r), 'G120S')!.spec as { vconcat: Array<{ layer: Array<{ encoding: { x: { scale: { type?: string } } } }> }> };
    expect(spec.vconcat.map((panel) => panel.layer[0]?.encoding.x.scale.type)).toEqual(['log', undefined]);
  });

  it('labels each row in full, the assay above the metric, however long the metric name', async () => {
    const long = makeFixture();
    // The fixture's assay definitions are shared between tests: changed here on a copy.
    long.assays = structuredClone(long.assays);
    long.assays[1]!.metrics[0]!.label = '95th percentile velocity of moving filaments in the slowest field';
    const d = forestChart(long, g120s(long), 'G120S')!;
    const svg = await renderSvg(d.spec, { key: d.key, title: d.title, description: d.description });
    // On one line this label (68 characters) was cut to about 44 by vega's text-width estimate.
    expect(svg).not.toContain('…');
    expect(svg).toContain('<tspan>In vitro motility</tspan><tspan x="0" dy="14">95th percentile velocity of moving filaments in the slowest field</tspan>');
    expect(svg).toContain('<tspan>Actin-activated ATPase</tspan><tspan x="0" dy="14">kcat</tspan>');
  });

  it('sorts the effects chart by effect', () => {
    const def = effectsChart(r, 'atpase', 'kcat')!;
    const effects = def.table.rows.map((row) => Number(row[1])).filter(Number.isFinite);
    expect(effects).toEqual([...effects].sort((a, b) => a - b));
    // Fixture values: L260P 0.55 is the lowest, G120S 1.52 the highest (invented).
    expect(def.table.rows[0]?.[0]).toBe('L260P');
  });

  it('marks Westgard violations by shape as well as colour', () => {
    const def = leveyJenningsChart(r, r.controlCharts[0]!)!;
    const text = JSON.stringify(def.spec);
    expect(text).toContain('"shape":{"field":"status"');
    expect(def.table.rows.find((row) => row[0] === 'B8')?.[4]).toBe('rejected');
    expect(def.table.rows.find((row) => row[0] === 'B4')?.[4]).toBe('warning (1-2s)');
  });

  it('shapes residue-map marks by call and lists every variant with a residue', () => {
    const def = residueMapChart(r, 'SYNM1')!;
    expect(JSON.stringify(def.spec)).toContain('"shape":{"field":"call"');
    expect(def.table.rows.map((row) => row[0])).toEqual(['G120S', 'L260P', 'E415K', 'R505W', 'V630I', 'D870N']);
  });
});

describe('formatting and paths (common practice, no source)', () => {
  it('formats numbers', () => {
    expect(fmt(1.23456)).toBe('1.23');
    expect(fmt(0.000123456)).toBe('1.23 × 10⁻⁴'); // the one formatter, src/results/format.ts
    expect(fmt(0.00123456)).toBe('0.00123');
    expect(fmt(null)).toBe('—');
    expect(fmtP(0.01234)).toBe('0.012');
    expect(fmtP(0.5)).toBe('0.50');
    expect(fmtP(1e-6)).toBe('< 0.001');
    expect(fmtP(null)).toBe('—');
    // The same text as the results' sentences give (results.json, results.csv).
    for (const q of [0.0005, 0.00099, 0.001, 0.0123, 0.5, 0.999]) expect(fmtP(q)).toBe(formatP(q));
  });

  it('chooses log-axis domains that hold every value and symmetric ratio ticks', () => {
    const { scale, axis } = effectScale([0.55, 1.76], true);
    expect(scale.domain).toEqual([0.509, 1.9]);
    expect(axis.values).toEqual([0.67, 0.8, 1, 1.25, 1.5]);
    const lin = effectScale([-0.08, 0.1], false);
    expect((lin.scale.domain as number[])[0]).toBeLessThan(-0.08);
    expect((lin.scale.domain as number[])[1]).toBeGreaterThan(0.1);
  });

  it('computes slugs and relative links', () => {
    expect(slug('SYNM1 p.Gly120Ser')).toBe('synm1-p-gly120ser');
    expect([...uniqueSlugs(['A b', 'a-b', 'a_b']).values()]).toEqual(['a-b', 'a-b-2', 'a-b-3']);
    expect(rootPrefix('variants/a.html')).toBe('../');
    expect(rootPrefix('index.html')).toBe('./');
    expect(relLink('variants/a.html', 'index.html')).toBe('../index.html');
    expect(lineRanges([9, 2, 3, 4, 4])).toBe('2–4, 9');
    expect(lineRanges([1, 3, 5, 7], 2)).toBe('1, 3 and 2 more runs, all within lines 1–7');
    expect(lineRanges([1, 2, 5], 2)).toBe('1–2, 5');
    expect(lineRanges([], 2)).toBe('');
  });
});

describe('lighter charts', () => {
  it('rounds SVG geometry to 0.1 and leaves text alone', () => {
    // Expected strings worked by hand from the rule (common practice, no source).
    expect(roundSvgGeometry('<path d="M12.3456,7.0001L-0.04,3"/>')).toBe('<path d="M12.3,7L0,3"/>');
    // The integer-formatting shortcut equals String(Math.round(x·10)/10) ('-0' as '0') on halves, signs,
    // exponents and large values, and on 20,000 seeded random numbers of every magnitude.
    const reference = (n: string) => {
      const r = Math.round(Number(n) * 10) / 10;
      return Number.isFinite(r) ? (Object.is(r, -0) ? '0' : String(r)) : n;
    };
    const cases = ['0.05', '-0.05', '0.25', '-0.25', '0.35', '2.45', '-2.45', '1.5e-7', '-3.25e2', '123456789.95', '9.99', '-9.96', '1e400.5', '.5', '-.04', '99999999999999.95', '5e14', '1.2e15'];
    let seed = 1;
    const next = () => ((seed = (seed * 16807) % 2147483647) / 2147483647);
    for (let i = 0; i < 20_000; i++) cases.push(((next() - 0.5) * 10 ** Math.floor(next() * 18 - 3)).toString());
    for (const c of cases) expect(roundDecimal(c), c).toBe(reference(c));
    expect(roundSvgGeometry('<g transform="translate(10.25,3.449)"><text x="1.26">0.125</text></g>')).toBe('<g transform="translate(10.3,3.4)"><text x="1.3">0.125</text></g>');
    expect(stripRedundant('<g class="mark-rule" pointer-events="none"><line opacity="1"/><path d="" display="none"/></g>')).toBe('<g><line/></g>');
  });

  it('bins large motility units and keeps small ones per filament', () => {
    const fil = (v: number, i: number) => ({ movie: 'm1', filament: `f${i}`, velocityUmS: v, at: { file: 'v.csv', line: i + 2 } });
    const small = motilityPlotPoints([0.01, 0.8].map(fil), 0.05);
    expect(small).toEqual([
      { movie: 'm1', filament: 'f0', velocity: 0.01, state: 'immobile' },
      { movie: 'm1', filament: 'f1', velocity: 0.8, state: 'moving' },
    ]);
    // 61 filaments: 1 immobile at 0.02, 30 at 0.05 (edge: bin [0.05, 0.1)), 30 at 0.81 (bin [0.8, 0.85)); counts by hand.
    const velocities = [0.02, ...Array(30).fill(0.05), ...Array(30).fill(0.81)];
    const large = motilityPlotPoints(velocities.map(fil), 0.05);
    expect(large).toEqual([
      { binStart: 0, binEnd: 0.05, state: 'immobile', count: 1 },
      { binStart: 0.05, binEnd: 0.1, state: 'moving', count: 30 },
      { binStart: 0.8, binEnd: 0.85, state: 'moving', count: 30 },
    ]);
    const unit = (variant: string, points: typeof large) => ({
      assay: 'motility', variant, unit: `${variant}-1`, batch: 'B1', metrics: { velocity: 0.43, fractionImmobile: 1 / 61 }, flags: [], nTechnical: 61, plot: { points }, source: [],
    });
    const spec = motilityChart({ variantLabel: 'X1Y', variantUnits: [unit('v', large)], wtUnits: [unit('wt', small)] });
    const table = specTable(spec);
    expect(table.rows).toHaveLength(2);
    expect(table.note).toContain('0.05 µm/s bins');
    expect(String(spec.description)).toContain('0.05 µm/s');
    const rows = (spec.data as { values: Array<Record<string, unknown>> }).values.filter((r) => r.kind === 'bin');
    expect(rows).toHaveLength(5); // 3 bins of the large unit + 2 of the small one
    expect(drawnSpec(spec)).not.toHaveProperty('usermeta');
  });
});

describe('marks by biological direction (one legend meaning everywhere)', () => {
  // Directions as the assay modules declare them (MetricDef.hyper); a lower slow-phase
  // (super-relaxed) fraction frees heads and counts as hypercontractile (Sarkar et al., Sci Adv 2020,
  // as cited in the turnover methods).
  it('marks a metric call by the direction it implies, not by the sign of the change', () => {
    expect(metricMark('increased', 'up')).toBe('towards hypercontractile');
    expect(metricMark('decreased', 'up')).toBe('towards hypocontractile');
    expect(metricMark('decreased', 'down')).toBe('towards hypercontractile');
    expect(metricMark('increased', 'down')).toBe('towards hypocontractile');
    expect(metricMark('increased', 'none')).toBe('higher, no disease direction');
    expect(metricMark('decreased', 'none')).toBe('lower, no disease direction');
    for (const c of ['within WT range', 'indeterminate', 'not estimable'] as const) for (const h of ['up', 'down', 'none'] as const) expect(metricMark(c, h)).toBe(c);
    // Towards hypercontractile looks exactly like a hypercontractile call, and so on.
    expect(METRIC_MARK_STYLE['towards hypercontractile']).toEqual(FUNCTION_CALL_STYLE.hypercontractile);
    expect(METRIC_MARK_STYLE['towards hypocontractile']).toEqual(FUNCTION_CALL_STYLE.hypocontractile);
    // Without the metric's direction, a change gets a neutral mark: never a disease colour or ▲/▼.
    const disease = [FUNCTION_CALL_STYLE.hypercontractile, FUNCTION_CALL_STYLE.hypocontractile];
    for (const call of ['increased', 'decreased'] as const) {
      expect(disease.map((d) => d.colour)).not.toContain(METRIC_CALL_STYLE[call].colour);
      expect(['▲', '▼']).not.toContain(METRIC_CALL_STYLE[call].glyph);
    }
  });

  it('draws a decrease of a "decrease is hypercontractile" metric as ▲ in the hyper colour, on the effects plot and the forest plot', async () => {
    const r = makeFixture();
    // The fixture's kcat declared as a metric whose decrease is hypercontractile (on a copy: the
    // fixture's assay definitions are shared between tests), with one variant's kcat decreased.
    r.assays = structuredClone(r.assays);
    r.assays[0]!.metrics[0]!.hyper = 'down';
    const target = r.comparisons.find((c) => c.assay === 'atpase' && c.metric === 'kcat')!;
    // Every other comparison within WT range, so that the only change drawn is this one.
    for (const c of r.comparisons) if (c !== target) c.call = 'within WT range';
    Object.assign(target, { effect: 0.6, ciLow: 0.5, ciHigh: 0.7, call: 'decreased' });
    const variant = r.variants.find((v) => v.id === target.variant)!;
    const defs = [effectsChart(r, 'atpase', 'kcat')!, forestChart(r, variant, variant.short)!];
    for (const d of defs) {
      const text = JSON.stringify(d.spec);
      expect(text).toContain('"call":"towards hypercontractile"');
      const svg = await renderSvg(d.spec, { key: d.key });
      // The decreased variant is a hyper-coloured triangle pointing up; nothing in the chart is hypo-coloured.
      expect(svg).toMatch(new RegExp(`d="M0,-[0-9.]+L-[0-9.]+,[0-9.]+L[0-9.]+,[0-9.]+Z" fill="${FUNCTION_CALL_STYLE.hypercontractile.colour}"`));
      expect(svg).not.toContain(FUNCTION_CALL_STYLE.hypocontractile.colour);
      expect(svg).toContain('towards hypercontractile');
    }
  });

  it('rings known controls on the all-variant effects plot and names their class beside them', async () => {
    const r = makeFixture();
    const d = effectsChart(r, 'atpase', 'kcat')!;
    const svg = await renderSvg(d.spec, { key: d.key });
    expect(svg).toContain('>pathogenic control</text>');
    expect(svg).toContain('>benign control</text>');
    expect(d.table.columns).toContain('Known control');
    expect(d.table.rows.find((row) => row[0] === 'R505W')?.at(-1)).toBe('pathogenic');
    expect(d.description).toContain('R505W (pathogenic control)');
  });

  // Rings as vega draws them: an unfilled circle path in the ring colour, solid ('1,0') or dashed ('3,2').
  const rings = (svg: string) => [...svg.matchAll(/<path transform="translate\(([-0-9.]+),([-0-9.]+)\)" d="M([0-9.]+),0A[^"]*" stroke="#1d1d1f" stroke-width="1.3" stroke-dasharray="([0-9,]+)"\/>/g)].map((m) => ({ x: Number(m[1]), y: Number(m[2]), r: Number(m[3]), dash: m[4] }));

  it('rings known controls on every all-variant plot (effects, cross-assay scatter, residue map), with a legend that says so', async () => {
    const r = makeFixture();
    const defs = [effectsChart(r, 'atpase', 'kcat')!, ...scatterCharts(r), residueMapChart(r, 'SYNM1')!];
    expect(defs.length).toBeGreaterThanOrEqual(3);
    for (const d of defs) {
      const svg = await renderSvg(d.spec, { key: d.key });
      expect(svg, d.key).toContain('>Known control (ringed)</text>');
      expect(svg, d.key).toContain('>pathogenic or likely pathogenic</text>');
      expect(svg, d.key).toContain('>benign or likely benign</text>');
      // R505W (pathogenic) and V630I (benign): one ring each round the mark, plus one legend symbol per side.
      const found = rings(svg);
      expect(found.filter((g) => g.dash === '1,0').length, d.key).toBe(2);
      expect(found.filter((g) => g.dash === '3,2').length, d.key).toBe(2);
      expect(d.description, d.key).toMatch(/R505W \(pathogenic control\)/);
      expect(d.description, d.key).toMatch(/V630I \(benign control\)/);
      const col = d.table.columns.indexOf('Known control');
      expect(col, d.key).toBeGreaterThan(0);
      expect(d.table.rows.find((row) => row[0] === 'R505W')?.[col], d.key).toBe('pathogenic');
      expect(d.table.rows.find((row) => row[0] === 'G120S')?.[col], d.key).toBe('—');
    }
  });

  it('never puts differences in two units on one axis of the forest plot: a panel per unit, its axis titled with the unit', async () => {
    const r = makeFixture();
    // The fixture's assay definitions are shared between tests: changed here on a copy.
    r.assays = structuredClone(r.assays);
    // G120S with differences in three units: KM made a difference in µM, a basal rate in s⁻¹, and the fraction immobile (no unit).
    const atpase = r.assays.find((a) => a.id === 'atpase')!;
    const fraction = r.assays.find((a) => a.id === 'motility')!.metrics.find((m) => m.id === 'fractionImmobile')!.label;
    Object.assign(atpase.metrics.find((m) => m.id === 'km')!, { scale: 'difference' });
    atpase.metrics.push({ id: 'basal', label: 'Basal rate', unit: 's⁻¹', scale: 'difference', hyper: 'none', primary: false, description: 'Rate without actin.' });
    const km = r.comparisons.find((c) => c.variant === 'synm1-g120s' && c.metric === 'km')!;
    Object.assign(km, { scale: 'difference', effect: 3.2, ciLow: 1.1, ciHigh: 5.3, band: [-5, 5], call: 'within WT range' });
    r.comparisons.push({ ...km, metric: 'basal', unit: 's⁻¹', effect: 0.004, ciLow: -0.002, ciHigh: 0.01, band: [-0.01, 0.01] });
    const v = r.variants.find((x) => x.id === 'synm1-g120s')!;
    const d = forestChart(r, v, v.short)!;
    const panels = (d.spec as { vconcat: Array<{ data: { values: Array<{ row: string }> }; layer: Array<{ encoding: { x?: { title?: unknown } } }> }> }).vconcat;
    const title = (p: (typeof panels)[number]) => [p.layer[0]!.encoding.x!.title].flat().join(' ');
    const titles = ['Ratio to paired WT (log scale)', 'Difference from paired WT (µM)', `${fraction}: difference from paired WT`, 'Difference from paired WT (s⁻¹)'];
    expect(panels.map(title)).toEqual(titles);
    // kcat and mean velocity (ratios) share the log axis; each difference is alone on its unit's axis.
    expect(panels.map((p) => p.data.values.length)).toEqual([2, 1, 1, 1]);
    expect(panels[1]!.data.values[0]!.row).toMatch(/\nKM/);
    expect(panels[2]!.data.values[0]!.row).toContain(fraction.replace(/\s*\([^)]*\)/g, ''));
    expect(panels[3]!.data.values[0]!.row).toMatch(/\nBasal rate/);
    // In the drawn SVG: one axis per unit, each titled with its unit, and no bare 'Difference from paired WT' axis.
    const svg = await renderSvg(d.spec, { key: d.key });
    const axisTitles = [...svg.matchAll(/<text[^>]*font-weight="bold"[^>]*>([^<]*)<\/text>/g)].map((m) => m[1]).filter((t) => /paired WT/.test(t!) && t !== d.title);
    expect(axisTitles).toEqual(titles);
    // Each difference axis has its own range: KM's runs past 5 µM, the basal rate's stays within ±0.02 s⁻¹.
    const params = Object.fromEntries((d.spec.params as Array<{ name: string; value: [number, number] }>).map((p) => [p.name, p.value]));
    expect(params.panel1Domain![1]).toBeGreaterThan(5);
    expect(Math.max(...params.panel3Domain!.map(Math.abs))).toBeLessThan(0.02);
  });

  it('sorts difference rows into panels by unit: rows of one unit share a panel, rows without a unit never do', () => {
    const row = (name: string, scale: 'ratio' | 'difference', unit: string) => ({ row: name, metricName: name, scale, unit, effect: 0, lo: null, hi: null, bandLo: -1, bandHi: 1, call: 'within WT range' as const });
    const panels = forestPanels([row('A', 'ratio', 's⁻¹'), row('B', 'difference', 'kPa'), row('pCa50', 'difference', ''), row('C', 'difference', 'kPa'), row('Fraction', 'difference', ''), row('D', 'ratio', 'µM')]);
    expect(panels.map((p) => [p.axisTitle, p.rows.map((x) => x.row)])).toEqual([
      ['Ratio to paired WT (log scale)', ['A', 'D']],
      ['Difference from paired WT (kPa)', ['B', 'C']],
      ['pCa50: difference from paired WT', ['pCa50']],
      ['Fraction: difference from paired WT', ['Fraction']],
    ]);
  });

  it('draws each ring of the scatter round its control\'s mark', async () => {
    const r = makeFixture();
    const d = scatterCharts(r)[0]!;
    const svg = await renderSvg(d.spec, { key: d.key });
    // The marks are filled points; the plotted rings (larger than the legend's) must each share a centre with one.
    const marks = [...svg.matchAll(/<path transform="translate\(([-0-9.]+),([-0-9.]+)\)" d="[^"]*" fill="#[0-9a-f]{6}" stroke="#ffffff"/g)].map((m) => ({ x: Number(m[1]), y: Number(m[2]) }));
    const plotted = rings(svg).filter((g) => g.r > 8);
    expect(plotted.length).toBe(2);
    for (const g of plotted) expect(marks.some((m) => Math.abs(m.x - g.x) < 0.2 && Math.abs(m.y - g.y) < 0.2)).toBe(true);
  });
});

describe('per-variant assay charts', () => {
  const unit = (variant: string, unitId: string, kFast: number) => ({
    assay: 'turnover', variant, unit: unitId, batch: 'B1', metrics: { slowFraction: 0.3, kFast, kSlow: 0.003 }, flags: [], nTechnical: 1, source: [],
    plot: {
      points: [0, 20, 40, 80, 160, 320, 640, 1280].map((time) => ({ trace: 't1', time, normFluorescence: 0.7 * Math.exp(-kFast * time) + 0.3 * Math.exp(-0.003 * time) })),
      curve: [0, 1, 4, 9, 16, 100, 400, 1280].map((time) => ({ trace: 't1', model: 'double', time, normFluorescence: 0.7 * Math.exp(-kFast * time) + 0.3 * Math.exp(-0.003 * time) })),
    },
  });

  it('name the variant in the legend, never "Variant"', async () => {
    const spec = turnoverChart({ variantLabel: 'Q7R', variantUnits: [unit('v', 'v-1', 0.05)], wtUnits: [unit('wt', 'wt-1', 0.03)] } as never);
    const svg = await renderSvg(drawnSpec(spec), { key: 'turnover-legend' });
    expect(svg).toMatch(/>Q7R<\/text>/);
    expect(svg).toMatch(/>WT<\/text>/);
    expect(svg).not.toMatch(/>Variant<\/text>/);
    const atp = atpase.chart({ variantLabel: 'X9Y', variantUnits: [], wtUnits: [] } as never);
    expect(await renderSvg(drawnSpec(atp), { key: 'atpase-legend' })).not.toMatch(/>Variant<\/text>/);
  });

  it('draw turnover on a log time axis without the time-0 readings, ticks at 1–2–5 steps inside the range', () => {
    const spec = turnoverChart({ variantLabel: 'Q7R', variantUnits: [unit('v', 'v-1', 0.05)], wtUnits: [unit('wt', 'wt-1', 0.03)] } as never);
    const layers = spec.layer as Array<{ data: { values: Array<{ time: number | null }> }; encoding: { x: { scale: { type: string } } } }>;
    expect(layers.every((l) => l.encoding.x.scale.type === 'log')).toBe(true);
    for (const l of layers) for (const row of l.data.values) if (row.time !== null) expect(row.time).toBeGreaterThan(0);
    const params = Object.fromEntries((spec.params as Array<{ name: string; value: unknown }>).map((p) => [p.name, p.value]));
    // First reading after 0 at 20 s, first curve time after 0 at 1 s: the axis starts at 1 s (= 20 s / 20) and ends 5% past 1280 s.
    expect(params.timeDomain).toEqual([1, 1340]);
    expect(params.timeTicks).toEqual([1, 2, 5, 10, 20, 50, 100, 200, 500, 1000]);
    expect(params.variantName).toBe('Q7R');
  });

  it('keep one shape per assay whatever the variant (the name travels as a parameter value)', () => {
    const a = turnoverChart({ variantLabel: 'Q7R', variantUnits: [unit('v', 'v-1', 0.05)], wtUnits: [unit('wt', 'wt-1', 0.03)] } as never);
    const b = turnoverChart({ variantLabel: 'A1B', variantUnits: [unit('v', 'v-1', 0.02)], wtUnits: [unit('wt', 'wt-1', 0.03)] } as never);
    expect(splitSpec(drawnSpec(a)).shape).toEqual(splitSpec(drawnSpec(b)).shape);
  });
});

describe('chart text widths (DejaVu Sans advance widths)', () => {
  it('measures text with the font\'s own widths and wraps long titles', () => {
    // DejaVu Sans 2.37 hmtx: digits 1303/2048 em, space 651/2048 em; bold digits 1425/2048 em.
    expect(textWidth('0', 2048)).toBe(1303);
    expect(textWidth(' ', 2048)).toBe(651);
    expect(textWidth('0', 2048, true)).toBe(1425);
    expect(chartTitle('Short', 600)).toBe('Short');
    const long = chartTitle('In vitro motility: Mean velocity of moving filaments against Force–pCa: Fmax (calcium-activated tension)', 400);
    expect(Array.isArray(long)).toBe(true);
    for (const line of long as string[]) expect(textWidth(line, 14, true)).toBeLessThanOrEqual(400);
  });
});
