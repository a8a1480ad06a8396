/**
 * Seeded simulator of a whole study folder: a scenario (true parameters per variant,
 * batches, noise) in; manifest object and CSV texts out. Pure and deterministic: the same
 * scenario gives byte-identical files. Used by the demo (generate-demo.ts) and meant for
 * benchmarks and recovery tests with known truth.
 *
 * Models: ATPase v = basal + kcat·[A]/(KM + [A]); NADH A340 falls at
 * v·[heads]·ε340·path (ε340 = the ATPase setting nadhEpsilon340); motility filaments move at the unit's
 * velocity or are immobile; force F = Fpassive + Fmax/(1 + 10^(nH·(pCa − pCa50)));
 * single turnover F(t) = offset + A·((1 − fs)·e^(−kfast·t) + fs·e^(−kslow·t)).
 */
import { ATPASE_SETTINGS } from '../assays/atpase/settings.js';
import { parseProteinChange } from '../study/hgvs.js';

/** True per-unit parameters of WT, in canonical units. */
export interface AssayTruth {
  kcat: number; // 1/s
  km: number; // µM
  basal: number; // 1/s
  velocity: number; // µm/s
  fractionImmobile: number;
  pCa50: number;
  nH: number;
  fmax: number; // kPa
  passive: number; // kPa
  kFast: number; // 1/s
  kSlow: number; // 1/s
  slowFraction: number;
}

/** Parameters shifted additively (difference scale); the others are multiplied (ratio scale). */
export const ADDITIVE: ReadonlySet<keyof AssayTruth> = new Set(['fractionImmobile', 'pCa50', 'slowFraction']);

export interface ScenarioVariant {
  /** HGVS or short form as written in the manifest. */
  hgvs: string;
  label?: string;
  control?: { class: 'pathogenic' | 'likely pathogenic' | 'benign' | 'likely benign'; source: string };
  note?: string;
  /** Effects on the WT truth: factors for ratio parameters, shifts for ADDITIVE ones. */
  effects: Partial<AssayTruth>;
  /** Batches the variant was measured in; its units are spread over them in turn. */
  batches: string[];
  atpase: 'rates' | 'nadh' | 'none';
  motility: 'velocities' | 'tracks' | 'none';
  force: boolean;
  turnover: boolean;
  /** Make the first unit's turnover trace have phases too close to resolve. */
  unresolvedTurnoverTrace?: boolean;
}

export interface Scenario {
  seed: number;
  title: string;
  lab: string;
  dates: string[];
  description?: string;
  gene: { symbol: string; sequence: string; domains: { name: string; start: number; end: number }[] };
  direction: 'hypercontractile' | 'hypocontractile' | 'either';
  caveats: string[];
  /** Manifest thresholds, passed through as written. */
  thresholds?: Record<string, unknown>;
  /** Manifest exclusions, passed through as written. */
  exclusions?: Array<Record<string, string>>;
  batches: string[];
  wt: AssayTruth;
  wtUnitsPerBatch: number;
  unitsPerVariant: number;
  variants: ScenarioVariant[];
  /** Between-unit variability: SD of log factors (ratio) or of shifts (additive). */
  unitSd: number;
  /** Between-batch variability of kcat, velocity and Fmax (SD of log factor). */
  batchSd: number;
}

export interface SimulatedStudy {
  manifest: Record<string, unknown>;
  /** CSV text by path relative to the study folder. */
  files: Record<string, string>;
  /** The true per-unit parameters, by `${label}|${unit}|${batch}`, for recovery tests. */
  truth: Record<string, AssayTruth>;
}

/**
 * Mulberry32 uniform generator (Tommy Ettinger's public-domain 32-bit generator) with
 * Box–Muller normals. Deterministic for a given seed.
 * @example createRng(1).uniform() // 0.6270739405881613
 */
export function createRng(seed: number): { uniform(): number; normal(mean?: number, sd?: number): number; pick<T>(xs: readonly T[]): T } {
  let a = seed >>> 0;
  const uniform = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const normal = (mean = 0, sd = 1) => {
    let u = 0;
    while (u === 0) u = uniform();
    return mean + sd * Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * uniform());
  };
  return { uniform, normal, pick: (xs) => nth(xs, Math.floor(uniform() * xs.length)) };
}

/** The element at index i of a list, counting round from the start (a variant's batches taken in turn). */
export function nth<T>(xs: readonly T[], i: number): T {
  if (xs.length === 0) throw new Error('the scenario has an empty list where it needs an element');
  return xs[i % xs.length] as T; // 0 <= i % length < length
}

