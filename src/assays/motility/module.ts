/**
 * In vitro motility (unloaded gliding of actin filaments over surface-bound myosin).
 *
 * Input: per-filament velocities measured elsewhere (motility-velocities) or per-frame
 * centroid tracks (motility-tracks), turned into one velocity per filament by
 * tracks.ts (net rate classifies immobile filaments; stride path length gives the velocity).
 *
 *   rows ──group by (variant, unit, batch)──▶ filaments ──classify──▶ moving / immobile
 *        ──summarise moving filaments──▶ mean, median, 95th percentile; fraction immobile
 *
 * Filaments are technical replicates of their protein preparation: they are summarised
 * within the unit, and only units count as n downstream. Pure: no I/O.
 */
import type { SourceRef } from '../../results/source.js';
import type { UnitResult } from '../../results/types.js';
import { mean, quantile } from '../../stats/descriptive.js';
import { assaySetting, roundForPlot, rowsOf } from '../assay-common.js';
import { groupUnits, sourceRanges } from '../assay-common.js';
import type { AssayChartInput, AssayModule, AssayStudy, ChartSpec, SettingsBag } from '../types.js';
import { MOTILITY_TRACKS, MOTILITY_VELOCITIES, type TrackRow, type VelocityRow } from './inputs.js';
import { MOTILITY_FLAG_WORDS, MOTILITY_MSG, type MotilityFlag } from './messages.js';
import { MOTILITY_BANDS, MOTILITY_METRICS, MOTILITY_PLAUSIBLE } from './metrics.js';
import { MOTILITY_SETTINGS as SETTINGS } from './settings.js';
import { tracksToFilaments } from './tracks.js';
import type { FilamentVelocity } from './tracks.js';

/** Thresholds in force for one analysis, read from settings with defaults. */
export interface MotilitySettings {
  immobileUmS: number;
  strideS: number;
  minFrames: number;
  minFilaments: number;
  maxImmobileFraction: number;
}

/** Read the motility settings: study.settings overrides the defaults (settings.ts) by the same names. */
export function motilitySettings(...bags: SettingsBag[]): MotilitySettings {
  return {
    immobileUmS: assaySetting(SETTINGS, 'motilityImmobileUmS', ...bags),
    strideS: assaySetting(SETTINGS, 'motilityStrideS', ...bags),
    minFrames: assaySetting(SETTINGS, 'motilityMinFrames', ...bags),
    minFilaments: assaySetting(SETTINGS, 'motilityMinFilaments', ...bags),
    maxImmobileFraction: assaySetting(SETTINGS, 'motilityMaxImmobileFraction', ...bags),
  };
}

/** Per-unit summary of filament velocities. */
export interface MotilitySummary {
  nFilaments: number;
  nMoving: number;
  nImmobile: number;
  velocity: number | null;
  medianVelocity: number | null;
  p95Velocity: number | null;
  fractionImmobile: number | null;
}

/**
 * Summarise one unit's filament velocities.
 *
 * Method: a filament is immobile when its velocity is below `immobileUmS` (strictly);
 * the others are moving. Velocity metrics use moving filaments only: arithmetic mean,
 * median and 95th percentile (type 7 quantile, as R's default). Fraction immobile =
 * immobile / all analysed filaments. Values are null when no filament qualifies.
 * Source: mean of moving filaments and fraction immobile as reported for human
 * β-cardiac myosin by Nag et al., Sci Adv 2015;1:e1500511 (our summaries are named in
 * plain words, not after any program).
 * @example summariseFilaments([0.02, 0.8, 1.0, 1.2], 0.05)
 *   // → { nFilaments: 4, nMoving: 3, nImmobile: 1, velocity: 1.0, medianVelocity: 1.0, p95Velocity: 1.18, fractionImmobile: 0.25 }
 */
