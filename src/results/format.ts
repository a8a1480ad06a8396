/**
 * Number formatting for the generated call sentences (src/analysis/score.ts). The pages' tables and
 * chart descriptions use src/charts/chart-def.ts, which differs in small ways ('—' for no value,
 * p below 0.0001); results.csv writes full-precision numbers. Pure; always '.' as decimal mark.
 */

/** Format to `digits` significant figures, without exponent for everyday magnitudes. Example: fmt(1.23456) → '1.23'. */
export function fmt(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return 'n/a';
  if (x === 0) return '0';
  const ax = Math.abs(x);
  if (ax >= 1e6 || ax < 1e-4) return x.toExponential(digits - 1);
  const s = x.toPrecision(digits);
  return s.includes('e') ? String(Number(s)) : s;
}

/** Format a p or q value: '< 0.001' below 0.001, else 2 significant figures. Example: fmtP(0.0123) → '0.012'. */
export function fmtP(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return 'n/a';
  if (p < 0.001) return '< 0.001';
  return fmt(p, 2);
}

/** Format an effect on its scale: ratios as '1.32×', differences with a sign, e.g. '+0.12'. */
export function fmtEffect(x: number | null | undefined, scale: 'ratio' | 'difference'): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return 'n/a';
  if (scale === 'ratio') return `${fmt(x)}×`;
  return `${x > 0 ? '+' : x < 0 ? '−' : ''}${fmt(Math.abs(x))}`;
}
