import { describe, expect, it } from 'vitest';
import { ATPASE_SETTINGS as SETTINGS } from '../../src/assays/atpase/settings.js';
import { sourceRanges } from '../../src/assays/assay-common.js';
import { a340SlopeToTurnoverUMS, nadhMethods, nadhToRates, wellInitialRate } from '../../src/assays/atpase/nadh.js';
import type { NadhRow } from '../../src/assays/atpase/inputs.js';
import { at, normalSource } from './helpers.js';

let line = 2;
/** Readings of one well, A340 = a0 + slope·t up to `breakS`, then a different slope (to test the window). */
function well(
  opts: Partial<NadhRow> & { well: string; slopePerMin: number; afterSlopePerMin?: number; breakS?: number; times?: number[]; noise?: () => number },
): NadhRow[] {
  const times = opts.times ?? Array.from({ length: 21 }, (_, i) => i * 30); // 0..600 s every 30 s
  const breakS = opts.breakS ?? Infinity;
  const s1 = opts.slopePerMin / 60;
  const s2 = (opts.afterSlopePerMin ?? opts.slopePerMin) / 60;
  return times.map((t) => ({
    variant: opts.variant ?? 'v1',
    unit: opts.unit ?? 'p1',
    batch: opts.batch ?? 'b1',
    wellType: opts.wellType ?? 'sample',
    well: opts.well,
    actinUM: opts.actinUM ?? 20,
    headsUM: opts.headsUM ?? 0.01,
    timeS: t,
    a340: 1.2 + (t <= breakS ? s1 * t : s1 * breakS + s2 * (t - breakS)) + (opts.noise ? opts.noise() : 0),
    pathCm: opts.pathCm ?? 1,
    at: at('nadh.csv', line++),
  }));
}

describe('A340 slope → ATP turnover', () => {
  it('matches the ε340 check value (Horecker & Kornberg 1948, computed)', () => {
    // Computed with ε340 = 6220 M⁻¹cm⁻¹ (Horecker & Kornberg 1948) [C]: ΔA340 = −0.010 per min over a 1 cm path → 0.026795 µM/s
    // (computed from Horecker & Kornberg 1948 inputs: 0.010/60 s⁻¹ ÷ 6220 M⁻¹cm⁻¹ × 1e6).
    expect(a340SlopeToTurnoverUMS(-0.01 / 60, 1, SETTINGS.nadhEpsilon340)).toBeCloseTo(0.026795, 6);
    // Half the path length doubles the turnover (Beer–Lambert; computed from the same inputs): 0.053591 µM/s.
    expect(a340SlopeToTurnoverUMS(-0.01 / 60, 0.5, 6220)).toBeCloseTo(0.0535906, 6);
  });
});

describe('wellInitialRate', () => {
  it('uses only readings within the first nadhWindowS seconds', () => {
    // Slope −0.010/min up to 300 s, then −0.002/min (depletion-like bend): the window keeps the first part.
    const rows = well({ well: 'A1', slopePerMin: -0.01, afterSlopePerMin: -0.002, breakS: 300 });
    const r = wellInitialRate(rows, 300, 6220)!;
    expect(r.readings).toBe(11); // t = 0, 30, …, 300 (hand-counted)
    expect(r.slopePerS).toBeCloseTo(-0.01 / 60, 12);
    expect(r.turnoverUMS).toBeCloseTo(0.026795, 6); // computed with ε340 = 6220 M⁻¹cm⁻¹ (Horecker & Kornberg 1948) [C]
    // Over the whole 600 s the bend lowers the slope: least squares no longer gives the initial rate.
    expect(Math.abs(wellInitialRate(rows, 600, 6220)!.turnoverUMS - 0.026795)).toBeGreaterThan(0.003);
  });

  it('measures the window from the first reading, not from t = 0', () => {
    const rows = well({ well: 'A1', slopePerMin: -0.01, times: Array.from({ length: 21 }, (_, i) => 100 + i * 30) });
    expect(wellInitialRate(rows, 300, 6220)!.readings).toBe(11);
  });
});

