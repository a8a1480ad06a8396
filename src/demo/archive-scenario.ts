/**
 * The demo archive: an invented lab's three studies, made from seeded scenarios (simulate.ts), pure.
 * Every value, the lab, both genes and every variant are invented: ZZMYO1 is the demo's invented
 * motor protein (scenario.ts) and ZZTNT3 an invented thin-filament protein; no real gene has either
 * symbol, and their sequences are random letters, so no variant here is a real, reported variant.
 *
 *   panel-2025     ZZMYO1, ATPase and motility, released on 2025-03-14 ("sent to the cardiogenetics
 *                  clinic"); afterwards the lab found that the ATPase rates of one variant had been
 *                  divided by the wrong myosin concentration (a factor RATE_SLIP too high) and
 *                  corrected atpase-rates.csv: that variant's call changes from the released one.
 *   remeasure-2025 ZZMYO1 again, new preparations of two panel variants: one behaves as before
 *                  (concordant), the other is WT-like this time (discordant with the panel).
 *   thin-2026      ZZTNT3, force–pCa only: the archive's second gene.
 *
 * The released panel is `archiveStudies().panel` with `releasedRates()` in place of its
 * atpase-rates.csv; src/demo/generate-archive.ts builds and releases it as a lab would, then writes
 * the corrected file.
 */
import { AMINO_ACIDS, parseProteinChange } from '../study/hgvs.js';
import { DEMO_WT, demoSequence } from './scenario.js';
import { createRng, nth, residueAt, type Scenario, type ScenarioVariant, simulateStudy } from './simulate.js';

export const ARCHIVE_SEED = 20250314;
const AMINO = 'ACDEFGHIKLMNPQRSTVWY';
const SOURCE = 'invented for the demo';

/** The factor by which the released ATPase rates of the corrected variant were too high. */
export const RATE_SLIP = 1.6;

export const DEMO_RELEASE = { study: 'panel-2025', date: '2025-03-14', note: 'sent to the cardiogenetics clinic' } as const;

/** Build time stamp of the demo's release (SOURCE_DATE_EPOCH): 2025-03-14T09:00:00Z. */
export const DEMO_RELEASE_EPOCH = 1741942800;

/** A seeded random sequence (not a real protein), starting with Met. */
function sequenceOf(seed: number, length: number): string {
  const rng = createRng(seed);
  let seq = 'M';
  while (seq.length < length) seq += rng.pick([...AMINO]);
  return seq;
}

/** HGVS of a substitution at a residue of a sequence: the residue there, and a seeded other one. */
function substitution(sequence: string, residue: number, rng: ReturnType<typeof createRng>): string {
  const ref = residueAt(sequence, residue);
  let alt = ref;
  while (alt === ref) alt = rng.pick([...AMINO]);
  return `p.${AMINO_ACIDS[ref]}${residue}${AMINO_ACIDS[alt]}`;
}

const LAB = 'Fictional Sarcomere Function Lab (invented)';
const CAVEATS = [
  'Synthetic demo data: the lab, the genes, the variants and every value are invented.',
  'Research data, not a clinical test. Functional evidence is one line of evidence; classification belongs to qualified clinical laboratories.',
];

type Plan = Omit<ScenarioVariant, 'hgvs' | 'batches'> & { residue: number };

const MOTOR = (effects: ScenarioVariant['effects'], control?: ScenarioVariant['control']): Omit<Plan, 'residue'> => ({
  effects,
  ...(control ? { control } : {}),
  atpase: 'rates',
  motility: 'velocities',
  force: false,
  turnover: false,
});

/** Residues of the panel variants that the re-measuring study measures again. */
export const REMEASURED = { concordant: 91, discordant: 236 } as const;
/** Residue of the panel variant whose rates were corrected after the release. */
export const CORRECTED_RESIDUE = 203;

