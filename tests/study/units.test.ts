import { describe, expect, it } from 'vitest';
import { tensionKPa } from '../../src/assays/force/inputs.js';
import { conversionFactor, lookupUnit, UNITS, type Quantity } from '../../src/study/units.js';

// Expected factors from SI definitions (BIPM SI Brochure, 9th ed. 2019: Table 7 prefixes
// milli 1e-3, micro 1e-6, nano 1e-9; Table 8: 1 min = 60 s, 1 h = 3600 s; 1 L = 1e-3 m³).
// Each row: value in `unit` expressed in the canonical unit.
const SI_CASES: [Quantity, string, number][] = [
  ['concentration', 'nM', 1e-3], // 1e-9 M / 1e-6 M
  ['concentration', 'mM', 1e3],
  ['concentration', 'M', 1e6],
  ['concentration', 'µM', 1],
  ['concentration', 'uM', 1],
  ['concentration', 'μM', 1], // Greek mu U+03BC
  ['velocity', 'nm/s', 1e-3],
  ['velocity', 'mm/s', 1e3],
  ['velocity', 'um/min', 1 / 60],
  ['time', 'min', 60],
  ['time', 'ms', 1e-3],
  ['time', 'h', 3600],
  ['tension', 'mN/mm2', 1], // 1e-3 N / 1e-6 m² = 1e3 Pa = 1 kPa (SI Brochure 2019)
  ['tension', 'mN/mm²', 1],
  ['tension', 'kN/m2', 1],
  ['tension', 'Pa', 1e-3],
  ['tension', 'N/mm2', 1e3], // 1 N / 1e-6 m² = 1 MPa
  ['length', 'nm', 1e-3],
  ['length', 'mm', 1e3],
  ['rate', '1/min', 1 / 60],
  ['rate', 's-1', 1],
  ['rate', 's⁻¹', 1],
  ['force', 'uN', 1e-3],
  ['force', 'N', 1e3],
  ['area', 'um2', 1e-6], // (1e-6 m)² / (1e-3 m)²
  ['area', 'cm2', 1e2],
  ['path', 'mm', 0.1],
];

describe('unit table against SI definitions', () => {
  it.each(SI_CASES)('%s: 1 %s = %f canonical', (q, unit, expected) => {
    expect(conversionFactor(q, unit)).toBeCloseTo(expected, 12);
    expect(Math.abs(conversionFactor(q, unit)! / expected - 1)).toBeLessThan(1e-12);
  });

  it('every canonical unit converts with factor 1 and is listed', () => {
    for (const q of Object.keys(UNITS) as Quantity[]) expect(conversionFactor(q, UNITS[q].canonical)).toBe(1);
  });

  it('unknown units and wrong case are not guessed', () => {
    expect(lookupUnit('concentration', 'mm')).toBeUndefined(); // mM means millimolar; 'mm' is a length
    expect(lookupUnit('concentration', 'ug/ml')).toBeUndefined();
    expect(lookupUnit('velocity', 'furlong/fortnight')).toBeUndefined();
    expect(conversionFactor('time', 'days')).toBeUndefined();
  });

  it('tension from force and area: 9 µN on 300 µm² is 30 kPa (computed from SI definitions)', () => {
    const forceMN = 9 * conversionFactor('force', 'uN')!;
    const areaMm2 = 300 * conversionFactor('area', 'um2')!;
    expect(tensionKPa(forceMN, areaMm2)).toBeCloseTo(30, 10);
  });
});