export function summariseFilaments(velocities: readonly number[], immobileUmS: number): MotilitySummary {
  const moving = velocities.filter((v) => v >= immobileUmS);
  const nFilaments = velocities.length;
  const nMoving = moving.length;
  return {
    nFilaments,
    nMoving,
    nImmobile: nFilaments - nMoving,
    velocity: nMoving > 0 ? mean(moving) : null,
    medianVelocity: nMoving > 0 ? quantile(moving, 0.5) : null,
    p95Velocity: nMoving > 0 ? quantile(moving, 0.95) : null,
    fractionImmobile: nFilaments > 0 ? (nFilaments - nMoving) / nFilaments : null,
  };
}

function velocityRowsToFilaments(rows: readonly VelocityRow[]): { filaments: FilamentVelocity[]; invalid: SourceRef[] } {
  const filaments: FilamentVelocity[] = [];
  const invalid: SourceRef[] = [];
  for (const r of rows) {
    if (!Number.isFinite(r.velocityUmS) || r.velocityUmS < 0) invalid.push(r.at);
    else filaments.push({ movie: r.movie ?? '', filament: r.filament, velocityUmS: r.velocityUmS, at: r.at });
  }
  return { filaments, invalid };
}

/** Settings of the input file a row came from (manifest per-file settings), if any. */
function fileSettings(study: AssayStudy, file: string | undefined): SettingsBag {
  return study.files.find((f) => f.path === file)?.settings;
}

export interface UnitInput {
  variant: string;
  unit: string;
  batch: string;
  tracks: TrackRow[];
  velocities: VelocityRow[];
}

function collectUnits(study: AssayStudy): UnitInput[] {
  const units = new Map<string, UnitInput>();
  const key = (r: { variant: string; unit: string; batch: string }) => JSON.stringify([r.variant, r.unit, r.batch]);
  const get = (r: { variant: string; unit: string; batch: string }) => {
    let u = units.get(key(r));
    if (!u) {
      u = { variant: r.variant, unit: r.unit, batch: r.batch, tracks: [], velocities: [] };
      units.set(key(r), u);
    }
    return u;
  };
  for (const g of groupUnits(rowsOf(study, MOTILITY_TRACKS))) { const list = get(g).tracks; for (const r of g.rows) list.push(r); }
  for (const g of groupUnits(rowsOf(study, MOTILITY_VELOCITIES))) { const list = get(g).velocities; for (const r of g.rows) list.push(r); }
  return [...units.values()];
}

/**
 * Analyse one unit: filaments from tracks (preferred when both inputs exist) or from
 * velocity rows, then classification and summaries (`summariseFilaments`) and flags.
 * nTechnical = analysed filaments.
 * @example analyseMotilityUnit({ variant:'wt', unit:'p1', batch:'b1', tracks: [], velocities: rowsOf([0.02, 0.8, 1.0, 1.2]) }, motilitySettings())
 *   // → metrics { velocity: 1.0, medianVelocity: 1.0, p95Velocity: 1.18, fractionImmobile: 0.25 }, nTechnical 4,
 *   //   flags ['motility-too-few-filaments', 'motility-high-immobile-fraction']
 */