function scenario(base: Pick<Scenario, 'seed' | 'title' | 'dates' | 'description' | 'gene' | 'batches'>, plans: Plan[], extra: Partial<Scenario> = {}): Scenario {
  const rng = createRng(base.seed ^ 0xa2c);
  const variants = plans.map((p, i) => {
    const { residue, ...rest } = p;
    return { ...rest, hgvs: substitution(base.gene.sequence, residue, rng), batches: [nth(base.batches, i), nth(base.batches, i + 1)] };
  });
  return {
    ...base,
    lab: LAB,
    direction: 'hypercontractile',
    caveats: CAVEATS,
    wt: DEMO_WT,
    wtUnitsPerBatch: 3,
    unitsPerVariant: 4,
    variants,
    unitSd: 0.06,
    batchSd: 0.05,
    ...extra,
  };
}

const ZZMYO1 = () => ({
  symbol: 'ZZMYO1',
  sequence: demoSequence(),
  domains: [
    { name: 'motor domain', start: 1, end: 250 },
    { name: 'converter', start: 251, end: 300 },
    { name: 'lever arm', start: 301, end: 340 },
    { name: 'tail', start: 341, end: 420 },
  ],
});

/** The three studies' scenarios. The re-measured variants get the same HGVS as in the panel (same residue, same seeded change). */
export function archiveScenarios(): { panel: Scenario; remeasure: Scenario; thin: Scenario } {
  const panel = scenario(
    {
      seed: ARCHIVE_SEED,
      title: 'ZZMYO1 spring panel 2025 (synthetic demo)',
      dates: ['2025-02-04', '2025-02-11'],
      description: 'An invented panel of an invented motor protein, released to an invented clinic; made by src/demo/generate-archive.ts. No value in it was measured.',
      gene: ZZMYO1(),
      batches: ['S1', 'S2'],
    },
    [
      { residue: 58, ...MOTOR({ kcat: 1.6, velocity: 1.4 }, { class: 'pathogenic', source: SOURCE }) },
      { residue: 122, ...MOTOR({ kcat: 1.55, velocity: 1.45 }, { class: 'pathogenic', source: SOURCE }) },
      { residue: 35, ...MOTOR({}, { class: 'benign', source: SOURCE }) },
      { residue: 352, ...MOTOR({ kcat: 1.02 }, { class: 'benign', source: SOURCE }) },
      { residue: REMEASURED.concordant, ...MOTOR({ kcat: 1.6, velocity: 1.4 }) },
      { residue: REMEASURED.discordant, ...MOTOR({ kcat: 1.7, velocity: 1.5 }) },
      { residue: CORRECTED_RESIDUE, ...MOTOR({}) },
      { residue: 166, ...MOTOR({ kcat: 0.6, velocity: 0.7 }) },
      { residue: 271, ...MOTOR({ kcat: 0.98 }) },
    ],
    { unitsPerVariant: 5 },
  );
  // The re-measured variants: the panel's HGVS, written here as the panel wrote them.
  const panelHgvs = (residue: number) => panel.variants.find((v) => v.hgvs.match(/\d+/)?.[0] === String(residue))!.hgvs;
  const remeasure: Scenario = {
    ...scenario(
      {
        seed: ARCHIVE_SEED + 1,
        title: 'ZZMYO1 re-measured, autumn 2025 (synthetic demo)',
        dates: ['2025-09-16', '2025-09-23'],
        description: 'Two variants of the spring panel measured again with new, independent preparations (invented). No value in it was measured.',
        gene: ZZMYO1(),
        batches: ['A1', 'A2'],
      },
      [
        { residue: REMEASURED.concordant, ...MOTOR({ kcat: 1.6, velocity: 1.4 }) },
        // The new preparations of this variant behave like WT: the panel's call is not confirmed.
        { residue: REMEASURED.discordant, ...MOTOR({}) },
      ],
      { unitsPerVariant: 5 },
    ),
  };
  remeasure.variants = remeasure.variants.map((v, i) => ({ ...v, hgvs: panelHgvs(i === 0 ? REMEASURED.concordant : REMEASURED.discordant) }));

  const thinSequence = sequenceOf(ARCHIVE_SEED ^ 0x7e3, 290);
  const FORCE = (effects: ScenarioVariant['effects'], control?: ScenarioVariant['control']): Omit<Plan, 'residue'> => ({
    effects,
    ...(control ? { control } : {}),
    atpase: 'none',
    motility: 'none',
    force: true,
    turnover: false,
  });
  const thin = scenario(
    {
      seed: ARCHIVE_SEED + 2,
      title: 'ZZTNT3 calcium sensitivity 2026 (synthetic demo)',
      dates: ['2026-01-20', '2026-01-27'],
      description: 'Force–pCa of skinned preparations carrying variants of an invented thin-filament protein, ZZTNT3. No value in it was measured.',
      gene: {
        symbol: 'ZZTNT3',
        sequence: thinSequence,
        domains: [
          { name: 'N-terminal region', start: 1, end: 90 },
          { name: 'core', start: 91, end: 220 },
          { name: 'C-terminal region', start: 221, end: 290 },
        ],
      },
      batches: ['T1', 'T2'],
    },
    [
      { residue: 74, ...FORCE({ pCa50: 0.25 }, { class: 'pathogenic', source: SOURCE }) },
      { residue: 131, ...FORCE({}, { class: 'benign', source: SOURCE }) },
      { residue: 102, ...FORCE({ pCa50: 0.2 }) },
      { residue: 188, ...FORCE({ pCa50: -0.02 }) },
      { residue: 247, ...FORCE({ fmax: 0.65 }) },
    ],
  );
  return { panel, remeasure, thin };
}

