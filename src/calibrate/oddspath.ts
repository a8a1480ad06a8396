/**
 * Functional-evidence calibration against known controls (PS3/BS3).
 *
 * Pipeline of this file:
 * ```
 * controls (known class + readout) ──▶ 2×2 counts ──▶ pseudo-count ──▶ P1, P2
 *        ──▶ OddsPath (abnormal, normal) ──▶ Table 3 level ──▶ control-count gate ──▶ lab cap
 * ```
 * Source: Brnich SE et al., "Recommendations for application of the functional
 * evidence PS3/BS3 criterion using the ACMG/AMP sequence variant interpretation
 * framework", Genome Medicine 2020;12:3, doi:10.1186/s13073-019-0690-2
 * (ClinGen SVI recommendations). Levels are evidence *ceilings*: they say how
 * strong the assay's readout can be as one line of evidence, never a classification.
 */
import { fmt } from '../results/format.js';
import { CALIBRATION } from '../defaults.js';
import type { Calibration, EvidenceLevel } from '../results/types.js';
import type { ControlClass } from '../study/types.js';

/** A readout in the disease direction: functionally abnormal, functionally normal, or none (indeterminate, mixed, not measured). */
export type Readout = 'abnormal' | 'normal' | null;

/** Strength words of the ACMG/AMP framework, weakest first. */
export type Strength = 'supporting' | 'moderate' | 'strong' | 'very strong';

/**
 * When the pseudo-count of Brnich et al. 2020 is added:
 * - 'always': one pathogenic control reading normal and one benign control reading
 *   abnormal are added to every calibration (our default, see {@link calibrate});
 * - 'when-any-cell-zero': added only when a cell of the 2×2 table is zero.
 */
export type PseudoCountRule = 'always' | 'when-any-cell-zero';

/** Default pseudo-count rule (CALIBRATION.pseudoCountRule in src/defaults.ts). */
export const DEFAULT_PSEUDO_COUNT_RULE: PseudoCountRule = CALIBRATION.pseudoCountRule;

/** One control variant's known class and its readout in one scope (an assay, or overall). */
export interface CalibrationControl {
  id: string;
  knownClass: ControlClass;
  readout: Readout;
}

export interface CalibrateOptions {
  /** Lab cap from a gene-specific expert-panel rule (manifest); no cap when absent. */
  cap?: Strength;
  /** When the pseudo-count is added; default {@link DEFAULT_PSEUDO_COUNT_RULE}. */
  pseudoCount?: PseudoCountRule;
}

/**
 * Odds of pathogenicity of a readout.
 *
 * Method: OddsPath = [P2·(1 − P1)] / [(1 − P2)·P1], the posterior odds P2/(1 − P2)
 * divided by the prior odds P1/(1 − P1).
 * P1: proportion pathogenic among all classified controls; P2: proportion pathogenic
 * among the controls with the readout in question (abnormal for PS3, normal for BS3).
 * Source: Brnich et al. 2020, Genome Med 12:3.
 *
 * P1 must lie strictly between 0 and 1 and P2 in [0, 1]; P2 = 1 gives Infinity and
 * P2 = 0 gives 0 (the pseudo-count in {@link calibrate} avoids both).
 *
 * @example oddsPath(6 / 13, 5 / 6) // → 5.8333 (5 pathogenic + 6 benign controls, perfect separation, pseudo-count pair included)
 */
export function oddsPath(p1: number, p2: number): number {
  if (!(p1 > 0 && p1 < 1)) throw new RangeError(`oddsPath: P1 must be strictly between 0 and 1, got ${p1}`);
  if (!(p2 >= 0 && p2 <= 1)) throw new RangeError(`oddsPath: P2 must be between 0 and 1, got ${p2}`);
  if (p2 === 1) return Infinity;
  return (p2 * (1 - p1)) / ((1 - p2) * p1);
}

/**
 * Evidence level of an OddsPath for one readout direction.
 *
 * Method: Table 3 of Brnich et al. 2020 (Genome Med 12:3), strict inequalities:
 * > 350 PS3 very strong; > 18.7 PS3 strong; > 4.3 PS3 moderate; > 2.1 PS3 supporting;
 * < 0.48 BS3 supporting; < 0.23 BS3 moderate; < 0.053 BS3 strong; otherwise none.
 * An abnormal readout can only earn PS3 levels and a normal readout only BS3 levels
 * (an abnormal readout that is *less* common among pathogenic controls earns nothing,
 * it does not become benign evidence). NaN gives 'none'.
 *
 * @example evidenceLevel(5.8333, 'abnormal') // → 'PS3 moderate'
 * @example evidenceLevel(350, 'abnormal')    // → 'PS3 strong' (not > 350)
 * @example evidenceLevel(0.1944, 'normal')   // → 'BS3 moderate'
 */