export function analyseMotilityUnit(input: UnitInput, settings: MotilitySettings): UnitResult {
  const flags: MotilityFlag[] = [];
  const head = input.tracks[0] ?? input.velocities[0];
  if (!head) throw new Error('analyseMotilityUnit: a unit without tracks or velocities');
  const first = head.at;
  let filaments: FilamentVelocity[];
  if (input.tracks.length > 0) {
    const fromTracks = tracksToFilaments(input.tracks, settings.minFrames, { strideS: settings.strideS, immobileUmS: settings.immobileUmS });
    filaments = fromTracks.filaments;
    if (fromTracks.shortTracks > 0) {
      flags.push(MOTILITY_MSG.shortTracks(fromTracks.shortTracks, settings.minFrames, fromTracks.shortAt[0]));
    }
    if (fromTracks.duplicateTimes > 0) {
      flags.push(MOTILITY_MSG.duplicateFrames(fromTracks.duplicateTimes, first));
    }
    if (input.velocities.length > 0) {
      const [ignored] = input.velocities;
      flags.push(MOTILITY_MSG.bothInputs(input.velocities.length, ignored!.at)); // velocities.length > 0
    }
  } else {
    const fromRows = velocityRowsToFilaments(input.velocities);
    filaments = fromRows.filaments;
    if (fromRows.invalid.length > 0) {
      flags.push(MOTILITY_MSG.invalidVelocity(fromRows.invalid.length, fromRows.invalid[0]));
    }
  }
  const summary = summariseFilaments(
    filaments.map((f) => f.velocityUmS),
    settings.immobileUmS,
  );
  if (summary.nFilaments < settings.minFilaments) {
    flags.push(MOTILITY_MSG.tooFewFilaments(summary.nFilaments, settings.minFilaments, first));
  }
  if (summary.nFilaments > 0 && summary.nMoving === 0) {
    flags.push(MOTILITY_MSG.noMovingFilaments(settings.immobileUmS, first));
  }
  if (summary.fractionImmobile !== null && summary.fractionImmobile > settings.maxImmobileFraction) {
    flags.push(MOTILITY_MSG.highImmobileFraction(summary.fractionImmobile, settings.maxImmobileFraction, first));
  }
  const points = motilityPlotPoints(filaments, settings.immobileUmS);
  return {
    assay: 'motility',
    variant: input.variant,
    unit: input.unit,
    batch: input.batch,
    metrics: {
      velocity: summary.velocity,
      medianVelocity: summary.medianVelocity,
      p95Velocity: summary.p95Velocity,
      fractionImmobile: summary.fractionImmobile,
    },
    flags,
    nTechnical: summary.nFilaments,
    plot: { points },
    source: sourceRanges([...input.tracks, ...input.velocities]),
  };
}

/** Width of the velocity bins of the motility chart and of the stored histogram (µm/s). */
export const MOTILITY_BIN_UMS = 0.05;

/** Units with more filaments than this store a histogram in plot.points instead of one row per filament. */
export const MOTILITY_PLOT_FILAMENTS_MAX = 60;

/**
 * Bin index of a velocity: floor(v / width), nudged by 1e-9 so that values on an edge
 * (0.05 / 0.05 = 0.9999999999999999 in floating point) fall in the bin they start.
 * @example velocityBin(0.05, 0.05) // → 1; velocityBin(0.0499, 0.05) // → 0
 */
export function velocityBin(velocity: number, width: number): number {
  return Math.floor(velocity / width + 1e-9);
}

/**
 * Plot data of one unit: one row per filament ({movie, filament, velocity, state}) when the unit
 * has at most MOTILITY_PLOT_FILAMENTS_MAX filaments; otherwise a histogram, one row per
 * 0.05 µm/s bin and state with its filament count ({binStart, binEnd, state, count}), so that
 * results.json and the chart stay small for 300-filament units. Bins start at 0; with the default
 * immobile threshold (0.05 µm/s, a bin edge) no bin holds both states.
 * @example motilityPlotPoints(filamentsAt([0.01, 0.81, 0.83]), 0.05) // 3 filaments → 3 rows, one per filament
 */
export function motilityPlotPoints(filaments: readonly FilamentVelocity[], immobileUmS: number): Array<Record<string, number | string>> {
  const state = (v: number) => (v >= immobileUmS ? 'moving' : 'immobile');
  if (filaments.length <= MOTILITY_PLOT_FILAMENTS_MAX) {
    return filaments.map((f) => ({ movie: f.movie, filament: f.filament, velocity: roundForPlot(f.velocityUmS), state: state(f.velocityUmS) }));
  }
  const counts = new Map<string, { bin: number; state: string; count: number }>();
  for (const f of filaments) {
    const bin = velocityBin(f.velocityUmS, MOTILITY_BIN_UMS);
    const st = state(f.velocityUmS);
    const key = `${bin}|${st}`;
    const c = counts.get(key);
    if (c) c.count++;
    else counts.set(key, { bin, state: st, count: 1 });
  }
  return [...counts.values()]
    .sort((a, b) => a.bin - b.bin || (a.state < b.state ? -1 : a.state > b.state ? 1 : 0))
    .map((c) => ({ binStart: roundForPlot(c.bin * MOTILITY_BIN_UMS), binEnd: roundForPlot((c.bin + 1) * MOTILITY_BIN_UMS), state: c.state, count: c.count }));
}