/** The residue (one-letter code) at a 1-based position of a sequence. */
export function residueAt(sequence: string, residue: number): string {
  const r = sequence[residue - 1];
  if (r === undefined) throw new Error(`residue ${residue} lies outside the scenario's sequence of ${sequence.length}`);
  return r;
}

/** Format a number with a fixed number of decimals, without '-0'. */
function fx(x: number, digits: number): string {
  const s = x.toFixed(digits);
  return /^-0\.?0*$/.test(s) ? s.slice(1) : s;
}

const ACTIN_UM = [0, 2.5, 5, 10, 20, 40, 70, 100];
const WELLS_PER_CONCENTRATION = 3;
const PCA = [9, 6.6, 6.2, 6.0, 5.8, 5.6, 5.4, 5.0, 4.5];
const NADH_HEADS_UM = 0.05;
const NADH_PATH_CM = 0.5;
const NADH_READ_EVERY_S = 20;
const NADH_DURATION_S = 300;
const TRACK_FRAMES = 25;
const TRACK_FRAME_S = 0.2;
const PIXEL_UM = 0.16;
const FILAMENTS_PER_MOVIE = 30;
const VELOCITY_FILAMENTS = 40;
const TURNOVER_EVERY_S = 10;

interface UnitPlan {
  label: string;
  unit: string;
  batch: string;
  truth: AssayTruth;
  variant?: ScenarioVariant;
  first: boolean;
}

