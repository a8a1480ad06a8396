/**
 * The demo scenario: an invented lab studying variants of an invented motor protein,
 * ZZMYO1 (no real gene has this symbol; its sequence is random letters from a seeded
 * generator). Every value is invented. WT truth follows typical published magnitudes
 * (from memory) so the pages look realistic; effects mix hyper-, hypo-,
 * WT-like and mixed variants, plus two deliberate problems for the analysis to flag:
 * one variant's KM far above the top [actin] (100 µM), one turnover trace whose two
 * phases are too close to resolve.
 */
import { AMINO_ACIDS } from '../study/hgvs.js';
import { createRng, nth, residueAt, type AssayTruth, type Scenario, type ScenarioVariant } from './simulate.js';

const SEED = 20250214;
const AMINO = 'ACDEFGHIKLMNPQRSTVWY';

/** A random 420-residue sequence starting with Met (seeded; not a real protein). */
export function demoSequence(seed = SEED): string {
  const rng = createRng(seed ^ 0x5eed);
  let seq = 'M';
  while (seq.length < 420) seq += rng.pick([...AMINO]);
  return seq;
}

/** WT truth of the demo and of the benchmark's synthetic studies (typical magnitudes, from memory). */
export const DEMO_WT: AssayTruth = {
  kcat: 5.0,
  km: 45,
  basal: 0.03,
  velocity: 0.8,
  fractionImmobile: 0.07,
  pCa50: 5.8,
  nH: 3.0,
  fmax: 30,
  passive: 1.5,
  kFast: 0.03,
  kSlow: 0.0034,
  slowFraction: 0.3,
};

const SOURCE = 'invented for the demo';

type Plan = Omit<ScenarioVariant, 'hgvs' | 'batches'> & { residue: number };

/** The demo variants: residue, effects, which files hold them. */
const PLANS: Plan[] = [
  // Pathogenic controls (hypercontractile; the demo's disease direction).
  { residue: 58, control: { class: 'pathogenic', source: SOURCE }, effects: { kcat: 1.45, velocity: 1.3, pCa50: 0.15, slowFraction: -0.12 }, atpase: 'rates', motility: 'velocities', force: true, turnover: true },
  { residue: 122, control: { class: 'pathogenic', source: SOURCE }, effects: { kcat: 1.35, fmax: 1.3, pCa50: 0.2 }, atpase: 'rates', motility: 'tracks', force: true, turnover: true },
  { residue: 181, control: { class: 'likely pathogenic', source: SOURCE }, effects: { velocity: 1.35, kcat: 1.3, slowFraction: -0.15 }, atpase: 'nadh', motility: 'velocities', force: true, turnover: true },
  { residue: 262, control: { class: 'pathogenic', source: SOURCE }, effects: { pCa50: 0.25, nH: 0.8, slowFraction: -0.1, kcat: 1.25 }, atpase: 'rates', motility: 'velocities', force: true, turnover: true },
  // Benign controls (WT-like).
  { residue: 35, control: { class: 'benign', source: SOURCE }, effects: { kcat: 1.03 }, atpase: 'rates', motility: 'velocities', force: true, turnover: true },
  { residue: 309, control: { class: 'benign', source: SOURCE }, effects: { velocity: 0.98 }, atpase: 'rates', motility: 'tracks', force: true, turnover: true },
  { residue: 352, control: { class: 'likely benign', source: SOURCE }, effects: {}, atpase: 'rates', motility: 'velocities', force: true, turnover: true },
  { residue: 401, control: { class: 'benign', source: SOURCE }, effects: { pCa50: 0.01 }, atpase: 'rates', motility: 'velocities', force: true, turnover: true },
  // Others: hypercontractile.
  { residue: 91, effects: { kcat: 1.5, velocity: 1.25 }, atpase: 'rates', motility: 'velocities', force: true, turnover: true },
  { residue: 147, effects: { pCa50: 0.18, fmax: 1.15 }, atpase: 'rates', motility: 'tracks', force: true, turnover: true },
  { residue: 203, effects: { slowFraction: -0.14, kcat: 1.2 }, atpase: 'nadh', motility: 'velocities', force: true, turnover: true },
  { residue: 236, effects: { velocity: 1.3, kcat: 1.3, pCa50: 0.1 }, atpase: 'rates', motility: 'velocities', force: true, turnover: true },
  // Hypocontractile.
  { residue: 166, effects: { kcat: 0.6, velocity: 0.7 }, atpase: 'rates', motility: 'velocities', force: true, turnover: true },
  { residue: 219, effects: { fmax: 0.65, pCa50: -0.15 }, atpase: 'rates', motility: 'tracks', force: true, turnover: true },
  { residue: 248, effects: { slowFraction: 0.12, kcat: 0.75 }, atpase: 'rates', motility: 'velocities', force: true, turnover: true },
  // WT-like.
  { residue: 271, effects: { kcat: 0.97 }, atpase: 'rates', motility: 'velocities', force: true, turnover: true },
  { residue: 297, effects: {}, atpase: 'nadh', motility: 'tracks', force: true, turnover: true },
  { residue: 377, effects: { velocity: 1.02 }, atpase: 'rates', motility: 'velocities', force: true, turnover: true },
  // Mixed.
  { residue: 284, effects: { kcat: 1.4, velocity: 0.7 }, atpase: 'rates', motility: 'tracks', force: true, turnover: true },
  { residue: 318, effects: { pCa50: 0.2, fmax: 0.6 }, atpase: 'rates', motility: 'velocities', force: true, turnover: true },
  // Deliberate problems.
  { residue: 333, effects: { km: 6, kcat: 1.1 }, note: 'Demo problem: KM lies far above the highest actin concentration (100 µM).', atpase: 'rates', motility: 'velocities', force: true, turnover: true },
  { residue: 133, effects: { slowFraction: -0.05 }, note: 'Demo problem: one turnover trace has phases too close to resolve.', unresolvedTurnoverTrace: true, atpase: 'rates', motility: 'velocities', force: true, turnover: true },
];

