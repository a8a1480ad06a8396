/**
 * NADH-coupled ATPase: raw A340 readings of each well → per-head ATPase rates.
 *
 *   readings ──group by well──▶ initial slope of A340 (least squares over the first window)
 *            ──÷ (ε340·path)──▶ µM/s ATP ──− actin-only background (same batch, same [actin])
 *            ──÷ [heads]──▶ rate per head (s⁻¹), one AtpaseRateRow per sample well
 *
 * In the pyruvate kinase / lactate dehydrogenase coupled assay one NADH is oxidised per
 * ATP hydrolysed, so the rate of A340 loss gives the ATP turnover. Pure: no I/O.
 */
import type { SourceRef } from '../../results/source.js';
import { ATPASE_MSG, type AtpaseFlag } from './messages.js';
import { mean } from '../../stats/descriptive.js';
import { assaySetting, groupBy, straightLineFit } from '../assay-common.js';
import type { SettingsBag } from '../types.js';
import type { AtpaseRateRow, NadhRow } from './inputs.js';
import { ATPASE_SETTINGS as SETTINGS } from './settings.js';

/** Minimum readings inside the window for a slope (a line through 2 points has no error estimate). */
const MIN_READINGS = 3;

/** Relative tolerance when matching an actin-only well's [actin] to a sample well's. */
const ACTIN_MATCH_TOLERANCE = 1e-6;

/** One well's initial rate. */
export interface WellRate {
  well: string;
  batch: string;
  wellType: NadhRow['wellType'];
  variant: string;
  unit: string;
  actinUM: number;
  headsUM: number;
  /** Least-squares slope of A340 over the window (per s). */
  slopePerS: number;
  /** ATP turnover in the well (µM/s) before background subtraction. */
  turnoverUMS: number;
  readings: number;
  at: SourceRef;
  /** The readings the slope was fitted to (inside the window). */
  used: SourceRef[];
}

/**
 * ATP turnover (µM/s) from an A340 slope, by Beer–Lambert: c = A/(ε·l), so
 * d[NADH]/dt = (dA340/dt)/(ε340·l) in M/s; turnover = −d[NADH]/dt, times 1e6 for µM/s.
 * Source: ε340 = 6220 M⁻¹cm⁻¹ (Horecker & Kornberg 1948, J Biol Chem 175:385).
 * @example a340SlopeToTurnoverUMS(-0.010 / 60, 1, 6220) // → 0.026795 (computed with ε340 = 6220 M⁻¹cm⁻¹, Horecker & Kornberg 1948)
 */
export function a340SlopeToTurnoverUMS(slopePerS: number, pathCm: number, epsilonPerMPerCm: number): number {
  return (-slopePerS / (epsilonPerMPerCm * pathCm)) * 1e6;
}

/**
 * Initial rate of one well: least-squares slope of A340 against time over readings with
 * t − t_first ≤ windowS (t_first = the well's first reading), converted to µM/s ATP.
 * Returns null when fewer than 3 readings fall in the window.
 * @example wellInitialRate(rowsOfWell, 300, 6220) // → { slopePerS: -1.6667e-4, turnoverUMS: 0.026795, … } for A340 falling 0.010/min, 1 cm
 */
export function wellInitialRate(rows: readonly NadhRow[], windowS: number, epsilon: number): WellRate | null {
  const sorted = [...rows].sort((a, b) => a.timeS - b.timeS);
  const [first] = sorted;
  if (!first) return null;
  const t0 = first.timeS;
  const inWindow = sorted.filter((r) => r.timeS - t0 <= windowS);
  if (inWindow.length < MIN_READINGS) return null;
  const fit = straightLineFit(
    inWindow.map((r) => r.timeS),
    inWindow.map((r) => r.a340),
  );
  if (!Number.isFinite(fit.slope)) return null;
  return {
    well: first.well,
    batch: first.batch,
    wellType: first.wellType,
    variant: first.variant,
    unit: first.unit,
    actinUM: first.actinUM,
    headsUM: first.headsUM,
    slopePerS: fit.slope,
    turnoverUMS: a340SlopeToTurnoverUMS(fit.slope, first.pathCm, epsilon),
    readings: inWindow.length,
    at: first.at,
    used: inWindow.map((r) => r.at),
  };
}

/**
 * Whether two actin concentrations are the same well condition: equal within a relative
 * tolerance of 1e-6 (guards against unit-conversion rounding, e.g. 0.02 mM → 20 µM).
 * @example sameActin(20, 20.0000000001) // → true; sameActin(20, 40) // → false
 */
