/**
 * In vitro motility: from per-frame centroid tracks to one velocity per filament.
 * Pure: no I/O.
 */
import type { SourceRef } from '../../results/source.js';
import { groupBy } from '../assay-common.js';
import type { TrackRow } from './inputs.js';

/** One centroid position of a track, in µm and s. */
export interface TrackPoint {
  timeS: number;
  xUm: number;
  yUm: number;
}

/** Velocity of one track and the numbers behind it. */
export interface TrackVelocity {
  /**
   * The filament's velocity (µm/s): the stride path length over its elapsed time for a moving
   * filament; the net displacement rate for one classified immobile. NaN without elapsed time.
   */
  velocityUmS: number;
  /** Path length along the centroids sampled every `strideFrames` frames (µm). */
  pathUm: number;
  /** Straight-line distance from the first to the last centroid (µm). */
  netDisplacementUm: number;
  /** Net displacement over the whole elapsed time (µm/s): what classifies immobile filaments. */
  netRateUmS: number;
  /** True when netRateUmS is below the immobile threshold. */
  immobile: boolean;
  /** Last minus first time (s). */
  elapsedS: number;
  /** Frames with distinct times used. */
  frames: number;
  /** Frames between the sampled positions of the path (1 = every frame). */
  strideFrames: number;
  /** Rows dropped because their time repeated an earlier frame of the same track. */
  duplicateTimes: number;
}

export interface TrackOptions {
  /** Sample the path about every this many seconds (setting motilityStrideS); 0 = every frame. */
  strideS: number;
  /** Net displacement rate below which a filament is immobile, µm/s (setting motilityImmobileUmS). */
  immobileUmS: number;
}

/**
 * Velocity of one gliding filament from its centroid track.
 *
 * Method, in two steps, after sorting frames by time (a frame whose time repeats an earlier one
 * is dropped and counted):
 * 1. Classify: the net displacement from the first to the last centroid over the elapsed time is
 *    the filament's net rate; below `immobileUmS` the filament is immobile and its velocity is
 *    reported as that net rate. Why net rate: centroid localisation noise (σ per coordinate) adds
 *    about σ·√π to every step, so summed frame-to-frame steps make a stuck filament look like it
 *    moves at σ·√π/Δt (σ = 50 nm, Δt = 0.2 s → 0.44 µm/s, as fast as a gliding filament); the net
 *    displacement carries that noise only once over the whole track (σ·√π/elapsed: 0.02 µm/s over 4.8 s).
 * 2. Moving filaments: path length along the centroids sampled every k frames, k = round(strideS / Δt)
 *    with Δt the median frame interval (at least 1), divided by the time between the first and the
 *    last sampled centroid. Path length follows curved gliding paths (net displacement would read
 *    them slow), and sampling about once a second makes each step long compared with σ, so the
 *    noise bias per step, ≈ σ²/step, becomes negligible (σ = 50 nm, 0.8 µm steps → 0.4%).
 * Source: common practice in gliding-assay tracking, no single reference; the noise arithmetic is
 * the mean of a Rayleigh distribution (mean length of the difference of two noisy positions).
 * @example trackVelocity([{timeS:0,xUm:0,yUm:0},{timeS:0.5,xUm:0.3,yUm:0.4},{timeS:1,xUm:0.6,yUm:0.8},
 *   {timeS:1.5,xUm:0.6,yUm:1.3},{timeS:2,xUm:1.2,yUm:2.1}], { strideS: 0, immobileUmS: 0.05 }).velocityUmS
 *   // → 1.25 (every frame: 2.5 µm / 2 s)
 */
export function trackVelocity(points: readonly TrackPoint[], options: TrackOptions): TrackVelocity {
  const sorted = [...points].sort((a, b) => a.timeS - b.timeS);
  const kept: TrackPoint[] = [];
  let duplicateTimes = 0;
  for (const p of sorted) {
    const prev = kept[kept.length - 1];
    if (prev && p.timeS === prev.timeS) duplicateTimes++;
    else kept.push(p);
  }
  const first = kept[0];
  const last = kept[kept.length - 1];
  const elapsedS = first && last ? last.timeS - first.timeS : 0;
  const netDisplacementUm = first && last ? Math.hypot(last.xUm - first.xUm, last.yUm - first.yUm) : 0;
  const netRateUmS = elapsedS > 0 ? netDisplacementUm / elapsedS : NaN;
  const intervals: number[] = [];
  for (let i = 1; i < kept.length; i++) intervals.push(kept[i]!.timeS - kept[i - 1]!.timeS);
  intervals.sort((a, b) => a - b);
  const medianDt = intervals[Math.floor((intervals.length - 1) / 2)] ?? 0;
  const strideFrames = options.strideS > 0 && medianDt > 0 ? Math.max(1, Math.round(options.strideS / medianDt)) : 1;
  let pathUm = 0;
  let lastSampled = 0;
  for (let i = strideFrames; i < kept.length; i += strideFrames) {
    const [p, q] = [kept[i]!, kept[lastSampled]!];
    pathUm += Math.hypot(p.xUm - q.xUm, p.yUm - q.yUm);
    lastSampled = i;
  }
  const pathElapsedS = first ? kept[lastSampled]!.timeS - first.timeS : 0;
  const immobile = Number.isFinite(netRateUmS) && netRateUmS < options.immobileUmS;
  const velocityUmS = !(elapsedS > 0) ? NaN : immobile || !(pathElapsedS > 0) ? netRateUmS : pathUm / pathElapsedS;
  return { velocityUmS, pathUm, netDisplacementUm, netRateUmS, immobile, elapsedS, frames: kept.length, strideFrames, duplicateTimes };
}

/** One filament of a unit, from tracks or from a velocity row. */
export interface FilamentVelocity {
  movie: string;
  filament: string;
  velocityUmS: number;
  frames?: number;
  at: SourceRef;
}

/**
 * Turn one unit's track rows into filament velocities. A filament is identified by
 * (movie, filament); tracks with fewer than `minFrames` distinct frames give no velocity
 * and are counted in `shortTracks`; repeated times are counted in `duplicateTimes`.
 * @example tracksToFilaments(rows, 5, { strideS: 1, immobileUmS: 0.05 }) // → { filaments: [{ movie:'m1', filament:'f1', velocityUmS:1.25, … }], shortTracks: 0, duplicateTimes: 0 }
 */
export function tracksToFilaments(
  rows: readonly TrackRow[],
  minFrames: number,
  options: TrackOptions,
): { filaments: FilamentVelocity[]; shortTracks: number; duplicateTimes: number; shortAt: SourceRef[] } {
  const byFilament = groupBy(rows, (r) => JSON.stringify([r.movie, r.filament]));
  const filaments: FilamentVelocity[] = [];
  const shortAt: SourceRef[] = [];
  let shortTracks = 0;
  let duplicateTimes = 0;
  for (const trackRows of byFilament.values()) {
    const head = trackRows[0]!; // a group has at least one row
    const v = trackVelocity(trackRows, options);
    duplicateTimes += v.duplicateTimes;
    if (v.frames < minFrames || !Number.isFinite(v.velocityUmS)) {
      shortTracks++;
      shortAt.push(head.at);
      continue;
    }
    filaments.push({
      movie: head.movie,
      filament: head.filament,
      velocityUmS: v.velocityUmS,
      frames: v.frames,
      at: head.at,
    });
  }
  return { filaments, shortTracks, duplicateTimes, shortAt };
}
