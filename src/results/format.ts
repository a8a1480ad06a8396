/**
 * The one number formatter of myofolio: result sentences (src/analysis/score.ts), pages, chart
 * descriptions and tables (src/charts/chart-def.ts re-exports it), the archive's words. results.csv
 * and results.json keep full-precision numbers. Pure; always '.' as the decimal mark.
 *
 * Conventions, the same everywhere:
 * - a true minus sign (U+2212 '−'), never a hyphen-minus;
 * - '—' for no value (null, undefined, NaN, ±Infinity);
 * - significant figures are kept, trailing zeros included ('1.10', not '1.1');
 * - an effect and its 95% CI share one precision: a ratio to 3 significant figures of the estimate,
 *   a difference to the decimals that show its WT-like band's half-width to 3 significant figures
 *   (a pCa50 band of ±0.1 gives 3 decimals: '+0.005', '−0.039 to 0.049');
 * - intervals are written 'low to high', which stays readable when either end is negative.
 */

/** Written for no value. */
export const NONE = '—';
/** The minus sign (U+2212). */
export const MINUS = '−';

export type EffectScale = 'ratio' | 'difference';

const isNum = (x: number | null | undefined): x is number => x !== null && x !== undefined && Number.isFinite(x);

/** Replace a leading hyphen-minus by the minus sign. Example: minus('-0.5') → '−0.5'. */
function minus(text: string): string {
  return text.startsWith('-') ? MINUS + text.slice(1) : text;
}

const SUPERSCRIPT: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };

/** Scientific form with a superscript exponent. Example: scientific(0.000123456, 3) → '1.23 × 10⁻⁴'. */
function scientific(x: number, digits: number): string {
  const [mantissa, exponent] = x.toExponential(Math.max(0, digits - 1)).split('e') as [string, string];
  const exp = String(Number(exponent)).replace(/[-0-9]/g, (ch) => SUPERSCRIPT[ch] ?? ch);
  return `${minus(mantissa)} × 10${exp}`;
}

/**
 * `digits` significant figures, trailing zeros kept; '—' for no value. Scientific form below 0.001
 * and from 1,000,000 on; whole numbers with more digits than `digits` are rounded, not written in
 * exponent form.
 * @example fmt(1.1) // → '1.10'
 * @example fmt(-0.0391) // → '−0.0391'
 * @example fmt(1234) // → '1230'
 * @example fmt(0.000123456) // → '1.23 × 10⁻⁴'
 * @example fmt(null) // → '—'
 */
export function fmt(x: number | null | undefined, digits = 3): string {
  if (!isNum(x)) return NONE;
  if (x === 0) return '0';
  const ax = Math.abs(x);
  if (ax < 1e-3 || ax >= 1e6) return scientific(x, digits);
  const s = x.toPrecision(digits);
  // toPrecision writes an exponent when the digits end before the decimal point (1234 → '1.23e+3').
  return minus(s.includes('e') ? String(Number(s)) : s);
}

/**
 * Decimals that show `x` to `digits` significant figures (0 for large values, at most 12).
 * @example decimalsFor(0.1, 3) // → 3 (0.100)
 * @example decimalsFor(1.459, 3) // → 2 (1.46)
 */
export function decimalsFor(x: number | null | undefined, digits = 3): number {
  if (!isNum(x) || x === 0) return digits - 1;
  // The exponent of x after rounding to `digits` figures (0.0999 rounds to 0.100).
  const exponent = Number(Math.abs(x).toExponential(Math.max(0, digits - 1)).split('e')[1]);
  return Math.min(12, Math.max(0, digits - 1 - exponent));
}

/**
 * Fixed decimals with the minus sign; '—' for no value. A value that rounds to zero is written
 * without a sign.
 * @example fixed(-0.0391, 3) // → '−0.039'
 * @example fixed(-0.0004, 3) // → '0.000'
 */
export function fixed(x: number | null | undefined, decimals: number): string {
  if (!isNum(x)) return NONE;
  const s = x.toFixed(decimals);
  return /^-0(\.0*)?$/.test(s) ? s.slice(1) : minus(s);
}

/** Fixed decimals with an explicit sign: '+0.012', '−0.012', '0.000'. */
export function signed(x: number | null | undefined, decimals: number): string {
  if (!isNum(x)) return NONE;
  const s = fixed(x, decimals);
  return s.startsWith(MINUS) || /^0(\.0*)?$/.test(s) ? s : `+${s}`;
}

/**
 * A p or q value: '< 0.001' below 0.001, else 2 significant figures (trailing zeros kept); '—' for none.
 * @example fmtP(0.01234) // → '0.012'
 * @example fmtP(1) // → '1.0'
 */
