/**
 * WT-like band of a metric derived from the benign controls' effects (when the lab asks for it:
 * manifest thresholds.bandsFromBenignControls).
 */
import { fmt } from '../results/format.js';
import { CALIBRATION } from '../defaults.js';
import { mean, sd } from '../stats/descriptive.js';
import { tQuantile } from '../stats/distributions.js';

/**
 * Fewest benign controls with an effect from which a band is derived (CALIBRATION in src/defaults.ts).
 * Three is the fewest that give a sample SD with two degrees of freedom (with two, the
 * t quantile is 12.7 and the band is uselessly wide).
 */
export const MIN_BENIGN_CONTROLS_FOR_BAND = CALIBRATION.minBenignControlsForBand;

/** Coverage of the prediction interval used as the band (CALIBRATION in src/defaults.ts). */
export const BENIGN_BAND_LEVEL = CALIBRATION.benignBandLevel;

export type DerivedBand =
  | {
      band: [number, number];
      /** How the band was derived, in words, with its numbers (for the methods page and bandSource). */
      rule: string;
      /** Benign control effects used. */
      n: number;
    }
  | {
      band: null;
      /** Why no band was derived. */
      reason: string;
      n: number;
    };

export interface BandOptions {
  /**
   * A band the derived band must contain, e.g. the default band of the metric: the result is
   * the union of both, so that a few tightly clustered benign controls cannot shrink the
   * WT-like range below what the lab otherwise uses.
   */
  atLeast?: [number, number];
}


/**
 * WT-like band from the effects of benign controls (variant/WT ratios or variant − WT differences).
 *
 * Method: the two-sided 95% prediction interval for the effect of one more benign variant,
 * assuming the benign effects are a normal sample on the comparison scale:
 *   centre ± t(0.975, n − 1) · s · √(1 + 1/n),
 * with centre and s the mean and sample SD of the effects, on the log scale for ratio metrics
 * (then exponentiated, so the band is asymmetric around the geometric mean) and directly for
 * difference metrics. Source: the normal-theory prediction interval (Hahn & Meeker,
 * Statistical Intervals, Wiley 1991, ch. 4; from memory). The interval is then widened to
 * contain "no change" (ratio 1, difference 0), since WT itself is WT-like, and, when
 * `options.atLeast` is given, to contain that band too.
 *
 * Why this rule: the band should hold where a variant without functional effect lands; a
 * prediction interval answers exactly that and, unlike mean ± 2 SD, widens honestly when the SD
 * comes from few controls (factor 4.97 SD with 3 controls, 2.37 with 10), so a chance-tight set
 * of benign controls does not make WT-like variants look abnormal. Its price: with few controls
 * the band is wide, which makes 'within WT range' easier to reach; the count gate of the
 * calibration (≤ 10 controls: at most supporting) limits what that can earn.
 *
 * Effects that are not finite (and ratios ≤ 0) are left out and said so. Fewer than
 * {@link MIN_BENIGN_CONTROLS_FOR_BAND} usable effects → `band: null` with the reason.
 *
 * @example
 * bandFromBenignControls([0.95, 1.0, 1.05], 'ratio').band
 * // → [0.77920, 1.28122]: logs −0.051293, 0, 0.048790; mean −0.000834, SD 0.050047;
 * //   half-width t(0.975, 2)·SD·√(4/3) = 4.302653·0.050047·1.154701 = 0.248647
 */
export function bandFromBenignControls(
  effects: number[],
  scale: 'ratio' | 'difference',
  options: BandOptions = {},
): DerivedBand {
  const usable = effects.filter((e) => Number.isFinite(e) && (scale === 'difference' || e > 0));
  const leftOut = effects.length - usable.length;
  const leftOutText =
    leftOut > 0 ? ` ${leftOut} effect${leftOut === 1 ? '' : 's'} left out (not a finite${scale === 'ratio' ? ' positive' : ''} number).` : '';
  const n = usable.length;
  if (n < MIN_BENIGN_CONTROLS_FOR_BAND) {
    return {
      band: null,
      n,
      reason:
        `only ${n} benign control${n === 1 ? '' : 's'} with an effect; at least ${MIN_BENIGN_CONTROLS_FOR_BAND} are needed ` +
        `to derive a WT-like band from benign controls.${leftOutText}`,
    };
  }

  const values = scale === 'ratio' ? usable.map(Math.log) : usable;
  const centre = mean(values);
  const spread = sd(values);
  const t = tQuantile(1 - (1 - BENIGN_BAND_LEVEL) / 2, n - 1);
  const halfWidth = t * spread * Math.sqrt(1 + 1 / n);
  const back = scale === 'ratio' ? Math.exp : (x: number) => x;
  const none = scale === 'ratio' ? 1 : 0;
  let low = back(centre - halfWidth);
  let high = back(centre + halfWidth);
  const interval: [number, number] = [low, high];

  const widened: string[] = [];
  if (none < low || none > high) {
    low = Math.min(low, none);
    high = Math.max(high, none);
    widened.push(`no change (${scale === 'ratio' ? 'ratio 1' : 'difference 0'})`);
  }
  if (options.atLeast) {
    const [a, b] = options.atLeast;
    if (a < low || b > high) {
      low = Math.min(low, a);
      high = Math.max(high, b);
      widened.push(`the default band ${fmt(a)} to ${fmt(b)}`);
    }
  }

  const percent = Math.round(BENIGN_BAND_LEVEL * 100);
  const scaleWords = scale === 'ratio' ? 'of the log ratios, back-transformed' : 'of the differences';
  const rule =
    `Derived from ${n} benign controls: ${percent}% prediction interval for one more benign variant, ` +
    `mean ± t(${1 - (1 - BENIGN_BAND_LEVEL) / 2}, ${n - 1}) × SD × √(1 + 1/${n}) ${scaleWords} ` +
    `(${fmt(interval[0])} to ${fmt(interval[1])})` +
    (widened.length > 0 ? `, widened to include ${widened.join(' and ')}` : '') +
    `: band ${fmt(low)} to ${fmt(high)}.${leftOutText}`;
  return { band: [low, high], rule, n };
}