/** Per-unit analysis of the motility inputs of a study. */
export function analyseMotility(study: AssayStudy): UnitResult[] {
  return collectUnits(study).map((u) => {
    const file = (u.tracks[0] ?? u.velocities[0])?.at.file;
    return analyseMotilityUnit(u, motilitySettings(study.settings, fileSettings(study, file)));
  });
}

/** Colours of our own: moving filaments in a deep teal, immobile ones in a warm grey-brown. */
const STATE_COLOURS = { moving: '#1f6f78', immobile: '#a0785a' } as const;

/** Order and label units: by batch, WT before the variant within a batch. */
function unitRows(input: AssayChartInput) {
  const all = [
    ...input.wtUnits.map((u) => ({ u, group: 'WT', order: 0 })),
    ...input.variantUnits.map((u) => ({ u, group: input.variantLabel, order: 1 })),
  ].sort((a, b) => (a.u.batch < b.u.batch ? -1 : a.u.batch > b.u.batch ? 1 : a.order - b.order || (a.u.unit < b.u.unit ? -1 : 1)));
  return all.map(({ u, group }) => ({ u, group, label: `${group} · ${u.unit} (batch ${u.batch})` }));
}

interface UnitHistogram {
  label: string;
  bins: Array<{ binStart: number; binEnd: number; state: string; count: number }>;
  n: number;
}

/** A unit's plot points as 0.05 µm/s bins per state (per-filament rows are binned here). */
function unitHistogram(points: UnitResult['plot']['points']): Omit<UnitHistogram, 'label'> {
  const counts = new Map<string, { binStart: number; binEnd: number; state: string; count: number }>();
  let n = 0;
  for (const p of points) {
    let binStart: number;
    let binEnd: number;
    let count: number;
    if (typeof p.count === 'number') {
      binStart = p.binStart as number;
      binEnd = p.binEnd as number;
      count = p.count;
    } else {
      const b = velocityBin(p.velocity as number, MOTILITY_BIN_UMS);
      binStart = roundForPlot(b * MOTILITY_BIN_UMS);
      binEnd = roundForPlot((b + 1) * MOTILITY_BIN_UMS);
      count = 1;
    }
    if (!Number.isFinite(binStart)) continue;
    n += count;
    const key = `${binStart}|${p.state}`;
    const c = counts.get(key);
    if (c) c.count += count;
    else counts.set(key, { binStart, binEnd, state: String(p.state), count });
  }
  return { bins: [...counts.values()].sort((a, b) => a.binStart - b.binStart || (a.state < b.state ? -1 : 1)), n };
}

const pct = (x: number | null | undefined) => (typeof x === 'number' && Number.isFinite(x) ? `${(x * 100).toFixed(1)}%` : '—');
const num = (x: number | null | undefined) => (typeof x === 'number' && Number.isFinite(x) ? String(Number(x.toPrecision(3))) : '—');

/**
 * Variant-report chart: one small histogram per protein preparation (the variant's and the WT
 * preparations of the same batches, batch by batch), the share of the preparation's filaments
 * in each 0.05 µm/s velocity bin, bars coloured moving / immobile (immobile bars also sit left of
 * the threshold), a black rule at the mean of the moving filaments, and the preparation's
 * filament count and immobile fraction written beside it. About 40 bars per preparation instead
 * of one tick per filament (300 per preparation in large studies). The numbers table (usermeta)
 * lists every preparation's summary values; bin counts are in results.json.
 */