export function fmtP(p: number | null | undefined): string {
  if (!isNum(p)) return NONE;
  if (p < 0.001) return '< 0.001';
  return fmt(p, 2);
}

/**
 * An interval 'low to high' with each end formatted by `one` (default: 3 significant figures);
 * '—' when either end is missing.
 * @example fmtRange(-0.0391, 0.0492, (x) => fixed(x, 3)) // → '−0.039 to 0.049'
 */
export function fmtRange(lo: number | null | undefined, hi: number | null | undefined, one: (x: number) => string = (x) => fmt(x)): string {
  if (!isNum(lo) || !isNum(hi)) return NONE;
  return `${one(lo)} to ${one(hi)}`;
}

/** A confidence interval at 3 significant figures per end (charts' tables); see fmtEffectCi for effects. */
export function fmtCi(lo: number | null | undefined, hi: number | null | undefined): string {
  return fmtRange(lo, hi);
}

/**
 * Decimals of an effect, its CI and its band on the page: a ratio to 3 significant figures of the
 * estimate; a difference to the decimals that show the band's half-width to 3 significant figures
 * (without a band, 3 significant figures of the estimate).
 * @example effectDecimals('ratio', 1.459) // → 2
 * @example effectDecimals('difference', 0.00505, [-0.1, 0.1]) // → 3
 */
export function effectDecimals(scale: EffectScale, estimate: number | null | undefined, band?: readonly [number, number]): number {
  if (scale === 'difference' && band && isNum(band[0]) && isNum(band[1]) && band[1] > band[0]) return decimalsFor((band[1] - band[0]) / 2, 3);
  return decimalsFor(estimate, 3);
}

/**
 * An effect on its scale: a ratio as '1.46×', a difference with its sign, '+0.172'; '—' for none.
 * The decimals default to effectDecimals(scale, x, band).
 * @example fmtEffect(1.459, 'ratio') // → '1.46×'
 * @example fmtEffect(0.00505, 'difference', [-0.1, 0.1]) // → '+0.005'
 */
export function fmtEffect(x: number | null | undefined, scale: EffectScale, band?: readonly [number, number], decimals?: number): string {
  if (!isNum(x)) return NONE;
  const d = decimals ?? effectDecimals(scale, x, band);
  return scale === 'ratio' ? `${fixed(x, d)}×` : signed(x, d);
}

/**
 * An effect's 95% CI at the estimate's precision, 'low to high' without signs on positive ends.
 * @example fmtEffectCi(1.31, 1.625, 'ratio', 1.459) // → '1.31 to 1.63'
 * @example fmtEffectCi(-0.0391, 0.0492, 'difference', 0.00505, [-0.1, 0.1]) // → '−0.039 to 0.049'
 */
export function fmtEffectCi(lo: number | null | undefined, hi: number | null | undefined, scale: EffectScale, estimate: number | null | undefined, band?: readonly [number, number]): string {
  const d = effectDecimals(scale, estimate, band);
  return fmtRange(lo, hi, (x) => fixed(x, d));
}

/**
 * A WT-like band: a difference band at its effect's decimals; a ratio band at the fewest decimals
 * that write both edges as configured (up to 3 significant figures).
 * @example fmtBand([0.8, 1.25], 'ratio') // → '0.80 to 1.25'
 * @example fmtBand([-0.1, 0.1], 'difference') // → '−0.100 to 0.100'
 */
export function fmtBand(band: readonly [number, number] | null | undefined, scale: EffectScale): string {
  if (!band) return NONE;
  const d =
    scale === 'difference'
      ? effectDecimals('difference', null, band)
      : Math.max(...band.map((edge) => {
          const s = isNum(edge) ? String(Number(edge.toPrecision(3))) : '';
          return s.includes('.') && !s.includes('e') ? s.split('.')[1]!.length : 0;
        }));
  return fmtRange(band[0], band[1], (x) => fixed(x, d));
}

/**
 * An absolute value (a mean in the metric's unit) at the precision of its scale: the decimals of
 * its effect for a difference metric (so that the two means and their difference agree), 3
 * significant figures for a ratio metric; with the unit when there is one.
 * @example fmtValue(6.636, 's⁻¹', 'ratio') // → '6.64 s⁻¹'
 * @example fmtValue(5.962, '', 'difference', [-0.1, 0.1]) // → '5.962'
 */
export function fmtValue(x: number | null | undefined, unit: string, scale: EffectScale, band?: readonly [number, number]): string {
  if (!isNum(x)) return NONE;
  const text = scale === 'difference' ? fixed(x, effectDecimals('difference', x, band)) : fmt(x);
  return unit ? `${text} ${unit}` : text;
}