/** Build the demo scenario (deterministic). */
export function demoScenario(): Scenario {
  const sequence = demoSequence();
  const rng = createRng(SEED ^ 0xa17);
  const batches = ['B1', 'B2', 'B3'];
  const variants: ScenarioVariant[] = PLANS.map((plan, i) => {
    const ref = residueAt(sequence, plan.residue);
    let alt = ref;
    while (alt === ref) alt = rng.pick([...AMINO]);
    const { residue, ...rest } = plan;
    // Mix R403Q, p.R403Q and p.Arg403Gln spellings, to show normalisation.
    const hgvs =
      i % 3 === 0 ? `${ref}${residue}${alt}` : i % 3 === 1 ? `p.${ref}${residue}${alt}` : `p.${AMINO_ACIDS[ref]}${residue}${AMINO_ACIDS[alt]}`;
    return { ...rest, hgvs, batches: [nth(batches, i), nth(batches, i + 1)] };
  });
  return {
    seed: SEED,
    title: 'ZZMYO1 variant panel (synthetic demo)',
    lab: 'Fictional Motor Proteins Lab (invented)',
    dates: ['2025-02-04', '2025-02-11', '2025-02-18'],
    description:
      'An invented study of an invented motor protein, made by src/demo/generate-demo.ts to show what myofolio does. No value in it was measured.',
    gene: {
      symbol: 'ZZMYO1',
      sequence,
      domains: [
        { name: 'motor domain', start: 1, end: 250 },
        { name: 'converter', start: 251, end: 300 },
        { name: 'lever arm', start: 301, end: 340 },
        { name: 'tail', start: 341, end: 420 },
      ],
    },
    direction: 'hypercontractile',
    thresholds: {
      wtBaselines: {
        'atpase.kcat': { mean: 4.9, sd: 0.35, source: 'WT preparations of the previous year, 24 batches (invented for the demo)' },
      },
    },
    exclusions: [
      {
        kind: 'preparation',
        assay: 'force',
        preparation: 'E333V-p2',
        reason: 'The fibre tore during the first activation at pCa 4.5 (invented for the demo).',
      },
    ],
    caveats: [
      'Synthetic demo data: the lab, the gene, the variants and every value are invented.',
      'Research data, not a clinical test. Functional evidence is one line of evidence; classification belongs to qualified clinical laboratories.',
    ],
    batches,
    wt: DEMO_WT,
    wtUnitsPerBatch: 3,
    unitsPerVariant: 4,
    variants,
    unitSd: 0.06,
    batchSd: 0.05,
  };
}