describe('nadhToRates', () => {
  it('converts to a rate per head and subtracts the actin-only background of the same batch and [actin]', () => {
    const rows = [
      ...well({ well: 'A1', slopePerMin: -0.01, actinUM: 20 }),
      ...well({ well: 'H1', slopePerMin: -0.001, actinUM: 20, wellType: 'actin-only', variant: '', unit: '', headsUM: 0 }),
      // background in another batch and at another [actin]: must not be used
      ...well({ well: 'H2', slopePerMin: -0.005, actinUM: 20, wellType: 'actin-only', variant: '', unit: '', headsUM: 0, batch: 'b2' }),
      ...well({ well: 'H3', slopePerMin: -0.005, actinUM: 40, wellType: 'actin-only', variant: '', unit: '', headsUM: 0 }),
    ];
    const { rates, flags } = nadhToRates(rows, {});
    expect(flags).toEqual([]);
    expect(rates).toHaveLength(1);
    // Computed with ε340 = 6220 M⁻¹cm⁻¹ (Horecker & Kornberg 1948): sample 0.026795 µM/s, background 0.0026795 µM/s,
    // (0.026795 − 0.0026795) / 0.01 µM = 2.41155 s⁻¹.
    expect(rates[0]!.ratePerS).toBeCloseTo(2.41155, 4);
    expect(rates[0]).toMatchObject({ variant: 'v1', unit: 'p1', batch: 'b1', actinUM: 20, replicate: 'A1' });
    expect(rates[0]!.at.file).toBe('nadh.csv');
  });

  it("lists as a rate's provenance every reading it used: its window and the subtracted background wells' windows", () => {
    line = 2;
    const sample = well({ well: 'A1', slopePerMin: -0.01 }); // lines 2–22, t = 0…600 s
    const used = well({ well: 'H1', slopePerMin: -0.001, wellType: 'actin-only', variant: '', unit: '', headsUM: 0 }); // lines 23–43
    const other = well({ well: 'H3', slopePerMin: -0.005, actinUM: 40, wellType: 'actin-only', variant: '', unit: '', headsUM: 0 }); // 44–64, not subtracted
    const { rates } = nadhToRates([...sample, ...used, ...other], { nadhWindowS: 300 });
    // The 300 s window holds t = 0, 30, …, 300: 11 readings of each well (hand-counted).
    expect(sourceRanges(rates)).toEqual([
      { file: 'nadh.csv', line: 2, lineEnd: 12 },
      { file: 'nadh.csv', line: 23, lineEnd: 33 },
    ]);
  });

  it('averages several background wells', () => {
    const rows = [
      ...well({ well: 'A1', slopePerMin: -0.01 }),
      ...well({ well: 'H1', slopePerMin: -0.001, wellType: 'actin-only', variant: '', unit: '', headsUM: 0 }),
      ...well({ well: 'H2', slopePerMin: -0.003, wellType: 'actin-only', variant: '', unit: '', headsUM: 0 }),
    ];
    // Computed with ε340 = 6220 M⁻¹cm⁻¹ (Horecker & Kornberg 1948): mean background −0.002/min → 0.005359 µM/s;
    // (0.026795 − 0.005359)/0.01 = 2.14362 s⁻¹.
    expect(nadhToRates(rows).rates[0]!.ratePerS).toBeCloseTo(2.14362, 4);
  });

  it('keeps an unsubtracted rate with a warning when no background matches', () => {
    const { rates, flags } = nadhToRates(well({ well: 'A1', slopePerMin: -0.01 }));
    // computed with ε340 = 6220 M⁻¹cm⁻¹ (Horecker & Kornberg 1948) [C]: 0.026795 µM/s ÷ 0.01 µM = 2.6795 s⁻¹
    expect(rates[0]!.ratePerS).toBeCloseTo(2.6795, 4);
    expect(flags).toHaveLength(1);
    expect(flags[0]).toMatchObject({ code: 'nadh-no-background', severity: 'warning' });
    expect(flags[0]!.at).toEqual({ file: 'nadh.csv', line: expect.any(Number) });
  });

  it('rejects wells with too few readings or no heads, with their source line', () => {
    const few = well({ well: 'B1', slopePerMin: -0.01, times: [0, 400, 800] });
    const noHeads = well({ well: 'B2', slopePerMin: -0.01, headsUM: 0 });
    const { rates, flags } = nadhToRates([...few, ...noHeads]);
    expect(rates).toEqual([]);
    expect(flags.map((f) => f.code).sort()).toEqual(['nadh-no-heads', 'nadh-too-few-readings']);
    expect(flags.find((f) => f.code === 'nadh-too-few-readings')!.at).toEqual(few[0]!.at);
  });

  it('honours a nadhWindowS override from settings', () => {
    const rows = well({ well: 'A1', slopePerMin: -0.01, afterSlopePerMin: 0, breakS: 120 });
    // Window 120 s sees only the −0.010/min part → 2.6795 s⁻¹ (computed with ε340 = 6220 M⁻¹cm⁻¹, ÷ 0.01 µM).
    expect(nadhToRates(rows, { nadhWindowS: 120 }).rates[0]!.ratePerS).toBeCloseTo(2.6795, 4);
    expect(nadhToRates(rows, {}).rates[0]!.ratePerS).toBeLessThan(2.4);
  });

  it('recovers known rates from noisy synthetic traces (seeded)', () => {
    const noise = normalSource(42);
    const truth = [0.5, 1, 2, 4]; // s⁻¹ per head, invented
    const heads = 0.05;
    const eps = SETTINGS.nadhEpsilon340;
    const rows: NadhRow[] = [];
    truth.forEach((k, i) => {
      // rate per head k → turnover k·heads µM/s → dA340/dt = −k·heads·1e-6·ε·path per s
      const slopePerMin = -k * heads * 1e-6 * eps * 1 * 60;
      rows.push(...well({ well: `S${i}`, unit: 'p1', slopePerMin, headsUM: heads, actinUM: 10 * (i + 1), noise: () => noise(0, 0.001) }));
      rows.push(...well({ well: `H${i}`, slopePerMin: -0.0005, wellType: 'actin-only', variant: '', unit: '', headsUM: 0, actinUM: 10 * (i + 1), noise: () => noise(0, 0.001) }));
    });
    // add the background slope to the samples so subtraction is exercised: the sample well sees both
    for (const r of rows) if (r.wellType === 'sample') r.a340 += (-0.0005 / 60) * r.timeS;
    const { rates } = nadhToRates(rows);
    expect(rates).toHaveLength(4);
    // Known truth of the simulation; tolerance: noise SD 0.001 A over 11 readings in 300 s gives a slope SE
    // of about 0.001/√(Σ(t − t̄)²) = 0.001/314.6 ≈ 3.2e-6 /s → ≈ 0.010 s⁻¹ per head; with the background well ≈ 0.0145; 0.1 is ≈ 7 SE.
    rates.forEach((r, i) => expect(Math.abs(r.ratePerS - truth[i]!)).toBeLessThan(0.1));
  });

  it('states the conversion in its methods sentences', () => {
    const text = nadhMethods().join(' ');
    expect(text).toContain(`${SETTINGS.nadhWindowS} s`);
    expect(text).toContain(`${SETTINGS.nadhEpsilon340}`);
  });
});