export function evidenceLevel(oddsPathValue: number, direction: 'abnormal' | 'normal'): EvidenceLevel {
  if (Number.isNaN(oddsPathValue)) return 'none';
  if (direction === 'abnormal') {
    if (oddsPathValue > 350) return 'PS3 very strong';
    if (oddsPathValue > 18.7) return 'PS3 strong';
    if (oddsPathValue > 4.3) return 'PS3 moderate';
    if (oddsPathValue > 2.1) return 'PS3 supporting';
    return 'none';
  }
  if (oddsPathValue < 0.053) return 'BS3 strong';
  if (oddsPathValue < 0.23) return 'BS3 moderate';
  if (oddsPathValue < 0.48) return 'BS3 supporting';
  return 'none';
}

/** Words that mark the pseudo-count note (read back by {@link evidenceForReadout}). */
const PSEUDO_COUNT_MARK = 'pseudo-count';

/**
 * Table 3 thresholds (Brnich et al. 2020) in thousandths, so that comparisons with a ratio of
 * integer counts are exact: 350 → 350000, 18.7 → 18700, …, 0.053 → 53.
 */
const PS3_THOUSANDTHS: Array<[number, EvidenceLevel]> = [
  [350_000, 'PS3 very strong'],
  [18_700, 'PS3 strong'],
  [4_300, 'PS3 moderate'],
  [2_100, 'PS3 supporting'],
];
const BS3_THOUSANDTHS: Array<[number, EvidenceLevel]> = [
  [53, 'BS3 strong'],
  [230, 'BS3 moderate'],
  [480, 'BS3 supporting'],
];

/**
 * Table 3 level of an OddsPath given as a ratio of non-negative integers (counts), compared
 * exactly: numerator/denominator > T  ⇔  1000·numerator > (1000·T)·denominator.
 * Same mapping as {@link evidenceLevel}; a zero denominator means an infinite OddsPath
 * (PS3 very strong for an abnormal readout, none for a normal one).
 *
 * @example evidenceLevelOfRatio(43, 10, 'abnormal') // → 'PS3 supporting' (exactly 4.3 is not > 4.3)
 */
export function evidenceLevelOfRatio(numerator: number, denominator: number, direction: 'abnormal' | 'normal'): EvidenceLevel {
  if (!(numerator >= 0 && denominator >= 0) || (numerator === 0 && denominator === 0)) return 'none';
  const scaled = 1000 * numerator;
  if (direction === 'abnormal') {
    if (denominator === 0) return 'PS3 very strong';
    for (const [threshold, level] of PS3_THOUSANDTHS) if (scaled > threshold * denominator) return level;
    return 'none';
  }
  if (denominator === 0) return 'none';
  for (const [threshold, level] of BS3_THOUSANDTHS) if (scaled < threshold * denominator) return level;
  return 'none';
}

/** Thresholds of Table 3 (Brnich et al. 2020), for sentences. */
const PS3_SUPPORTING_THRESHOLD = 2.1;
const BS3_SUPPORTING_THRESHOLD = 0.48;

const STRENGTH_RANK: Record<Strength, number> = { supporting: 1, moderate: 2, strong: 3, 'very strong': 4 };

/** Strength rank of a level: 0 for none, 1 supporting … 4 very strong. */
export function levelRank(level: EvidenceLevel): number {
  if (level === 'none') return 0;
  return STRENGTH_RANK[level.slice(4) as Strength];
}

/** The level limited to at most `max` strength, keeping its PS3/BS3 side. */
export function limitLevel(level: EvidenceLevel, max: Strength): EvidenceLevel {
  if (level === 'none' || levelRank(level) <= STRENGTH_RANK[max]) return level;
  return `${level.slice(0, 3)} ${max}` as EvidenceLevel;
}

/** An OddsPath in plain text: three significant figures (src/results/format.ts), 5.8333 → "5.83", 19 → "19.0". */
export function formatOddsPath(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  return fmt(x);
}

function isPathogenic(c: ControlClass): boolean {
  return c === 'pathogenic' || c === 'likely pathogenic';
}