/** Simulate the study folder of a scenario. */
export function simulateStudy(s: Scenario): SimulatedStudy {
  const rng = createRng(s.seed);
  const batchFactor = new Map(s.batches.map((b) => [b, Math.exp(rng.normal(0, s.batchSd))]));
  const truth: Record<string, AssayTruth> = {};

  const unitTruth = (base: AssayTruth, batch: string): AssayTruth => {
    const t = { ...base };
    for (const key of Object.keys(t) as (keyof AssayTruth)[]) {
      if (ADDITIVE.has(key)) t[key] = base[key] + rng.normal(0, key === 'pCa50' ? 0.03 : 0.015);
      else t[key] = base[key] * Math.exp(rng.normal(0, s.unitSd));
    }
    const bf = batchFactor.get(batch) ?? 1;
    t.kcat *= bf;
    t.velocity *= bf;
    t.fmax *= bf;
    t.fractionImmobile = Math.min(0.9, Math.max(0, t.fractionImmobile));
    t.slowFraction = Math.min(0.95, Math.max(0.02, t.slowFraction));
    return t;
  };
  const applyEffects = (effects: Partial<AssayTruth>): AssayTruth => {
    const t = { ...s.wt };
    for (const [key, value] of Object.entries(effects) as [keyof AssayTruth, number][]) {
      t[key] = ADDITIVE.has(key) ? s.wt[key] + value : s.wt[key] * value;
    }
    return t;
  };

  // Units: WT per batch, then each variant's units in its batch. One truth per unit, shared by assays.
  const wtUnits: UnitPlan[] = [];
  for (const batch of s.batches) {
    for (let i = 1; i <= s.wtUnitsPerBatch; i++) {
      const t = unitTruth(s.wt, batch);
      wtUnits.push({ label: 'WT', unit: `WT-${batch}-${i}`, batch, truth: t, first: i === 1 });
    }
  }
  const variantUnits: UnitPlan[] = [];
  for (const v of s.variants) {
    const parsed = parseProteinChange(v.hgvs);
    const label = v.label ?? (parsed.ok ? parsed.change.short : v.hgvs);
    const base = applyEffects(v.effects);
    for (let i = 1; i <= s.unitsPerVariant; i++) {
      const batch = nth(v.batches, i - 1);
      variantUnits.push({ label, unit: `${label}-p${i}`, batch, truth: unitTruth(base, batch), variant: v, first: i === 1 });
    }
  }
  for (const u of [...wtUnits, ...variantUnits]) truth[`${u.label}|${u.unit}|${u.batch}`] = u.truth;

  /** Units of one input kind: the variants that use it plus WT of their batches. */
  const unitsFor = (uses: (v: ScenarioVariant) => boolean): UnitPlan[] => {
    const vs = variantUnits.filter((u) => uses(u.variant!));
    const batches = new Set(vs.map((u) => u.batch));
    return [...wtUnits.filter((u) => batches.has(u.batch)), ...vs];
  };

  const banner = `# Synthetic data: invented lab, gene and variants (seed ${s.seed}); not measurements.`;
  const files: Record<string, string> = {};
  const fileEntries: Record<string, unknown>[] = [];

  // ATPase rates.
  const rateUnits = unitsFor((v) => v.atpase === 'rates');
  if (rateUnits.length) {
    const lines = [banner, 'variant,preparation,batch,replicate,actin (uM),rate (1/s)'];
    for (const u of rateUnits) {
      for (const a of ACTIN_UM) {
        for (let w = 1; w <= WELLS_PER_CONCENTRATION; w++) {
          const v = u.truth.basal + (u.truth.kcat * a) / (u.truth.km + a);
          const noisy = v + rng.normal(0, 0.01 + 0.05 * v);
          lines.push(`${u.label},${u.unit},${u.batch},w${w},${a},${fx(noisy, 4)}`);
        }
      }
    }
    files['atpase-rates.csv'] = lines.join('\n') + '\n';
    fileEntries.push({ path: 'atpase-rates.csv', kind: 'atpase-rates' });
  }

  // NADH-coupled traces.
  const nadhUnits = unitsFor((v) => v.atpase === 'nadh');
  if (nadhUnits.length) {
    const epsilonPerUM = ATPASE_SETTINGS.nadhEpsilon340 * 1e-6; // A340 per µM per cm
    const backgroundUMPerS = 0.0015; // actin-only ATP turnover, µM/s
    const lines = [banner, 'variant,preparation,batch,well_type,well,actin (uM),heads (uM),time (s),a340'];
    const wellCounter = new Map<string, number>();
    const nextWell = (batch: string) => {
      const n = (wellCounter.get(batch) ?? 0) + 1;
      wellCounter.set(batch, n);
      return `${String.fromCharCode(65 + Math.floor((n - 1) / 24))}${((n - 1) % 24) + 1}`;
    };
    const trace = (prefix: string, uMPerS: number) => {
      const a0 = 0.95 + rng.normal(0, 0.02);
      for (let t = 0; t <= NADH_DURATION_S; t += NADH_READ_EVERY_S) {
        lines.push(`${prefix},${t},${fx(a0 - uMPerS * epsilonPerUM * NADH_PATH_CM * t + rng.normal(0, 0.002), 4)}`);
      }
    };
    for (const batch of new Set(nadhUnits.map((u) => u.batch))) {
      for (const a of ACTIN_UM) trace(`,,${batch},actin-only,${nextWell(batch)},${a},0`, backgroundUMPerS * (a / 100));
    }
    for (const u of nadhUnits) {
      for (const a of ACTIN_UM) {
        for (let w = 1; w <= WELLS_PER_CONCENTRATION; w++) {
          const perHead = u.truth.basal + (u.truth.kcat * a) / (u.truth.km + a);
          trace(`${u.label},${u.unit},${u.batch},sample,${nextWell(u.batch)},${a},${NADH_HEADS_UM}`, perHead * NADH_HEADS_UM * (1 + rng.normal(0, 0.04)) + backgroundUMPerS * (a / 100));
        }
      }
    }
    files['atpase-nadh.csv'] = lines.join('\n') + '\n';
    fileEntries.push({ path: 'atpase-nadh.csv', kind: 'atpase-nadh', pathLength: { value: NADH_PATH_CM, unit: 'cm' } });
  }

  // Motility: per-filament velocities (nm/s).
  const velUnits = unitsFor((v) => v.motility === 'velocities');
  if (velUnits.length) {
    const lines = [banner, 'variant,preparation,batch,movie,filament,velocity (nm/s)'];
    for (const u of velUnits) {
      for (let f = 1; f <= VELOCITY_FILAMENTS; f++) {
        const movie = `m${1 + Math.floor((f - 1) / 10)}`;
        const immobile = rng.uniform() < u.truth.fractionImmobile;
        const v = immobile ? Math.abs(rng.normal(0, 0.015)) : Math.max(0.06, rng.normal(u.truth.velocity, 0.1 * u.truth.velocity));
        lines.push(`${u.label},${u.unit},${u.batch},${movie},f${f},${fx(v * 1000, 1)}`);
      }
    }
    files['motility-velocities.csv'] = lines.join('\n') + '\n';
    fileEntries.push({ path: 'motility-velocities.csv', kind: 'motility-velocities' });
  }

  // Motility: centroid tracks in pixels by frame.
  const trackUnits = unitsFor((v) => v.motility === 'tracks');
  if (trackUnits.length) {
    const lines = [banner, 'variant,preparation,batch,movie,filament,frame,x (px),y (px)'];
    for (const u of trackUnits) {
      for (let f = 1; f <= FILAMENTS_PER_MOVIE; f++) {
        const immobile = rng.uniform() < u.truth.fractionImmobile;
        const speed = immobile ? 0 : Math.max(0.06, rng.normal(u.truth.velocity, 0.1 * u.truth.velocity));
        const angle = rng.uniform() * 2 * Math.PI;
        const x0 = 40 + rng.uniform() * 400;
        const y0 = 40 + rng.uniform() * 400;
        for (let k = 0; k < TRACK_FRAMES; k++) {
          const d = (speed * k * TRACK_FRAME_S) / PIXEL_UM;
          const x = x0 + d * Math.cos(angle) + rng.normal(0, 0.3);
          const y = y0 + d * Math.sin(angle) + rng.normal(0, 0.3);
          lines.push(`${u.label},${u.unit},${u.batch},mov1,t${f},${k},${fx(x, 2)},${fx(y, 2)}`);
        }
      }
    }
    files['motility-tracks.csv'] = lines.join('\n') + '\n';
    fileEntries.push({
      path: 'motility-tracks.csv',
      kind: 'motility-tracks',
      pixelSize: { value: PIXEL_UM, unit: 'µm' },
      frameInterval: { value: TRACK_FRAME_S, unit: 's' },
    });
  }

  // Force–pCa: force in µN with each preparation's cross-section in µm².
  const forceUnits = unitsFor((v) => v.force);
  if (forceUnits.length) {
    const lines = [banner, 'variant,preparation,batch,pCa,force (uN),area (um2)'];
    for (const u of forceUnits) {
      const areaUm2 = Math.round(Math.max(150, rng.normal(400, 60)));
      for (const pCa of PCA) {
        const tension = u.truth.passive + u.truth.fmax / (1 + 10 ** (u.truth.nH * (pCa - u.truth.pCa50))) + rng.normal(0, 0.5);
        const forceUN = tension * areaUm2 * 1e-3; // kPa × µm² = 1e3 N/m² × 1e-12 m² = 1e-9 N = 1e-3 µN
        lines.push(`${u.label},${u.unit},${u.batch},${pCa},${fx(forceUN, 3)},${areaUm2}`);
      }
    }
    files['force-pca.csv'] = lines.join('\n') + '\n';
    fileEntries.push({ path: 'force-pca.csv', kind: 'force-pca' });
  }

  // Single turnover.
  const turnUnits = unitsFor((v) => v.turnover);
  if (turnUnits.length) {
    const lines = [banner, 'variant,preparation,batch,trace,time (s),fluorescence'];
    for (const u of turnUnits) {
      const duration = 900 + 300 * Math.floor(rng.uniform() * 4); // 900, 1200, 1500 or 1800 s
      const amplitude = 100 * Math.exp(rng.normal(0, 0.1));
      const offset = 20 + rng.normal(0, 2);
      let { kFast, kSlow } = u.truth;
      if (u.variant?.unresolvedTurnoverTrace && u.first) kSlow = kFast * 0.75;
      for (let t = 0; t <= duration; t += TURNOVER_EVERY_S) {
        const f = offset + amplitude * ((1 - u.truth.slowFraction) * Math.exp(-kFast * t) + u.truth.slowFraction * Math.exp(-kSlow * t));
        lines.push(`${u.label},${u.unit},${u.batch},tr1,${t},${fx(f + rng.normal(0, 0.6), 3)}`);
      }
    }
    files['turnover.csv'] = lines.join('\n') + '\n';
    fileEntries.push({ path: 'turnover.csv', kind: 'turnover' });
  }

  const manifest: Record<string, unknown> = {
    $schema: '../schemas/manifest.schema.json',
    title: s.title,
    lab: s.lab,
    dates: s.dates,
    synthetic: true,
    ...(s.description ? { description: s.description } : {}),
    genes: [s.gene],
    variants: [
      { wt: true, label: 'WT' },
      ...s.variants.map((v) => ({
        hgvs: v.hgvs,
        ...(v.label ? { label: v.label } : {}),
        ...(v.control ? { control: v.control } : {}),
        ...(v.note ? { note: v.note } : {}),
      })),
    ],
    direction: s.direction,
    files: fileEntries,
    ...(s.thresholds ? { thresholds: s.thresholds } : {}),
    ...(s.exclusions ? { exclusions: s.exclusions } : {}),
    caveats: s.caveats,
  };
  return { manifest, files, truth };
}
