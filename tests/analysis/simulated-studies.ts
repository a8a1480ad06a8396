/**
 * Seeded studies with known truth for the simulation suite (tests/analysis/simulation.test.ts).
 * Raw data are simulated per biological unit (ATPase rates per [actin] and well, force per pCa,
 * single-turnover chase traces) and go through the same unit fits, comparison and calls as a real
 * study (analyseStudy). Designs follow the demo (src/demo/scenario.ts): 3 batches, WT in every
 * batch, each variant's units in two batches. Magnitudes are typical published values
 * (from memory); noise levels are invented for the test, as in the demo.
 */
import { analyseStudy } from '../../src/analysis/analyse-study.js';
import type { StudyResults } from '../../src/results/types.js';
import type { Random } from '../../src/stats/random.js';
import type { Study, Variant } from '../../src/study/types.js';
import type { AtpaseRateRow } from '../../src/assays/atpase/inputs.js';
import type { ForceRow } from '../../src/assays/force/inputs.js';
import type { TurnoverRow } from '../../src/assays/turnover/inputs.js';
import type { VelocityRow } from '../../src/assays/motility/inputs.js';

/** WT truth (the demo's, src/demo/scenario.ts; slow fraction 0.35 as in the design brief). */
export const WT = { kcat: 5, km: 45, basal: 0.03, velocity: 0.8, pCa50: 5.8, nH: 3, fmax: 30, passive: 1.5, kFast: 0.03, kSlow: 0.0034, slowFraction: 0.35 };

/** A variant's truth: ratios for kcat, KM and velocity, shifts for pCa50 and the slow fraction. */
export interface Truth {
  kcat?: number;
  km?: number;
  velocity?: number;
  fmax?: number;
  pCa50?: number;
  slowFraction?: number;
}

export interface Design {
  /** WT units in each batch (the number of batches is its length). */
  wtPerBatch: number[];
  /** The variant's units in its first and second batch. */
  variantUnits: [number, number];
  /** Unit-to-unit SD on the analysis scale (log for kcat, KM, Fmax; absolute for pCa50 and fractions are scaled below). */
  unitSd: number;
  /** Variant units' SD as a multiple of WT's (2.5 for the heteroscedastic scenario). */
  variantSdFactor: number;
  /** Batch-to-batch SD (log scale for kcat and Fmax, shared by WT and variant units of a batch). */
  batchSd: number;
}

/** The demo's design: 3 WT per batch, 4 units per variant over two batches (src/demo/scenario.ts). */
export const DEMO_DESIGN: Design = { wtPerBatch: [3, 3, 3], variantUnits: [2, 2], unitSd: 0.06, variantSdFactor: 1, batchSd: 0.05 };

const ACTIN_UM = [0, 2.5, 5, 10, 20, 40, 70, 100];
const PCA = [9, 6.6, 6.2, 6.0, 5.8, 5.6, 5.4, 5.0, 4.5];
/** One chase trace per preparation (as in the demo), read every 20 s to 1,800 s (the demo reads every 10 s for 900–1,800 s). */
const CHASE_TIMES_S = Array.from({ length: 91 }, (_, i) => i * 20);

interface Unit {
  variant: string;
  unit: string;
  batch: string;
  sd: number;
  truth: Truth;
}

/** Units of WT and of each variant (variant i in batches i and i + 1, modulo the number of batches). */
function layout(design: Design, variants: readonly { id: string; truth: Truth }[]): Unit[] {
  const batches = design.wtPerBatch.map((_, b) => `B${b + 1}`);
  const units: Unit[] = [];
  batches.forEach((batch, b) => {
    for (let k = 0; k < design.wtPerBatch[b]!; k++) units.push({ variant: 'WT', unit: `WT-${batch}-${k + 1}`, batch, sd: design.unitSd, truth: {} });
  });
  variants.forEach((v, i) => {
    design.variantUnits.forEach((n, side) => {
      const batch = batches[(i + side) % batches.length]!;
      for (let k = 0; k < n; k++) units.push({ variant: v.id, unit: `${v.id}-${batch}-${k + 1}`, batch, sd: design.unitSd * design.variantSdFactor, truth: v.truth });
    });
  });
  return units;
}

export type AssayName = 'atpase' | 'motility' | 'force' | 'turnover';

