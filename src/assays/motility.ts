/**
 * In vitro motility (unloaded gliding of actin filaments over surface-bound myosin).
 *
 * Input: per-filament velocities measured elsewhere (motility-velocities) or per-frame
 * centroid tracks (motility-tracks), turned into one velocity per filament by
 * src/assays/motility-tracks.ts (net rate classifies immobile filaments; stride path length gives the velocity).
 *
 *   rows ──group by (variant, unit, batch)──▶ filaments ──classify──▶ moving / immobile
 *        ──summarise moving filaments──▶ mean, median, 95th percentile; fraction immobile
 *
 * Filaments are technical replicates of their protein preparation: they are summarised
 * within the unit, and only units count as n downstream. Pure: no I/O.
 */
import { ASSAY } from '../defaults.js';
import type { Flag, MetricDef, UnitResult } from '../results/types.js';
import type { SourceRef, Study, TrackRow, VelocityRow } from '../study/types.js';
import { mean, quantile } from '../stats/descriptive.js';
import { assaySetting, roundForPlot } from './assay-common.js';
import { groupUnits, sourceRanges } from './assay-common.js';
import type { SettingsBag } from './assay-common.js';
import { tracksToFilaments } from './motility-tracks.js';
import type { FilamentVelocity } from './motility-tracks.js';
import type { AssayChartInput, AssayModule, ChartSpec } from './types.js';

export const MOTILITY_METRICS: MetricDef[] = [
  {
    id: 'velocity',
    label: 'Mean velocity of moving filaments',
    unit: 'µm/s',
    scale: 'ratio',
    hyper: 'up',
    primary: true,
    description: 'Arithmetic mean of the velocities of the filaments at or above the immobile threshold.',
  },
  {
    id: 'medianVelocity',
    label: 'Median velocity of moving filaments',
    unit: 'µm/s',
    scale: 'ratio',
    hyper: 'up',
    primary: false,
    description: 'Median of the moving filaments’ velocities; less sensitive to a few fast or stuttering filaments.',
  },
  {
    id: 'p95Velocity',
    label: '95th percentile velocity of moving filaments',
    unit: 'µm/s',
    scale: 'ratio',
    hyper: 'up',
    primary: false,
    description: '95th percentile (type 7, as R) of the moving filaments’ velocities: the speed of the fastest filaments.',
  },
  {
    id: 'fractionImmobile',
    label: 'Fraction of immobile filaments',
    unit: '',
    scale: 'difference',
    hyper: 'none',
    primary: false,
    description:
      'Immobile filaments over all analysed filaments. Reported, not used in calls: it depends strongly on preparation quality (dead heads), so its direction says little about the variant’s mechanism.',
  },
];

/** Thresholds in force for one analysis, read from settings with defaults. */
export interface MotilitySettings {
  immobileUmS: number;
  strideS: number;
  minFrames: number;
  minFilaments: number;
  maxImmobileFraction: number;
}

