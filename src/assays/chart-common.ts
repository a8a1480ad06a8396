/**
 * Vega-Lite building blocks for the per-variant assay charts: the variant's units beside the
 * WT units of the same batches. User text (variant and unit labels) goes in as data values only.
 */
import type { UnitResult } from '../results/types.js';
import type { AssayChartInput, ChartSpec } from './types.js';

/** Group colours and shapes: never colour alone (WT circles, variant triangles). */
export const GROUP_COLOURS = { WT: '#5f6b73', Variant: '#c2570c' } as const;

export function groupEncoding(): Record<string, unknown> {
  return {
    color: {
      field: 'group',
      type: 'nominal',
      title: null,
      scale: { domain: ['WT', 'Variant'], range: [GROUP_COLOURS.WT, GROUP_COLOURS.Variant] },
    },
  };
}

/** Flatten units' plot data, tagging each row with group ('WT' or 'Variant'), unit and batch. */
export function flattenUnits(units: UnitResult[], group: 'WT' | 'Variant', part: 'points' | 'curve'): Array<Record<string, unknown>> {
  const rows: Array<Record<string, unknown>> = [];
  for (const u of units) {
    for (const r of u.plot[part] ?? []) rows.push({ ...r, group, unit: `${u.unit} (${u.batch})`, batch: u.batch });
  }
  return rows;
}

interface UnitChartOptions {
  title: string;
  description: string;
  x: { field: string; title: string; reverse?: boolean; scaleType?: 'linear' | 'log' };
  y: { field: string; title: string };
  encodingExtra: Record<string, unknown>;
}

/** Points per unit with a fitted curve per unit, variant and WT overlaid, shapes by group. */
export function unitChart(input: AssayChartInput, o: UnitChartOptions): ChartSpec {
  const points = [...flattenUnits(input.wtUnits, 'WT', 'points'), ...flattenUnits(input.variantUnits, 'Variant', 'points')];
  const curve = [...flattenUnits(input.wtUnits, 'WT', 'curve'), ...flattenUnits(input.variantUnits, 'Variant', 'curve')];
  const x = { field: o.x.field, type: 'quantitative', title: o.x.title, scale: { reverse: o.x.reverse ?? false, type: o.x.scaleType ?? 'linear', zero: false } };
  const y = { field: o.y.field, type: 'quantitative', title: o.y.title };
  return {
    title: o.title,
    description: o.description,
    width: 420,
    height: 260,
    layer: [
      {
        data: { values: curve },
        mark: { type: 'line', strokeWidth: 1.5, opacity: 0.85 },
        encoding: { x, y, detail: { field: 'unit', type: 'nominal' }, strokeDash: { field: 'group', type: 'nominal', scale: { domain: ['WT', 'Variant'], range: [[4, 3], [1, 0]] }, title: null }, ...o.encodingExtra },
      },
      {
        data: { values: points },
        mark: { type: 'point', filled: true, size: 36, opacity: 0.75 },
        encoding: {
          x,
          y,
          shape: { field: 'group', type: 'nominal', scale: { domain: ['WT', 'Variant'], range: ['circle', 'triangle-up'] }, title: null },
          ...o.encodingExtra,
        },
      },
    ],
  };
}