function sameActin(a: number, b: number): boolean {
  return Math.abs(a - b) <= ACTIN_MATCH_TOLERANCE * Math.max(Math.abs(a), Math.abs(b), 1e-12) || (a === 0 && b === 0);
}

/**
 * Turn NADH-coupled A340 readings into per-head ATPase rates, one row per sample well.
 *
 * Method, per well (readings grouped by file, batch and well): least-squares slope of A340
 * over the first `nadhWindowS` seconds (setting; default in settings.ts); turnover
 * (µM/s) = −slope ÷ (ε340·path length) × 10⁶ with ε340 = `nadhEpsilon340`; minus the mean
 * turnover of the actin-only wells of the same batch at the same [actin]; ÷ [heads] (µM)
 * → s⁻¹.
 * Missing background (rule chosen): when a batch has no actin-only well at a sample's
 * [actin], the rate is reported without subtraction and carries a warning flag
 * 'nadh-no-background' (it is then an upper bound: actin alone hydrolyses a little ATP).
 * Wells with fewer than 3 readings in the window, or a sample well with [heads] ≤ 0, give
 * no rate and a 'reject' flag. Flags carry the source position of the well's first reading; each
 * rate lists the readings it was computed from (`from`: its window and the subtracted actin-only wells').
 * @example nadhToRates(rows, {}) // A340 falling 0.010/min over 1 cm, 0.01 µM heads, no actin-only
 *   // well → rates[0].ratePerS ≈ 2.6795 s⁻¹ (0.026795 µM/s ÷ 0.01 µM) with a 'nadh-no-background' flag
 */
export function nadhToRates(rows: readonly NadhRow[], settings?: SettingsBag): { rates: AtpaseRateRow[]; flags: AtpaseFlag[] } {
  const windowS = assaySetting(SETTINGS, 'nadhWindowS', settings);
  const epsilon = assaySetting(SETTINGS, 'nadhEpsilon340', settings);
  const flags: AtpaseFlag[] = [];
  const wells: WellRate[] = [];
  for (const wellRows of groupBy(rows, (r) => JSON.stringify([r.at.file, r.batch, r.well])).values()) {
    const rate = wellInitialRate(wellRows, windowS, epsilon);
    const head = wellRows[0]!; // a group has at least one row
    if (!rate) {
      flags.push(ATPASE_MSG.nadhTooFewReadings(head.well, head.batch, MIN_READINGS, windowS, head.at));
      continue;
    }
    wells.push(rate);
  }
  const backgrounds = wells.filter((w) => w.wellType === 'actin-only');
  const rates: AtpaseRateRow[] = [];
  for (const w of wells) {
    if (w.wellType !== 'sample') continue;
    if (!(w.headsUM > 0)) {
      flags.push(ATPASE_MSG.nadhNoHeads(w.well, w.batch, w.headsUM, w.at));
      continue;
    }
    const matching = backgrounds.filter((b) => b.batch === w.batch && sameActin(b.actinUM, w.actinUM));
    let turnover = w.turnoverUMS;
    if (matching.length === 0) {
      flags.push(ATPASE_MSG.nadhNoBackground(w.well, w.batch, w.actinUM, w.at));
    } else {
      turnover -= mean(matching.map((b) => b.turnoverUMS));
    }
    rates.push({
      variant: w.variant,
      unit: w.unit,
      batch: w.batch,
      at: w.at,
      // Provenance: the well's readings in the window and those of the actin-only wells subtracted.
      from: [...w.used, ...matching.flatMap((b) => b.used)],
      actinUM: w.actinUM,
      ratePerS: turnover / w.headsUM,
      replicate: w.well,
    });
  }
  return { rates, flags };
}

/** Methods-page sentences for the NADH conversion (the ATPase module may quote them). */
export function nadhMethods(settings?: SettingsBag): string[] {
  return [
    `NADH-coupled traces: per well, the initial rate is the least-squares slope of A340 against time over the first ${assaySetting(SETTINGS, 'nadhWindowS', settings)} s after the well's first reading (at least ${MIN_READINGS} readings).`,
    `ATP turnover (µM/s) = −slope ÷ (ε340 · path length) × 10⁶, with ε340 = ${assaySetting(SETTINGS, 'nadhEpsilon340', settings)} M⁻¹cm⁻¹ (Horecker & Kornberg 1948) and one NADH oxidised per ATP hydrolysed.`,
    `The mean turnover of the actin-only wells of the same batch at the same actin concentration is subtracted, and the result is divided by the myosin head concentration to give a rate per head (s⁻¹). Without a matching actin-only well the rate is kept unsubtracted and flagged.`,
  ];
}