/** The archive's studies: id, folder and simulated files. */
export function archiveStudies(): Array<{ id: string; path: string; study: ReturnType<typeof simulateStudy> }> {
  const s = archiveScenarios();
  return [
    { id: 'panel-2025', path: 'studies/panel-2025', study: simulateStudy(s.panel) },
    { id: 'remeasure-2025', path: 'studies/remeasure-2025', study: simulateStudy(s.remeasure) },
    { id: 'thin-2026', path: 'studies/thin-2026', study: simulateStudy(s.thin) },
  ];
}

/** archive.json of the demo archive. */
export function archiveManifest(): Record<string, unknown> {
  return {
    $schema: '../schemas/archive.schema.json',
    title: 'Fictional Sarcomere Function Lab archive (synthetic demo)',
    lab: LAB,
    synthetic: true,
    description:
      'An invented archive of three invented studies, made by src/demo/generate-archive.ts. The spring panel was released to an invented clinic, and one variant\'s ATPase rates were corrected afterwards; two panel variants were measured again in the autumn; a second invented gene followed in 2026. No value in it was measured.',
    studies: archiveStudies().map((s) => ({ id: s.id, path: s.path })),
  };
}

/** The label the panel's CSV files give the corrected variant (as simulate.ts labels variants). */
export function correctedLabel(): string {
  const v = archiveScenarios().panel.variants.find((x) => x.hgvs.match(/\d+/)?.[0] === String(CORRECTED_RESIDUE))!;
  const parsed = parseProteinChange(v.hgvs);
  if (!parsed.ok) throw new Error(`demo archive: '${v.hgvs}' is not a protein change`);
  return parsed.change.short;
}

/**
 * The panel's atpase-rates.csv as it was released: the corrected variant's rates RATE_SLIP times
 * too high (divided by a myosin concentration RATE_SLIP times too low). Every other row is the same.
 */
export function releasedRates(corrected: string): string {
  const label = correctedLabel();
  return corrected
    .split('\n')
    .map((line) => {
      if (!line.startsWith(`${label},`)) return line;
      const cells = line.split(',');
      const rate = Number(cells[cells.length - 1]);
      cells[cells.length - 1] = (rate * RATE_SLIP).toFixed(4);
      return cells.join(',');
    })
    .join('\n');
}
