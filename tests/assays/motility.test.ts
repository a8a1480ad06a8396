import { describe, expect, it } from 'vitest';
import { MOTILITY_SETTINGS as SETTINGS } from '../../src/assays/motility/settings.js';
import { motility, motilitySettings, summariseFilaments } from '../../src/assays/motility/module.js';
import { trackVelocity, tracksToFilaments } from '../../src/assays/motility/tracks.js';
import type { TrackRow, VelocityRow } from '../../src/assays/motility/inputs.js';
import { at, expectChartCompiles, makeStudy, mulberry32, normalSource } from './helpers.js';

const EVERY_FRAME = { strideS: 0, immobileUmS: 0.05 };

describe('trackVelocity (net rate classifies; stride path length gives the velocity)', () => {
  it('matches a hand-worked track', () => {
    // Hand-worked (computed from these inputs, no external source):
    // frames at t = 0, 0.5, 1.0, 1.5, 2.0 s; centroids (0,0) (0.3,0.4) (0.6,0.8) (0.6,1.3) (1.2,2.1) µm.
    // steps: √(0.3²+0.4²) = 0.5; √(0.3²+0.4²) = 0.5; √(0²+0.5²) = 0.5; √(0.6²+0.8²) = 1.0 → path 2.5 µm.
    // elapsed 2.0 s → v = 2.5 / 2.0 = 1.25 µm/s.
    // net displacement √(1.2² + 2.1²) = √5.85 = 2.418677 µm (would give 1.209339 µm/s).
    const track = [
      { timeS: 1.0, xUm: 0.6, yUm: 0.8 }, // deliberately out of order: the routine sorts by time
      { timeS: 0, xUm: 0, yUm: 0 },
      { timeS: 0.5, xUm: 0.3, yUm: 0.4 },
      { timeS: 1.5, xUm: 0.6, yUm: 1.3 },
      { timeS: 2.0, xUm: 1.2, yUm: 2.1 },
    ];
    const v = trackVelocity(track, EVERY_FRAME);
    expect(v.pathUm).toBeCloseTo(2.5, 12);
    expect(v.elapsedS).toBe(2);
    expect(v.velocityUmS).toBeCloseTo(1.25, 12);
    expect(v.netDisplacementUm).toBeCloseTo(2.418677, 6);
    expect(v.frames).toBe(5);
  });

  it('drops a repeated frame time and counts it', () => {
    // Same path as above with a duplicate of t = 0.5 (different position): the first kept → 1.25 µm/s (hand-worked).
    const v = trackVelocity([
      { timeS: 0, xUm: 0, yUm: 0 },
      { timeS: 0.5, xUm: 0.3, yUm: 0.4 },
      { timeS: 0.5, xUm: 9, yUm: 9 },
      { timeS: 1.0, xUm: 0.6, yUm: 0.8 },
      { timeS: 1.5, xUm: 0.6, yUm: 1.3 },
      { timeS: 2.0, xUm: 1.2, yUm: 2.1 },
    ], EVERY_FRAME);
    expect(v.duplicateTimes).toBe(1);
    expect(v.velocityUmS).toBeCloseTo(1.25, 12);
  });

  it('samples the path at the stride (hand-worked)', () => {
    // Hand-worked (computed from these inputs, no external source): same track, stride 1.0 s with
    // Δt = 0.5 s → every 2nd frame: (0,0) → (0.6,0.8) = 1.0 µm; (0.6,0.8) → (1.2,2.1) = √(0.36 + 1.69)
    // = 1.431782 µm; path 2.431782 µm over 2.0 s → 1.215891 µm/s.
    const track = [
      { timeS: 0, xUm: 0, yUm: 0 },
      { timeS: 0.5, xUm: 0.3, yUm: 0.4 },
      { timeS: 1.0, xUm: 0.6, yUm: 0.8 },
      { timeS: 1.5, xUm: 0.6, yUm: 1.3 },
      { timeS: 2.0, xUm: 1.2, yUm: 2.1 },
    ];
    const v = trackVelocity(track, { strideS: 1, immobileUmS: 0.05 });
    expect(v.strideFrames).toBe(2);
    expect(v.pathUm).toBeCloseTo(2.431782, 6);
    expect(v.velocityUmS).toBeCloseTo(1.215891, 6);
    expect(v.immobile).toBe(false);
  });

  it('classifies a stuck filament with localisation noise as immobile, where frame-to-frame path length would not', () => {
    // A stuck filament with σ = 50 nm per coordinate, 25 frames 0.2 s apart. Expected frame-to-frame
    // reading ≈ σ·√π/Δt = 0.05·1.7725/0.2 = 0.44 µm/s (mean of a Rayleigh step; computed, no source),
    // far above the 0.05 µm/s threshold; its net rate is ≈ σ·√π/4.8 s ≈ 0.02 µm/s.
    const rnd = mulberry32(42);
    const gauss = () => Math.sqrt(-2 * Math.log(1 - rnd())) * Math.cos(2 * Math.PI * rnd());
    let stuckImmobile = 0;
    let frameToFrame = 0;
    for (let k = 0; k < 200; k++) {
      const pts = Array.from({ length: 25 }, (_, i) => ({ timeS: i * 0.2, xUm: 5 + 0.05 * gauss(), yUm: 5 + 0.05 * gauss() }));
      const v = trackVelocity(pts, { strideS: 1, immobileUmS: 0.05 });
      if (v.immobile) stuckImmobile++;
      frameToFrame += trackVelocity(pts, { strideS: 0, immobileUmS: 0 }).pathUm / 4.8 / 200;
    }
    expect(frameToFrame).toBeGreaterThan(0.35); // the bias the method avoids
    expect(stuckImmobile).toBeGreaterThanOrEqual(195); // net rate > 0.05 only for rare large noise draws
  });

  it('gives no velocity for a single frame', () => {
    expect(Number.isNaN(trackVelocity([{ timeS: 3, xUm: 1, yUm: 1 }], EVERY_FRAME).velocityUmS)).toBe(true);
  });
});