export function motilityChart(input: AssayChartInput): ChartSpec {
  const units = unitRows(input);
  const rows: Array<Record<string, unknown>> = [];
  const tableRows: string[][] = [];
  let maxShare = 0;
  let maxVelocity = 0;
  for (const [rowOrder, { u, group, label }] of units.entries()) {
    const h = unitHistogram(u.plot.points);
    // Bins are sorted by start, then state: a bin holding both states (a threshold that is not a bin edge) stacks them.
    let stackBin = NaN;
    let stackTop = 0;
    for (const b of h.bins) {
      if (b.binStart !== stackBin) {
        stackBin = b.binStart;
        stackTop = 0;
      }
      const share = h.n > 0 ? b.count / h.n : 0;
      const low = stackTop;
      stackTop += share;
      maxShare = Math.max(maxShare, stackTop);
      maxVelocity = Math.max(maxVelocity, b.binEnd);
      rows.push({ kind: 'bin', unitLabel: label, rowOrder, state: b.state, binStart: b.binStart, binEnd: b.binEnd, shareLow: Number(low.toFixed(4)), share: Number(stackTop.toFixed(4)) });
    }
    const mean = u.metrics.velocity;
    if (typeof mean === 'number' && Number.isFinite(mean)) rows.push({ kind: 'mean', unitLabel: label, rowOrder, meanVelocity: Number(mean.toPrecision(4)) });
    rows.push({ kind: group === 'WT' ? 'noteWT' : 'noteVariant', unitLabel: label, rowOrder, note: `${label}: n ${h.n}, ${pct(u.metrics.fractionImmobile)} immobile` });
    tableRows.push([group, u.unit, u.batch, String(h.n), pct(u.metrics.fractionImmobile), num(u.metrics.velocity), num(u.metrics.medianVelocity), num(u.metrics.p95Velocity)]);
  }
  const yTop = Math.max(0.1, Math.ceil(maxShare * 10) / 10);
  const xTop = Math.max(0.5, Math.ceil(maxVelocity * 4) / 4);
  const kind = (k: string) => [{ filter: { field: 'kind', equal: k } }];
  return {
    title: `In vitro motility: ${input.variantLabel} beside WT of the same batches`,
    description:
      `Distribution of filament velocities for each protein preparation of ${input.variantLabel} and of WT measured in the same batches: ` +
      `bars give the share of the preparation's filaments in each ${MOTILITY_BIN_UMS} µm/s velocity bin, coloured moving or immobile; ` +
      `a black vertical line marks the mean velocity of the moving filaments, and each row is labelled at its right with the preparation (the variant's in bold), its filament count and its immobile fraction. The full height of a row is ${Math.round(yTop * 100)}% of the preparation's filaments.`,
    usermeta: {
      table: {
        columns: ['Group', 'Preparation', 'Batch', 'Filaments', 'Immobile', 'Mean of moving (µm/s)', 'Median of moving (µm/s)', '95th percentile (µm/s)'],
        rows: tableRows,
        note: `The chart bins filament velocities in ${MOTILITY_BIN_UMS} µm/s bins; the bin counts are in results.json (plot.points of each preparation).`,
      },
    },
    // Axis ranges and the axis title depend on the data: parameters, so that every motility chart
    // has the same shape and is compiled once (src/charts/render.ts).
    params: [
      { name: 'xTop', value: xTop },
      { name: 'yTop', value: yTop },
      { name: 'xTitle', value: ['Filament velocity (µm/s)', `Bar height: share of the row's filaments per ${MOTILITY_BIN_UMS} µm/s bin (full row = ${Math.round(yTop * 100)}%)`, 'Black line: mean velocity of the moving filaments'] },
    ],
    data: { values: rows },
    facet: {
      row: {
        field: 'unitLabel',
        type: 'nominal',
        // Rows in unitRows() order (by batch, WT first), carried by each row's rowOrder.
        sort: { field: 'rowOrder', op: 'min' },
        title: null,
        header: { labels: false },
      },
    },
    spacing: 3,
    spec: {
      // Plot 340 px and the row notes beside it: about 680 px in all, an A4 page at 100%.
      width: 340,
      height: 30,
      layer: [
        {
          transform: kind('bin'),
          mark: { type: 'rect' },
          encoding: {
            x: { field: 'binStart', type: 'quantitative', axis: { title: { signal: 'xTitle' }, titleAnchor: 'start', titleAlign: 'left', titleFontWeight: 'normal', tickCount: 8, labelFlush: false }, scale: { domain: [0, { expr: 'xTop' }], nice: false } },
            x2: { field: 'binEnd' },
            y: { field: 'share', type: 'quantitative', title: null, scale: { domain: [0, { expr: 'yTop' }], nice: false }, axis: null },
            y2: { field: 'shareLow' },
            color: {
              field: 'state',
              type: 'nominal',
              title: 'Filament',
              scale: { domain: ['moving', 'immobile'], range: [STATE_COLOURS.moving, STATE_COLOURS.immobile] },
            },
          },
        },
        {
          transform: kind('mean'),
          mark: { type: 'rule', color: '#111111', strokeWidth: 2 },
          encoding: { x: { field: 'meanVelocity', type: 'quantitative' } },
        },
        ...(['noteWT', 'noteVariant'] as const).map((k) => ({
          transform: kind(k),
          mark: { type: 'text', align: 'left', baseline: 'middle', fontSize: 11, color: '#222222', fontWeight: k === 'noteVariant' ? 'bold' : 'normal' },
          encoding: { text: { field: 'note', type: 'nominal' }, x: { value: 346 }, y: { value: 15 } },
        })),
      ],
    },
    resolve: { axis: { x: 'shared' } },
    config: { legend: { orient: 'bottom', direction: 'horizontal', titleOrient: 'left' } },
  };
}

