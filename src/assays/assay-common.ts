/**
 * Small helpers shared by the motility, force, turnover and NADH modules: reading
 * assay settings with their defaults, grouping, and plain summary statistics
 * (grouping into units and source ranges live in ./common.ts). Pure: no I/O, no clock, no randomness.
 */
import { ASSAY } from '../defaults.js';
import { mean } from '../stats/descriptive.js';

export type AssaySettingName = keyof typeof ASSAY;

/** Settings as the manifest gives them (study.settings or an input file's settings). */
export type SettingsBag = Record<string, number | string | boolean> | undefined;

/**
 * The value of a numeric assay setting: the first finite number among the bags given
 * (later bags are more specific and win), else the default from src/defaults.ts
 * (`ASSAY`). Numeric strings such as "0.1" are accepted.
 * @example assaySetting('motilityImmobileUmS', { motilityImmobileUmS: 0.1 }) // → 0.1
 */
export function assaySetting(name: AssaySettingName, ...bags: SettingsBag[]): number {
  for (let i = bags.length - 1; i >= 0; i--) {
    const raw = bags[i]?.[name];
    const value = typeof raw === 'string' && raw.trim() !== '' ? Number(raw) : raw;
    if (typeof value === 'number' && Number.isFinite(value)) return value;
  }
  return ASSAY[name];
}

/**
 * Group items by a string key, keeping first-appearance order.
 * @example groupBy(['a1','b1','a2'], (s) => s[0]) // → Map { 'a' => ['a1','a2'], 'b' => ['b1'] }
 */
export function groupBy<T>(items: readonly T[], key: (item: T) => string): Map<string, T[]> {
  const out = new Map<string, T[]>();
  for (const item of items) {
    const k = key(item);
    const list = out.get(k);
    if (list) list.push(item);
    else out.set(k, [item]);
  }
  return out;
}

/**
 * Ordinary least-squares straight line y = intercept + slope·x (closed form, centred
 * sums for accuracy), with the slope's standard error when n > 2.
 * Method: textbook simple linear regression (e.g. Draper & Smith, Applied Regression
 * Analysis, 3rd ed., §1.2), the same as R's `lm(y ~ x)`.
 * @example straightLineFit([0, 1, 2, 3], [1, 3, 5, 7]) // → { slope: 2, intercept: 1, slopeSe: 0, n: 4 }
 */
export function straightLineFit(
  x: readonly number[],
  y: readonly number[],
): { slope: number; intercept: number; slopeSe: number; n: number } {
  const n = x.length;
  const mx = mean(x);
  const my = mean(y);
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    sxx += (x[i] - mx) * (x[i] - mx);
    sxy += (x[i] - mx) * (y[i] - my);
  }
  const slope = sxx > 0 ? sxy / sxx : NaN;
  const intercept = my - slope * mx;
  let rss = 0;
  for (let i = 0; i < n; i++) {
    const r = y[i] - intercept - slope * x[i];
    rss += r * r;
  }
  const slopeSe = n > 2 && sxx > 0 ? Math.sqrt(rss / (n - 2) / sxx) : NaN;
  return { slope, intercept, slopeSe, n };
}

/** Round for plot data so chart specs stay small and deterministic (12 significant digits). */
export function roundForPlot(value: number): number {
  return Number.isFinite(value) ? Number(value.toPrecision(12)) : value;
}
