/**
 * NIST StRD nonlinear regression datasets (itl.nist.gov/div898/strd/nls), as quoted in
 * NIST StRD [V]: data, both starts, certified values, certified SDs, RSS.
 */
import type { CurveModel } from '../../src/numeric/types.js';
import { parameterTuple, type ParameterTuple } from '../../src/numeric/models/parameters.js';

export interface NistCase {
  name: string;
  model: CurveModel;
  x: number[];
  y: number[];
  starts: [number[], number[]];
  certified: number[];
  certifiedSe: number[];
  certifiedRss: number;
}

/** Pairs "y x" from the REFERENCES text into arrays. */
function pairs(text: string): { x: number[]; y: number[] } {
  const x: number[] = [];
  const y: number[] = [];
  for (const pair of text.split(';')) {
    const values = pair.trim().split(/\s+/).map(Number);
    const [yv, xv] = values;
    if (values.length !== 2 || yv === undefined || xv === undefined) throw new Error(`not a "y x" pair: '${pair}'`);
    x.push(xv);
    y.push(yv);
  }
  return { x, y };
}

/** A model with finite-difference Jacobian (no gradient), as NIST's SE tolerance assumes; f gets b as a tuple of one value per parameter. */
function nistModel<const P extends readonly string[]>(id: string, params: P, f: (x: number, b: ParameterTuple<P['length']>) => number): CurveModel {
  return { id, formula: id, params, f: (x, b) => f(x, parameterTuple<P['length']>(b, params.length, id)), start: () => params.map(() => NaN) };
}

const misra1a = pairs('10.07 77.6; 14.73 114.9; 17.94 141.1; 23.93 190.8; 29.61 239.9; 35.18 289.0; 40.02 332.8; 44.82 378.4; 50.76 434.8; 55.05 477.3; 61.01 536.8; 66.40 593.1; 75.47 689.1; 81.78 760.0');
const rat42 = pairs('8.930 9; 10.800 14; 18.590 21; 22.330 28; 39.350 42; 56.110 57; 61.730 63; 64.620 70; 67.080 79');
const rat43 = pairs('16.08 1; 33.83 2; 65.80 3; 97.20 4; 191.55 5; 326.20 6; 386.87 7; 520.53 8; 590.03 9; 651.92 10; 724.93 11; 699.56 12; 689.96 13; 637.56 14; 717.41 15');
const boxbod = pairs('109 1; 149 2; 149 3; 191 5; 213 7; 224 10');
const mgh09 = pairs('1.957000E-01 4; 1.947000E-01 2; 1.735000E-01 1; 1.600000E-01 0.5; 8.440000E-02 0.25; 6.270000E-02 0.167; 4.560000E-02 0.125; 3.420000E-02 0.1; 3.230000E-02 0.0833; 2.350000E-02 0.0714; 2.460000E-02 0.0625');
const danwood = pairs('2.138 1.309; 3.421 1.471; 3.597 1.490; 4.340 1.565; 4.882 1.611; 5.660 1.680');

export const MGH09_SPURIOUS_RSS = 1.02734e-3; // NIST StRD [V]

export const NIST_CASES: NistCase[] = [
  {
    name: 'Misra1a',
    model: nistModel('misra1a', ['b1', 'b2'], (x, b) => b[0] * (1 - Math.exp(-b[1] * x))),
    ...misra1a,
    starts: [[500, 1e-4], [250, 5e-4]],
    certified: [2.3894212918e2, 5.5015643181e-4],
    certifiedSe: [2.7070075241e0, 7.2668688436e-6],
    certifiedRss: 1.2455138894e-1,
  },
  {
    name: 'Rat42',
    model: nistModel('rat42', ['b1', 'b2', 'b3'], (x, b) => b[0] / (1 + Math.exp(b[1] - b[2] * x))),
    ...rat42,
    starts: [[100, 1, 0.1], [75, 2.5, 0.07]],
    certified: [7.2462237576e1, 2.6180768402e0, 6.7359200066e-2],
    certifiedSe: [1.7340283401e0, 8.8295217536e-2, 3.4465663377e-3],
    certifiedRss: 8.0565229338e0,
  },
  {
    name: 'Rat43',
    model: nistModel('rat43', ['b1', 'b2', 'b3', 'b4'], (x, b) => b[0] / Math.pow(1 + Math.exp(b[1] - b[2] * x), 1 / b[3])),
    ...rat43,
    starts: [[100, 10, 1, 1], [700, 5, 0.75, 1.3]],
    certified: [6.9964151270e2, 5.2771253025e0, 7.5962938329e-1, 1.2792483859e0],
    certifiedSe: [1.6302297817e1, 2.0828735829e0, 1.9566123451e-1, 6.8761936385e-1],
    certifiedRss: 8.7864049080e3,
  },
  {
    name: 'BoxBOD',
    model: nistModel('boxbod', ['b1', 'b2'], (x, b) => b[0] * (1 - Math.exp(-b[1] * x))),
    ...boxbod,
    starts: [[1, 1], [100, 0.75]],
    certified: [2.1380940889e2, 5.4723748542e-1],
    certifiedSe: [1.2354515176e1, 1.0455993237e-1],
    certifiedRss: 1.1680088766e3,
  },
  {
    name: 'MGH09',
    model: nistModel('mgh09', ['b1', 'b2', 'b3', 'b4'], (x, b) => (b[0] * (x * x + x * b[1])) / (x * x + x * b[2] + b[3])),
    ...mgh09,
    starts: [[25, 39, 41.5, 39], [0.25, 0.39, 0.415, 0.39]],
    certified: [1.9280693458e-1, 1.9128232873e-1, 1.2305650693e-1, 1.3606233068e-1],
    certifiedSe: [1.1435312227e-2, 1.9633220911e-1, 8.0842031232e-2, 9.0025542308e-2],
    certifiedRss: 3.0750560385e-4,
  },
  {
    name: 'DanWood',
    model: nistModel('danwood', ['b1', 'b2'], (x, b) => b[0] * Math.pow(x, b[1])),
    ...danwood,
    starts: [[1, 5], [0.7, 4]],
    certified: [7.6886226176e-1, 3.8604055871e0],
    certifiedSe: [1.8281973860e-2, 5.1726610913e-2],
    certifiedRss: 4.3173084083e-3,
  },
];