/**
 * Calibrate one scope (an assay, or 'overall') against the known controls.
 *
 * Method (Brnich et al. 2020, Genome Med 12:3):
 * 1. 2×2 table: pathogenic + likely pathogenic vs benign + likely benign controls,
 *    by abnormal vs normal readout. Controls with readout null (indeterminate, mixed,
 *    not measured) are not counted (`counts.notCounted`). `totalControls` is the
 *    number of counted controls (without the pseudo-count).
 * 2. No pathogenic or no benign control counted: no OddsPath (null), level 'none'.
 * 3. Pseudo-count: one pathogenic control that reads normal and one benign control that
 *    reads abnormal are added to the readout sets, so that no posterior is 0 or 1.
 *    Variant chosen: by default ALWAYS added, and P1 counts the added pair. The paper's
 *    stated aim (no posterior of 0 or 1) only bites when a cell is zero, but adding the pair
 *    only then makes OddsPath non-monotone: 9 of 10 pathogenic abnormal with 1 of 10 benign
 *    abnormal gives 9.0 as observed, more than the better assay with 10 of 10 pathogenic
 *    abnormal and the same benign set, which gets the pair and 5.0. Added always, a better
 *    assay never earns less, and the result is never more optimistic than the raw counts
 *    (the PS3 OddsPath can only fall and the BS3 OddsPath only rise). With perfect separation
 *    both readings agree: OddsPath(PS3) = nP·(nB + 1)/(nP + 1), OddsPath(BS3) = (nB + 1)/(nB·(nP + 1)).
 *    Option `pseudoCount: 'when-any-cell-zero'` gives the other reading.
 * 4. OddsPath of each readout and its Table 3 level. With a = pathogenic abnormal,
 *    b = pathogenic normal, c = benign abnormal, d = benign normal (after the pseudo-count),
 *    the formula reduces to OddsPath(abnormal) = a·(c + d)/(c·(a + b)) and
 *    OddsPath(normal) = b·(c + d)/(d·(a + b)); levels are decided on these integers exactly
 *    ({@link evidenceLevelOfRatio}). `p1`, `p2Abnormal`, `p2Normal` are reported after the
 *    pseudo-count. An infinite OddsPath (no benign control reads normal) is reported as null.
 * 5. Count gate, its own rule (it does not follow from the arithmetic): with
 *    ≤ CALIBRATION.maxControlsForSupportingOnly (10) counted controls, at most supporting.
 * 6. Lab cap (gene-specific expert-panel rule), if set.
 * Every limitation is written into `notes` in plain words.
 *
 * @example
 * // 5 pathogenic controls all abnormal, 6 benign controls all normal:
 * calibrate('atpase', controls).oddsPathAbnormal // → 5.8333 ('PS3 moderate')
 * calibrate('atpase', controls).oddsPathNormal   // → 0.19444 ('BS3 moderate')
 */