/** Simulate one study of the given assays and analyse it (analyseStudy: fits, comparisons, calls). */
export function simulateAndAnalyse(
  rnd: Random,
  design: Design,
  variants: readonly { id: string; truth: Truth; control?: Variant['control'] }[],
  assays: readonly AssayName[],
): StudyResults {
  const units = layout(design, variants);
  const batchShift = new Map(design.wtPerBatch.map((_, b) => [`B${b + 1}`, rnd.normal(0, design.batchSd)]));
  const at = { file: 'simulated.csv' };
  const rows: Study['rows'] = {};
  if (assays.includes('atpase')) {
    const list: AtpaseRateRow[] = [];
    for (const u of units) {
      const kcat = WT.kcat * (u.truth.kcat ?? 1) * Math.exp(batchShift.get(u.batch)! + rnd.normal(0, u.sd));
      const km = WT.km * (u.truth.km ?? 1) * Math.exp(rnd.normal(0, 0.1));
      for (const a of ACTIN_UM) {
        for (let w = 0; w < 3; w++) {
          const v = WT.basal + (kcat * a) / (km + a);
          list.push({ variant: u.variant, unit: u.unit, batch: u.batch, actinUM: a, ratePerS: v * (1 + rnd.normal(0, 0.04)) + rnd.normal(0, 0.01), at });
        }
      }
    }
    rows['atpase-rates'] = list;
  }
  if (assays.includes('motility')) {
    const list: VelocityRow[] = [];
    for (const u of units) {
      const velocity = WT.velocity * (u.truth.velocity ?? 1) * Math.exp(batchShift.get(u.batch)! + rnd.normal(0, u.sd));
      // 40 filaments, 7% immobile, moving ones scattering 10% about the unit's velocity.
      for (let f = 0; f < 40; f++) {
        const v = rnd.uniform() < 0.07 ? Math.abs(rnd.normal(0, 0.01)) : Math.max(0.06, velocity * (1 + rnd.normal(0, 0.1)));
        list.push({ variant: u.variant, unit: u.unit, batch: u.batch, filament: `f${f + 1}`, velocityUmS: v, at });
      }
    }
    rows['motility-velocities'] = list;
  }
  if (assays.includes('force')) {
    const list: ForceRow[] = [];
    for (const u of units) {
      // pCa50 unit SD 0.03 pCa units at unitSd 0.06 (the demo's), batch SD 0.03 (half the log-scale batch SD in pCa units).
      const pCa50 = WT.pCa50 + (u.truth.pCa50 ?? 0) + batchShift.get(u.batch)! * 0.6 + rnd.normal(0, u.sd * 0.5);
      const fmax = WT.fmax * (u.truth.fmax ?? 1) * Math.exp(batchShift.get(u.batch)! + rnd.normal(0, u.sd));
      for (const pCa of PCA) {
        const tension = WT.passive + fmax / (1 + 10 ** (WT.nH * (pCa - pCa50))) + rnd.normal(0, 0.5);
        list.push({ variant: u.variant, unit: u.unit, batch: u.batch, pCa, tensionKPa: tension, at });
      }
    }
    rows['force-pca'] = list;
  }
  if (assays.includes('turnover')) {
    const list: TurnoverRow[] = [];
    for (const u of units) {
      // A slow fraction of exactly 0 (no slow phase) stays 0 in every unit; otherwise unit SD 0.015 at unitSd 0.06.
      const target = WT.slowFraction + (u.truth.slowFraction ?? 0);
      const sf = target <= 0 ? 0 : Math.min(0.95, Math.max(0.01, target + rnd.normal(0, u.sd * 0.25)));
      const amplitude = 100 * Math.exp(rnd.normal(0, 0.1));
      const offset = 20 + rnd.normal(0, 2);
      for (const trace of ['t1']) {
        for (const t of CHASE_TIMES_S) {
          const f = offset + amplitude * ((1 - sf) * Math.exp(-WT.kFast * t) + sf * Math.exp(-WT.kSlow * t));
          list.push({ variant: u.variant, unit: u.unit, batch: u.batch, trace, timeS: t, fluorescence: f + rnd.normal(0, 0.6), at });
        }
      }
    }
    rows.turnover = list;
  }
  const declared: Variant[] = [
    { id: 'WT', gene: 'SIM1', isWT: true, hgvs: 'WT', short: 'WT', label: 'WT', at },
    ...variants.map((v) => ({ id: v.id, gene: 'SIM1', isWT: false, hgvs: v.id, short: v.id, label: v.id, ...(v.control ? { control: v.control } : {}), at })),
  ];
  const study: Study = {
    title: 'simulated', lab: 'simulated', dates: [], synthetic: true, genes: [{ symbol: 'SIM1', domains: [] }], direction: 'hypercontractile',
    variants: declared, thresholds: {}, exclusions: [], caveats: [], settings: {}, files: [], rows, manifestRaw: {}, manifestSha256: '',
  };
  return analyseStudy(study, { toolVersion: 'simulation', builtAt: '2026-01-01T00:00:00.000Z' });
}