describe('summariseFilaments', () => {
  it('summarises moving filaments and the immobile fraction', () => {
    // Hand-worked: threshold 0.05 → 0.02 immobile; moving 0.8, 1.0, 1.2: mean 1.0, median 1.0,
    // 95th percentile type 7: h = 2·0.95 = 1.9 → 1.0 + 0.9·(1.2 − 1.0) = 1.18 (R: quantile(c(.8,1,1.2), .95) = 1.18).
    const s = summariseFilaments([0.02, 0.8, 1.0, 1.2], 0.05);
    expect(s).toMatchObject({ nFilaments: 4, nMoving: 3, nImmobile: 1 });
    expect(s.velocity).toBeCloseTo(1.0, 12);
    expect(s.medianVelocity).toBeCloseTo(1.0, 12);
    expect(s.p95Velocity).toBeCloseTo(1.18, 12);
    expect(s.fractionImmobile).toBeCloseTo(0.25, 12);
  });

  it('classifies strictly below the threshold as immobile', () => {
    // Common practice, no source: "slower than the threshold" is immobile, equal counts as moving.
    const s = summariseFilaments([0.049, 0.05, 0.051], 0.05);
    expect(s.nImmobile).toBe(1);
    expect(s.nMoving).toBe(2);
  });

  it('returns nulls when there are no moving filaments', () => {
    const s = summariseFilaments([0.01, 0.0], 0.05);
    expect(s.velocity).toBeNull();
    expect(s.fractionImmobile).toBe(1);
    expect(summariseFilaments([], 0.05).fractionImmobile).toBeNull();
  });
});

function velocityRows(variant: string, unit: string, batch: string, values: number[]): VelocityRow[] {
  return values.map((v, i) => ({ variant, unit, batch, filament: `f${i + 1}`, movie: 'm1', velocityUmS: v, at: at('motility.csv', i + 2) }));
}