export function calibrate(scope: string, controls: CalibrationControl[], options: CalibrateOptions = {}): Calibration {
  const rule = options.pseudoCount ?? DEFAULT_PSEUDO_COUNT_RULE;
  const counts = { pathogenicAbnormal: 0, pathogenicNormal: 0, benignAbnormal: 0, benignNormal: 0, notCounted: 0 };
  for (const control of controls) {
    if (control.readout === null) {
      counts.notCounted++;
      continue;
    }
    const pathogenic = isPathogenic(control.knownClass);
    if (control.readout === 'abnormal') {
      if (pathogenic) counts.pathogenicAbnormal++;
      else counts.benignAbnormal++;
    } else if (pathogenic) counts.pathogenicNormal++;
    else counts.benignNormal++;
  }
  const nPathogenic = counts.pathogenicAbnormal + counts.pathogenicNormal;
  const nBenign = counts.benignAbnormal + counts.benignNormal;
  const totalControls = nPathogenic + nBenign;
  const notes: string[] = [];

  if (counts.notCounted > 0) {
    notes.push(
      `${counts.notCounted} control${counts.notCounted === 1 ? '' : 's'} had no normal or abnormal readout ` +
        `(indeterminate, mixed or not measured) and ${counts.notCounted === 1 ? 'was' : 'were'} not counted.`,
    );
  }

  if (nPathogenic === 0 || nBenign === 0) {
    const missing =
      nPathogenic === 0 && nBenign === 0
        ? 'no pathogenic and no benign control'
        : nPathogenic === 0
          ? 'no pathogenic control'
          : 'no benign control';
    notes.push(
      `No OddsPath: ${missing} with a readout (${nPathogenic} pathogenic, ${nBenign} benign counted). ` +
        'Calibration needs both pathogenic and benign controls, so no evidence level can be given.',
    );
    return {
      scope,
      counts,
      totalControls,
      p1: null,
      p2Abnormal: null,
      p2Normal: null,
      oddsPathAbnormal: null,
      oddsPathNormal: null,
      levelAbnormal: 'none',
      levelNormal: 'none',
      notes,
    };
  }

  // 3. Pseudo-count.
  const anyCellZero =
    counts.pathogenicAbnormal === 0 || counts.pathogenicNormal === 0 || counts.benignAbnormal === 0 || counts.benignNormal === 0;
  const addPair = rule === 'always' || anyCellZero;
  const added = addPair ? 1 : 0;
  const pa = counts.pathogenicAbnormal;
  const pn = counts.pathogenicNormal + added;
  const ba = counts.benignAbnormal + added;
  const bn = counts.benignNormal;
  if (addPair) {
    notes.push(
      'One pathogenic control reading normal and one benign control reading abnormal were added to the counts ' +
        `(${PSEUDO_COUNT_MARK}, Brnich et al. 2020), so that no proportion is 0 or 1; P1 includes this added pair. ` +
        'This makes the OddsPath more cautious, most of all with few controls.',
    );
  }

  // 4. OddsPath and Table 3 levels, decided on integer counts so that a count table whose
  //    OddsPath equals a threshold exactly is never pushed across it by rounding.
  const p1 = (pa + pn) / (pa + pn + ba + bn);
  const p2Abnormal = pa / (pa + ba);
  const p2Normal = pn / (pn + bn);
  const abnormalRatio = { numerator: pa * (ba + bn), denominator: ba * (pa + pn) };
  const normalRatio = { numerator: pn * (ba + bn), denominator: bn * (pa + pn) };
  const oddsPathAbnormal = abnormalRatio.denominator > 0 ? abnormalRatio.numerator / abnormalRatio.denominator : null;
  const oddsPathNormal = normalRatio.denominator > 0 ? normalRatio.numerator / normalRatio.denominator : null;
  let levelAbnormal = evidenceLevelOfRatio(abnormalRatio.numerator, abnormalRatio.denominator, 'abnormal');
  let levelNormal = evidenceLevelOfRatio(normalRatio.numerator, normalRatio.denominator, 'normal');
  // An infinite OddsPath for a normal readout means every normal readout was pathogenic:
  // no BS3 evidence, and it is not a number JSON can carry.
  if (oddsPathNormal === null) {
    levelNormal = 'none';
    notes.push('No benign control read normal: a normal readout gives no BS3 evidence (OddsPath not finite).');
  }
  if (oddsPathAbnormal !== null && levelAbnormal === 'none') {
    notes.push(
      `OddsPath for an abnormal readout is ${formatOddsPath(oddsPathAbnormal)}, not above ${PS3_SUPPORTING_THRESHOLD} ` +
        'needed for PS3 supporting: an abnormal readout gives no PS3 evidence.',
    );
  }
  if (oddsPathNormal !== null && levelNormal === 'none') {
    notes.push(
      `OddsPath for a normal readout is ${formatOddsPath(oddsPathNormal)}, not below ${BS3_SUPPORTING_THRESHOLD} ` +
        'needed for BS3 supporting: a normal readout gives no BS3 evidence.',
    );
  }

  // 5. Count gate.
  const gate = CALIBRATION.maxControlsForSupportingOnly;
  if (totalControls <= gate) {
    const gatedAbnormal = limitLevel(levelAbnormal, 'supporting');
    const gatedNormal = limitLevel(levelNormal, 'supporting');
    const lowered = [
      gatedAbnormal !== levelAbnormal ? `${levelAbnormal} lowered to ${gatedAbnormal}` : '',
      gatedNormal !== levelNormal ? `${levelNormal} lowered to ${gatedNormal}` : '',
    ].filter(Boolean);
    notes.push(
      `Only ${totalControls} control${totalControls === 1 ? '' : 's'} with a readout: at most supporting evidence ` +
        `(Brnich et al. 2020 recommend at least ${gate + 1})` +
        (lowered.length > 0 ? `; ${lowered.join(', ')}.` : '.'),
    );
    levelAbnormal = gatedAbnormal;
    levelNormal = gatedNormal;
  }

  // 6. Lab cap.
  if (options.cap !== undefined) {
    const cappedAbnormal = limitLevel(levelAbnormal, options.cap);
    const cappedNormal = limitLevel(levelNormal, options.cap);
    const lowered = [
      cappedAbnormal !== levelAbnormal ? `${levelAbnormal} lowered to ${cappedAbnormal}` : '',
      cappedNormal !== levelNormal ? `${levelNormal} lowered to ${cappedNormal}` : '',
    ].filter(Boolean);
    notes.push(
      `The lab caps functional evidence for this gene at ${options.cap}` +
        (lowered.length > 0 ? `; ${lowered.join(', ')}.` : ' (no level was above the cap).'),
    );
    levelAbnormal = cappedAbnormal;
    levelNormal = cappedNormal;
  }

  return {
    scope,
    counts,
    totalControls,
    p1,
    p2Abnormal,
    p2Normal,
    oddsPathAbnormal,
    oddsPathNormal,
    levelAbnormal,
    levelNormal,
    notes,
  };
}