/** Read the motility settings: study.settings overrides src/defaults.ts by the same names. */
export function motilitySettings(...bags: SettingsBag[]): MotilitySettings {
  return {
    immobileUmS: assaySetting('motilityImmobileUmS', ...bags),
    strideS: assaySetting('motilityStrideS', ...bags),
    minFrames: assaySetting('motilityMinFrames', ...bags),
    minFilaments: assaySetting('motilityMinFilaments', ...bags),
    maxImmobileFraction: assaySetting('motilityMaxImmobileFraction', ...bags),
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
function fileSettings(study: Study, file: string | undefined): SettingsBag {
  return study.files.find((f) => f.path === file)?.settings;
}

export interface UnitInput {
  variant: string;
  unit: string;
  batch: string;
  tracks: TrackRow[];
  velocities: VelocityRow[];
}

function collectUnits(study: Study): UnitInput[] {
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
  for (const g of groupUnits(study.rows['motility-tracks'] ?? [])) { const list = get(g).tracks; for (const r of g.rows) list.push(r); }
  for (const g of groupUnits(study.rows['motility-velocities'] ?? [])) { const list = get(g).velocities; for (const r of g.rows) list.push(r); }
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
  const flags: Flag[] = [];
  const first = (input.tracks[0] ?? input.velocities[0]).at;
  let filaments: FilamentVelocity[];
  if (input.tracks.length > 0) {
    const fromTracks = tracksToFilaments(input.tracks, settings.minFrames, { strideS: settings.strideS, immobileUmS: settings.immobileUmS });
    filaments = fromTracks.filaments;
    if (fromTracks.shortTracks > 0) {
      flags.push({
        code: 'motility-short-tracks',
        severity: 'info',
        message: `${fromTracks.shortTracks} track(s) with fewer than ${settings.minFrames} frames gave no velocity and were left out.`,
        at: fromTracks.shortAt[0],
      });
    }
    if (fromTracks.duplicateTimes > 0) {
      flags.push({
        code: 'motility-duplicate-frames',
        severity: 'warning',
        message: `${fromTracks.duplicateTimes} track row(s) repeat the time of an earlier frame of the same filament; the first was kept.`,
        at: first,
      });
    }
    if (input.velocities.length > 0) {
      flags.push({
        code: 'motility-both-inputs',
        severity: 'info',
        message: `This unit has both centroid tracks and ${input.velocities.length} velocity row(s); the velocities from tracks were used and the velocity rows ignored.`,
        at: input.velocities[0].at,
      });
    }
  } else {
    const fromRows = velocityRowsToFilaments(input.velocities);
    filaments = fromRows.filaments;
    if (fromRows.invalid.length > 0) {
      flags.push({
        code: 'motility-invalid-velocity',
        severity: 'warning',
        message: `${fromRows.invalid.length} filament velocity value(s) are negative or not numbers and were left out.`,
        at: fromRows.invalid[0],
      });
    }
  }
  const summary = summariseFilaments(
    filaments.map((f) => f.velocityUmS),
    settings.immobileUmS,
  );
  if (summary.nFilaments < settings.minFilaments) {
    flags.push({
      code: 'motility-too-few-filaments',
      severity: 'warning',
      message: `Only ${summary.nFilaments} filament(s) analysed (at least ${settings.minFilaments} recommended per preparation).`,
      at: first,
    });
  }
  if (summary.nFilaments > 0 && summary.nMoving === 0) {
    flags.push({
      code: 'motility-no-moving-filaments',
      severity: 'warning',
      message: `No filament moved at or above ${settings.immobileUmS} µm/s; velocity is not estimable for this unit.`,
      at: first,
    });
  }
  if (summary.fractionImmobile !== null && summary.fractionImmobile > settings.maxImmobileFraction) {
    flags.push({
      code: 'motility-high-immobile-fraction',
      severity: 'warning',
      message: `${(summary.fractionImmobile * 100).toFixed(1)}% of filaments are immobile (above ${settings.maxImmobileFraction * 100}%): check the preparation for dead heads.`,
      at: first,
    });
  }
  const points = filaments.map((f) => ({
    movie: f.movie,
    filament: f.filament,
    velocity: roundForPlot(f.velocityUmS),
    state: f.velocityUmS >= settings.immobileUmS ? 'moving' : 'immobile',
  }));
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

/** Per-unit analysis of the motility inputs of a study. */
export function analyseMotility(study: Study): UnitResult[] {
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

/**
 * Variant-report chart: one row per protein preparation (the variant's and the WT
 * preparations of the same batches), a tick per filament velocity coloured by moving /
 * immobile (also told apart by position: immobile filaments sit below the threshold),
 * and a black diamond at the mean of moving filaments.
 */
export function motilityChart(input: AssayChartInput): ChartSpec {
  const units = unitRows(input);
  const filaments = units.flatMap(({ u, group, label }) =>
    u.plot.points.map((p) => ({ unitLabel: label, group, velocity: p.velocity, state: p.state })),
  );
  const means = units
    .filter(({ u }) => typeof u.metrics.velocity === 'number')
    .map(({ u, group, label }) => ({ unitLabel: label, group, meanVelocity: roundForPlot(u.metrics.velocity as number) }));
  const order = units.map((x) => x.label);
  const y = { field: 'unitLabel', type: 'nominal', title: null, sort: order, axis: { labelLimit: 260 } };
  return {
    title: `In vitro motility: ${input.variantLabel} beside WT of the same batches`,
    description:
      `Velocity of every analysed actin filament (one tick each) for each protein preparation of ${input.variantLabel} ` +
      `and of WT measured in the same batches; ticks are coloured moving or immobile, and a black diamond marks the mean velocity of the moving filaments of each preparation.`,
    width: 440,
    height: { step: 28 },
    layer: [
      {
        data: { values: filaments },
        mark: { type: 'tick', thickness: 1.5, opacity: 0.7 },
        encoding: {
          x: { field: 'velocity', type: 'quantitative', title: 'Filament velocity (µm/s)', scale: { zero: true } },
          y,
          color: {
            field: 'state',
            type: 'nominal',
            title: 'Filament',
            scale: { domain: ['moving', 'immobile'], range: [STATE_COLOURS.moving, STATE_COLOURS.immobile] },
          },
        },
      },
      {
        data: { values: means },
        mark: { type: 'point', shape: 'diamond', filled: true, size: 90, color: '#111111' },
        encoding: {
          x: { field: 'meanVelocity', type: 'quantitative' },
          y,
          tooltip: [
            { field: 'unitLabel', type: 'nominal', title: 'Preparation' },
            { field: 'meanVelocity', type: 'quantitative', title: 'Mean of moving (µm/s)', format: '.3f' },
          ],
        },
      },
    ],
  };
}

export const motility: AssayModule = {
  id: 'motility',
  label: 'In vitro motility',
  inputs: ['motility-tracks', 'motility-velocities'],
  metrics: MOTILITY_METRICS,
  analyse: analyseMotility,
  chart: motilityChart,
  methods: [
    `From centroid tracks, a filament is immobile when its net displacement over the whole track, divided by the elapsed time, is below ${ASSAY.motilityImmobileUmS} µm/s (setting motilityImmobileUmS); this net rate carries centroid localisation noise only once, whereas summed frame-to-frame steps make a stuck filament look as if it moves at about σ·√π/Δt. A moving filament's velocity is the path length along its centroids sampled about every ${ASSAY.motilityStrideS} s (setting motilityStrideS), divided by the time between the first and last sampled frame: path length follows curved gliding paths, and steps of about a second are long compared with the noise.`,
    `A track needs at least ${ASSAY.motilityMinFrames} frames (setting motilityMinFrames) to give a velocity; shorter tracks are left out and counted in a flag.`,
    `A filament slower than ${ASSAY.motilityImmobileUmS} µm/s (setting motilityImmobileUmS) is immobile. Per protein preparation, the mean, median and 95th percentile (type 7 quantile, as R) are taken over the moving filaments, and the fraction immobile over all analysed filaments.`,
    `Filaments are technical replicates: they are summarised within their protein preparation, and the preparation is the unit counted in the comparison with WT. The mean velocity of moving filaments is the primary metric (ratio scale, an increase counts as hypercontractile); median and 95th percentile are reported only.`,
    `The fraction immobile is compared as a difference and reported without a direction: it depends mainly on the quality of the preparation (dead heads), not on the variant's mechanism.`,
    `Flags: fewer than ${ASSAY.motilityMinFilaments} analysed filaments per preparation (setting motilityMinFilaments); an immobile fraction above ${ASSAY.motilityMaxImmobileFraction * 100}% (setting motilityMaxImmobileFraction, twice the upper end of the 5–10% typical of human β-cardiac preparations, Nag et al. 2015); no moving filament; repeated frame times; negative velocities.`,
  ],
};