export { MOTILITY_METRICS };

export const motility: AssayModule = {
  id: 'motility',
  label: 'In vitro motility',
  inputs: [MOTILITY_TRACKS, MOTILITY_VELOCITIES],
  metrics: MOTILITY_METRICS,
  bands: MOTILITY_BANDS,
  plausible: MOTILITY_PLAUSIBLE,
  flagWords: MOTILITY_FLAG_WORDS,
  settings: SETTINGS,
  analyse: analyseMotility,
  chart: motilityChart,
  methods: [
    `From centroid tracks, a filament is immobile when its net displacement over the whole track, divided by the elapsed time, is below ${SETTINGS.motilityImmobileUmS} µm/s (setting motilityImmobileUmS); this net rate carries centroid localisation noise only once, whereas summed frame-to-frame steps make a stuck filament look as if it moves at about σ·√π/Δt. A moving filament's velocity is the path length along its centroids sampled about every ${SETTINGS.motilityStrideS} s (setting motilityStrideS), divided by the time between the first and last sampled frame: path length follows curved gliding paths, and steps of about a second are long compared with the noise.`,
    `A track needs at least ${SETTINGS.motilityMinFrames} frames (setting motilityMinFrames) to give a velocity; shorter tracks are left out and counted in a flag.`,
    `A filament slower than ${SETTINGS.motilityImmobileUmS} µm/s (setting motilityImmobileUmS) is immobile. Per protein preparation, the mean, median and 95th percentile (type 7 quantile, as R) are taken over the moving filaments, and the fraction immobile over all analysed filaments.`,
    `Filaments are technical replicates: they are summarised within their protein preparation, and the preparation is the unit counted in the comparison with WT. The mean velocity of moving filaments is the primary metric (ratio scale, an increase counts as hypercontractile); median and 95th percentile are reported only.`,
    `The fraction immobile is compared as a difference and reported without a direction: it depends mainly on the quality of the preparation (dead heads), not on the variant's mechanism.`,
    `Flags: fewer than ${SETTINGS.motilityMinFilaments} analysed filaments per preparation (setting motilityMinFilaments); an immobile fraction above ${SETTINGS.motilityMaxImmobileFraction * 100}% (setting motilityMaxImmobileFraction, twice the upper end of the 5–10% typical of human β-cardiac preparations, Nag et al. 2015); no moving filament; repeated frame times; negative velocities.`,
  ],
};