describe('motility.analyse from velocity rows', () => {
  it('summarises per unit, counts filaments as technical replicates, and flags', () => {
    const wt = Array.from({ length: 25 }, (_, i) => 0.7 + 0.01 * i); // 25 moving filaments, mean 0.82 (hand-worked)
    const variant = [0.0, 0.01, 0.02, 0.9, 1.1]; // 5 filaments, 3 immobile → 60% immobile
    const study = makeStudy({
      'motility-velocities': [...velocityRows('wt', 'p1', 'b1', wt), ...velocityRows('v1', 'p2', 'b1', variant)],
    });
    const units = motility.analyse(study);
    expect(units).toHaveLength(2);
    const [w, v] = [units[0]!, units[1]!];
    expect(w).toMatchObject({ assay: 'motility', variant: 'wt', unit: 'p1', batch: 'b1', nTechnical: 25 });
    expect(w.metrics.velocity).toBeCloseTo(0.82, 12);
    expect(w.metrics.fractionImmobile).toBe(0);
    expect(w.flags).toEqual([]);
    expect(v.nTechnical).toBe(5);
    expect(v.metrics.velocity).toBeCloseTo(1.0, 12); // mean of 0.9 and 1.1 (hand-worked)
    expect(v.metrics.fractionImmobile).toBeCloseTo(0.6, 12);
    const codes = v.flags.map((f) => f.code).sort();
    expect(codes).toEqual(['motility-high-immobile-fraction', 'motility-too-few-filaments']);
    expect(v.flags.every((f) => f.at?.file === 'motility.csv')).toBe(true);
    for (const id of motility.metrics.map((m) => m.id)) expect(id in w.metrics).toBe(true);
  });

  it('takes the immobile threshold from study settings, then from the input file settings', () => {
    const rows = velocityRows('wt', 'p1', 'b1', [0.08, 0.5, 0.6, 0.7]);
    expect(motility.analyse(makeStudy({ 'motility-velocities': rows }))[0]!.metrics.fractionImmobile).toBe(0);
    const bySettings = motility.analyse(makeStudy({ 'motility-velocities': rows }, { motilityImmobileUmS: 0.1 }));
    expect(bySettings[0]!.metrics.fractionImmobile).toBeCloseTo(0.25, 12);
    const byFile = motility.analyse(
      makeStudy({ 'motility-velocities': rows }, { motilityImmobileUmS: 0.1 }, [
        { kind: 'motility-velocities', path: 'motility.csv', sha256: '', rows: 4, settings: { motilityImmobileUmS: 0.6 } },
      ]),
    );
    expect(byFile[0]!.metrics.fractionImmobile).toBeCloseTo(0.5, 12);
  });

  it('reads defaults from src/defaults.ts', () => {
    const s = motilitySettings({});
    expect(s.immobileUmS).toBe(SETTINGS.motilityImmobileUmS);
    expect(s.minFrames).toBe(SETTINGS.motilityMinFrames);
    expect(s.minFilaments).toBe(SETTINGS.motilityMinFilaments);
  });
});

/**
 * Synthetic tracks with known truth: each moving filament glides at its own speed along a
 * circular arc (radius 3 µm, so net displacement would underestimate speed), with Gaussian
 * localisation noise of 2 nm per coordinate; immobile filaments stay put with the same noise.
 */
function simulateTracks(seed: number, variant: string, unit: string, meanSpeed: number, nMoving: number, nImmobile: number, frames: number) {
  const normal = normalSource(seed);
  const uniform = mulberry32(seed + 1);
  const dt = 0.2;
  const rows: TrackRow[] = [];
  const speeds: number[] = [];
  let line = 2;
  for (let f = 0; f < nMoving + nImmobile; f++) {
    const moving = f < nMoving;
    const speed = moving ? normal(meanSpeed, 0.08) : 0;
    if (moving) speeds.push(speed);
    const radius = 3;
    const phase = uniform() * 2 * Math.PI;
    const cx = uniform() * 50;
    const cy = uniform() * 50;
    for (let k = 0; k < frames; k++) {
      const angle = phase + (speed * k * dt) / radius;
      rows.push({
        variant,
        unit,
        batch: 'b1',
        movie: 'm1',
        filament: `f${f}`,
        timeS: k * dt,
        xUm: cx + radius * Math.cos(angle) + normal(0, 0.002),
        yUm: cy + radius * Math.sin(angle) + normal(0, 0.002),
        at: at('tracks.csv', line++),
      });
    }
  }
  return { rows, speeds };
}

