/**
 * The one unit table of myofolio. Every unit a study may use is listed here with its
 * size in SI units; a value is converted to the canonical unit of its quantity by
 * `value × si(unit) / si(canonical)`.
 *
 * Canonical units (see src/study/types.ts): concentration µM, velocity µm/s, time s,
 * tension kPa (= mN/mm² = kN/m²), length µm, rate s⁻¹, force mN, area mm², optical path cm.
 *
 * Source of the SI sizes: BIPM, The International System of Units (SI Brochure, 9th ed., 2019),
 * Table 7 (SI prefixes) and Table 8 (non-SI units accepted for use with the SI: min, h).
 * The litre is 1e-3 m³, so 1 M = 1 mol/L = 1e3 mol/m³.
 *
 * Unknown units are an error, never a guess: `lookupUnit` returns undefined.
 */

export type Quantity =
  | 'concentration'
  | 'velocity'
  | 'time'
  | 'tension'
  | 'length'
  | 'rate'
  | 'force'
  | 'area'
  | 'path';

export interface UnitDef {
  /** The symbol shown in messages and the README, e.g. 'µM'. */
  symbol: string;
  /** Size in coherent SI units of the quantity (mol/m³, m/s, s, Pa, m, s⁻¹, N, m², m). */
  si: number;
  /** Other spellings accepted in headers and the manifest (ASCII 'u' for µ is added automatically). */
  aliases: string[];
}

export interface QuantityDef {
  canonical: string;
  /** What the quantity is, for messages. */
  label: string;
  units: UnitDef[];
}

/** The unit table. `si` values are exact decimal definitions from the SI Brochure. */
export const UNITS: Record<Quantity, QuantityDef> = {
  concentration: {
    canonical: 'µM',
    label: 'concentration',
    units: [
      { symbol: 'M', si: 1e3, aliases: ['mol/L', 'mol/l'] },
      { symbol: 'mM', si: 1, aliases: ['mmol/L', 'mmol/l'] },
      { symbol: 'µM', si: 1e-3, aliases: ['µmol/L', 'µmol/l'] },
      { symbol: 'nM', si: 1e-6, aliases: ['nmol/L', 'nmol/l'] },
    ],
  },
  velocity: {
    canonical: 'µm/s',
    label: 'velocity',
    units: [
      { symbol: 'mm/s', si: 1e-3, aliases: [] },
      { symbol: 'µm/s', si: 1e-6, aliases: ['µm s-1', 'µm*s-1'] },
      { symbol: 'nm/s', si: 1e-9, aliases: ['nm s-1', 'nm*s-1'] },
      { symbol: 'µm/min', si: 1e-6 / 60, aliases: [] },
    ],
  },
  time: {
    canonical: 's',
    label: 'time',
    units: [
      { symbol: 'ms', si: 1e-3, aliases: [] },
      { symbol: 's', si: 1, aliases: ['sec'] },
      { symbol: 'min', si: 60, aliases: [] },
      { symbol: 'h', si: 3600, aliases: ['hr'] },
    ],
  },
  tension: {
    canonical: 'kPa',
    label: 'tension (force per cross-sectional area)',
    units: [
      { symbol: 'Pa', si: 1, aliases: ['N/m²'] },
      { symbol: 'kPa', si: 1e3, aliases: ['mN/mm²', 'kN/m²'] },
      { symbol: 'MPa', si: 1e6, aliases: ['N/mm²'] },
    ],
  },
  length: {
    canonical: 'µm',
    label: 'length',
    units: [
      { symbol: 'mm', si: 1e-3, aliases: [] },
      { symbol: 'µm', si: 1e-6, aliases: ['micron'] },
      { symbol: 'nm', si: 1e-9, aliases: [] },
    ],
  },
  rate: {
    canonical: '1/s',
    label: 'rate',
    units: [
      { symbol: '1/s', si: 1, aliases: ['s⁻¹', 's-1', 's^-1', '/s', 'per s', 'per_s', 'Hz'] },
      { symbol: '1/min', si: 1 / 60, aliases: ['min⁻¹', 'min-1', 'min^-1', '/min', 'per min', 'per_min'] },
    ],
  },
  force: {
    canonical: 'mN',
    label: 'force',
    units: [
      { symbol: 'N', si: 1, aliases: [] },
      { symbol: 'mN', si: 1e-3, aliases: [] },
      { symbol: 'µN', si: 1e-6, aliases: [] },
      { symbol: 'nN', si: 1e-9, aliases: [] },
    ],
  },
  area: {
    canonical: 'mm²',
    label: 'cross-sectional area',
    units: [
      { symbol: 'mm²', si: 1e-6, aliases: [] },
      { symbol: 'µm²', si: 1e-12, aliases: [] },
      { symbol: 'cm²', si: 1e-4, aliases: [] },
    ],
  },
  path: {
    canonical: 'cm',
    label: 'optical path length',
    units: [
      { symbol: 'cm', si: 1e-2, aliases: [] },
      { symbol: 'mm', si: 1e-3, aliases: [] },
    ],
  },
};

/**
 * Normalise a unit spelling for lookup: trims, drops spaces around '/', maps the micro sign
 * (U+00B5) and Greek mu (U+03BC) to 'u', superscript ² and ⁻¹ to ASCII, and '^2' to '2'.
 * Case is kept (mM ≠ MM).
 */
export function normaliseUnitText(text: string): string {
  return text
    .trim()
    .replace(/[\u00b5\u03bc]/g, 'u')
    .replace(/²/g, '2')
    .replace(/\^2/g, '2')
    .replace(/⁻¹/g, '-1')
    .replace(/\s*\/\s*/g, '/')
    .replace(/\s+/g, ' ');
}

/**
 * Find a unit of a quantity by any accepted spelling; undefined when unknown.
 * @example lookupUnit('concentration', 'uM')?.symbol // 'µM'
 */
export function lookupUnit(quantity: Quantity, text: string): UnitDef | undefined {
  const wanted = normaliseUnitText(text);
  for (const unit of UNITS[quantity].units) {
    for (const spelling of [unit.symbol, ...unit.aliases]) {
      if (normaliseUnitText(spelling) === wanted) return unit;
    }
  }
  return undefined;
}

/** The accepted symbols of a quantity, for messages and the README, e.g. 'M, mM, µM, nM'. */
export function unitChoices(quantity: Quantity): string[] {
  return UNITS[quantity].units.map((u) => u.symbol);
}

/**
 * Factor that converts a value in `unit` to the canonical unit of `quantity`:
 * si(unit) / si(canonical). Method: ratio of SI sizes (SI Brochure 2019, Table 7 prefixes).
 * @example conversionFactor('velocity', 'nm/s') // 0.001 (nm/s → µm/s)
 * @example conversionFactor('time', 'min') // 60
 */
export function conversionFactor(quantity: Quantity, unitText: string): number | undefined {
  const unit = lookupUnit(quantity, unitText);
  if (!unit) return undefined;
  const canonical = lookupUnit(quantity, UNITS[quantity].canonical);
  if (!canonical) throw new Error(`unit table: canonical unit of ${quantity} is missing`);
  // Exact decimal ratio: round away binary noise (1e-9/1e-6 = 0.0010000000000000002).
  return Number((unit.si / canonical.si).toPrecision(15));
}