function scopeWords(scope: string): string {
  return scope === 'overall' ? 'the calibration of the call across assays' : `the ${scope} assay calibration`;
}

/** "3 of 5 pathogenic controls", or "none of 0 pathogenic controls" → "no pathogenic control". */
function ofControls(k: number, n: number, kind: string): string {
  if (n === 0) return `no ${kind} control`;
  return `${k} of ${n} ${kind} control${n === 1 ? '' : 's'}`;
}

/**
 * The evidence ceiling that applies to one variant's readout, with the counts behind it.
 *
 * Method: abnormal readout → `levelAbnormal`, normal readout → `levelNormal` of the
 * calibration (already gated and capped by {@link calibrate}); no readout → 'none'.
 * The sentence names the readout, the level, the OddsPath and the control counts, says
 * that this is the maximum strength the calibration supports for this readout, and that
 * it suggests evidence and never classifies the variant.
 *
 * @example
 * evidenceForReadout(calibrate('atpase', fivePathogenicSixBenign), 'abnormal').level // → 'PS3 moderate'
 */
export function evidenceForReadout(cal: Calibration, readout: Readout): { level: EvidenceLevel; sentence: string } {
  const closing = 'The calibration suggests a strength of functional evidence and never classifies the variant.';
  if (readout === null) {
    return {
      level: 'none',
      sentence:
        `No evidence level: this variant's readout is indeterminate, mixed or not measured, so ${scopeWords(cal.scope)} ` +
        `does not apply to it. ${closing}`,
    };
  }
  const c = cal.counts;
  const nPathogenic = c.pathogenicAbnormal + c.pathogenicNormal;
  const nBenign = c.benignAbnormal + c.benignNormal;
  const countText =
    readout === 'abnormal'
      ? `${ofControls(c.pathogenicAbnormal, nPathogenic, 'pathogenic')} and ${ofControls(c.benignAbnormal, nBenign, 'benign')} read abnormal`
      : `${ofControls(c.benignNormal, nBenign, 'benign')} and ${ofControls(c.pathogenicNormal, nPathogenic, 'pathogenic')} read normal`;
  const level = readout === 'abnormal' ? cal.levelAbnormal : cal.levelNormal;
  const odds = readout === 'abnormal' ? cal.oddsPathAbnormal : cal.oddsPathNormal;
  const side = readout === 'abnormal' ? 'PS3' : 'BS3';
  const readoutWords = readout === 'abnormal' ? 'Functionally abnormal readout' : 'Functionally normal readout';
  const pseudo = cal.notes.some((n) => n.includes(PSEUDO_COUNT_MARK));
  const oddsText =
    odds === null
      ? 'no OddsPath'
      : `OddsPath ${formatOddsPath(odds)}${pseudo ? ' with one misclassified control added to each readout set' : ''}`;

  let limitText = '';
  if (odds !== null) {
    const arithmetic = evidenceLevel(odds, readout);
    if (levelRank(level) < levelRank(arithmetic)) {
      const gated = cal.totalControls <= CALIBRATION.maxControlsForSupportingOnly;
      limitText =
        ` The OddsPath alone would give ${arithmetic}; it is limited by ` +
        (gated && levelRank(limitLevel(arithmetic, 'supporting')) === levelRank(level)
          ? `the small number of controls (${cal.totalControls}, at least ${CALIBRATION.maxControlsForSupportingOnly + 1} needed for more than supporting).`
          : "the lab's cap for this gene.");
    }
  }

  if (level === 'none') {
    const reason =
      odds === null
        ? cal.notes.find((n) => n.startsWith('No ')) ?? `${side} evidence cannot be estimated.`
        : `${oddsText} does not reach ${side} supporting (${readout === 'abnormal' ? `above ${PS3_SUPPORTING_THRESHOLD}` : `below ${BS3_SUPPORTING_THRESHOLD}`}).`;
    return {
      level,
      sentence:
        `${readoutWords}: ${scopeWords(cal.scope)} supports no ${side} evidence (${countText}). ${reason} ` +
        `This is the maximum strength the calibration supports for this readout. ${closing}`,
    };
  }
  return {
    level,
    sentence:
      `${readoutWords}: ${scopeWords(cal.scope)} supports at most ${level} (${oddsText}; ${countText}). ` +
      `This is the maximum strength the calibration supports for this readout.${limitText} ${closing}`,
  };
}