describe('motility.analyse from tracks (recovery of known truth)', () => {
  it('recovers per-filament speeds, the unit mean and the immobile fraction', () => {
    const sim = simulateTracks(20240611, 'wt', 'p1', 0.8, 36, 4, 20);
    const study = makeStudy({ 'motility-tracks': sim.rows });
    const u = motility.analyse(study)[0]!;
    const trueMean = sim.speeds.reduce((a, b) => a + b, 0) / sim.speeds.length;
    // Known truth of the simulation; tolerance: chord-vs-arc shortening of the 1 s stride (default
    // motilityStrideS) on a 3 µm radius, 1 − sin(θ/2)/(θ/2) with θ = v·1 s / 3 µm: 0.30% at 0.8 µm/s,
    // ≤ 0.8% up to 1.3 µm/s (computed, no source). Localisation noise σ = 2 nm moves each sampled
    // endpoint, so the path over 3 chords of ~0.8 µm scatters by ≈ √3·σ·√2/2.4 µm ≈ 0.2% (2 SD ≈ 0.4%).
    expect(u.metrics.velocity as number).toBeCloseTo(trueMean, 2);
    expect(Math.abs((u.metrics.velocity as number) - trueMean)).toBeLessThan(0.005);
    expect(u.metrics.fractionImmobile).toBeCloseTo(4 / 40, 12);
    expect(u.nTechnical).toBe(40);
    const moving = u.plot.points.filter((p) => p.state === 'moving').map((p) => p.velocity as number);
    expect(moving).toHaveLength(36);
    // per filament: below its simulated speed by no more than the chord shortening above
    moving.forEach((v, i) => {
      const theta = sim.speeds[i]! / 3;
      const shortening = 1 - Math.sin(theta / 2) / (theta / 2);
      expect(Math.abs(v / sim.speeds[i]! - (1 - shortening))).toBeLessThan(0.006);
    });
  });

  it('leaves out tracks shorter than the minimum frames, with a flag', () => {
    const long = simulateTracks(7, 'wt', 'p1', 0.8, 3, 0, SETTINGS.motilityMinFrames).rows;
    const short = simulateTracks(8, 'wt', 'p1', 0.8, 2, 0, SETTINGS.motilityMinFrames - 1).rows.map((r) => ({ ...r, filament: `s${r.filament}` }));
    const u = motility.analyse(makeStudy({ 'motility-tracks': [...long, ...short] }))[0]!;
    expect(u.nTechnical).toBe(3);
    const flag = u.flags.find((f) => f.code === 'motility-short-tracks');
    expect(flag?.message).toContain('2 track(s)');
    expect(tracksToFilaments(short, SETTINGS.motilityMinFrames, { strideS: SETTINGS.motilityStrideS, immobileUmS: SETTINGS.motilityImmobileUmS }).shortTracks).toBe(2);
  });

  it('uses tracks and says so when a unit also has velocity rows', () => {
    const tracks = simulateTracks(9, 'wt', 'p1', 0.8, 25, 0, 10).rows;
    const u = motility.analyse(makeStudy({ 'motility-tracks': tracks, 'motility-velocities': velocityRows('wt', 'p1', 'b1', [5, 5]) }))[0]!;
    expect(u.nTechnical).toBe(25);
    expect(u.flags.map((f) => f.code)).toContain('motility-both-inputs');
  });
});

describe('motility chart and methods', () => {
  it('compiles with vega-lite and carries a title and a description', () => {
    const study = makeStudy({
      'motility-velocities': [
        ...velocityRows('wt', 'p1', 'b1', [0.01, 0.8, 0.9, 1.0]),
        ...velocityRows('v1', 'p2', 'b1', [0.02, 1.1, 1.2]),
        ...velocityRows('v1', 'p3', 'b2', [0.0, 0.0]),
        ...velocityRows('wt', 'p4', 'b2', [0.7, 0.75]),
      ],
    });
    const units = motility.analyse(study);
    const spec = motility.chart({
      variantLabel: 'p.Xaa1Yaa (synthetic)',
      variantUnits: units.filter((u) => u.variant === 'v1'),
      wtUnits: units.filter((u) => u.variant === 'wt'),
    });
    expectChartCompiles(spec);
    expect(JSON.stringify(spec)).toContain('p.Xaa1Yaa (synthetic)');
  });

  it('states thresholds from src/defaults.ts in the methods', () => {
    const text = motility.methods.join(' ');
    expect(text).toContain(`${SETTINGS.motilityImmobileUmS} µm/s`);
    expect(text).toContain(`${SETTINGS.motilityMinFrames} frames`);
    expect(text).toContain(`${SETTINGS.motilityMinFilaments}`);
  });
});
