/**
 * Property-based tests (fast-check, fixed seed): the CSV loader never throws and accounts for
 * every data row; unit conversion round-trips and keeps order; the normaliser never throws and
 * accounts for every variant unit. Invariants are common practice, no source.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { compareAssay } from '../../src/analysis/normalise.js';
import type { MetricDef, UnitResult } from '../../src/results/types.js';
import { parseCsv } from '../../src/study/csv.js';
import { loadStudy } from '../../src/study/load.js';
import { readManifest } from '../../src/study/manifest.js';
import { readRows } from '../../src/study/rows.js';
import type { Issue } from '../../src/study/types.js';
import { UNITS, conversionFactor, type Quantity } from '../../src/study/units.js';
import { baseManifest } from '../study/fixtures.js';

const SEED = 20250301;

// ---------------------------------------------------------------- CSV loader
const cellText = fc.oneof(
  fc.constantFrom('WT', 'R2Q', 'K4E', 'p.Arg2Gln', 'nobody', 'w1', 'p1', 'B1', 'B2', '', ' ', '0', '50', '2.6', '-1', '1e3', '1,5', 'NaN', 'Infinity', 'NA', '=1+1', '"', '""', '\u00b5M'),
  fc.string({ maxLength: 8 }),
  fc.string({ unit: 'binary', maxLength: 6 }),
  fc.double({ noNaN: false }).map(String),
);
const HEADERS = ['variant', 'unit', 'batch', 'actin (uM)', 'rate (1/s)', 'replicate', 'actin', 'rate (per fortnight)', 'extra'];

const csvFile = fc
  .record({
    header: fc.shuffledSubarray(HEADERS, { minLength: 0, maxLength: 7 }),
    rows: fc.array(fc.array(cellText, { minLength: 0, maxLength: 8 }), { maxLength: 12 }),
    delimiter: fc.constantFrom(',', ';'),
    eol: fc.constantFrom('\n', '\r\n', '\r'),
    bom: fc.boolean(),
    quoteAll: fc.boolean(),
    comment: fc.boolean(),
    trailingEol: fc.boolean(),
  })
  .map((f) => {
    const q = (c: string) => (f.quoteAll || /[",;\r\n]/.test(c) ? `"${c.replace(/"/g, '""')}"` : c);
    const lines = [...(f.comment ? ['# comment'] : []), f.header.map(q).join(f.delimiter), ...f.rows.map((r) => r.map(q).join(f.delimiter))];
    return { ...f, text: (f.bom ? '\uFEFF' : '') + lines.join(f.eol) + (f.trailingEol ? f.eol : '') };
  });

/** A raw (possibly broken) file: arbitrary characters with quotes and delimiters mixed in. */
const rawFile = fc.array(fc.oneof(fc.constantFrom(',', ';', '"', '\n', '\r', '\r\n', '#', 'WT', 'B1', '1'), fc.string({ maxLength: 4 })), { maxLength: 60 }).map((parts) => 'variant,preparation,batch,actin (uM),rate (1/s)\n' + parts.join(''));

describe('CSV loader properties', () => {
  const m = baseManifest();
  const parsed = readManifest(JSON.stringify(m), 'study.json');
  const manifest = parsed.manifest!;
  const first = manifest.files[0];
  if (!first) throw new Error('the base manifest has no file');
  const spec = first;

  function account(text: string): void {
    const table = parseCsv(text, 'rates.csv');
    const issues: Issue[] = [...table.issues];
    const got = readRows('atpase-rates', table, spec, 'rates.csv', manifest.byLabel, issues);
    const used = new Set((got.rows as Array<{ at: { line: number } }>).map((r) => r.at.line));
    const headerLine = table.header?.line;
    const headerBroken = issues.some((i) => i.severity === 'error' && (i.at.line === undefined || i.at.line === headerLine) && i.code !== 'csv.quotes');
    let accounted = 0;
    table.rows.forEach((row, k) => {
      const next = table.rows[k + 1]?.line ?? Infinity;
      const flagged = issues.some((i) => i.at.file === 'rates.csv' && i.at.line !== undefined && i.at.line >= row.line && i.at.line < next);
      if (used.has(row.line) || flagged || headerBroken) accounted++;
      else expect.fail(`row at line ${row.line} ${JSON.stringify(row.cells)} was neither used nor reported\n${JSON.stringify(text)}`);
    });
    expect(accounted).toBe(table.rows.length);
    expect(got.rowCount).toBe(table.rows.length);
  }

  it('well-formed-ish tables: never throws; every data row is used or reported', () => {
    fc.assert(fc.property(csvFile, (f) => account(f.text)), { seed: SEED, numRuns: 300 });
  });

  it('raw broken text: never throws; every data row is used or reported', () => {
    fc.assert(fc.property(rawFile, (text) => account(text)), { seed: SEED, numRuns: 300 });
  });

  it('loadStudy never throws on arbitrary bytes as a CSV file or as the manifest', () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 200 }), fc.boolean(), (bytes, asManifest) => {
        const o = asManifest ? loadStudy({ manifest: bytes, files: {} }) : loadStudy({ manifest: JSON.stringify(m), files: { 'rates.csv': bytes } });
        expect(Array.isArray(o.issues)).toBe(true);
        if (!o.study) expect(o.issues.some((i) => i.severity === 'error')).toBe(true);
      }),
      { seed: SEED, numRuns: 300 },
    );
  });
});

// ---------------------------------------------------------------- units
describe('unit conversion properties', () => {
  const pairs = (Object.keys(UNITS) as Quantity[]).flatMap((q) => UNITS[q].units.map((u) => [q, u.symbol] as const));
  const finite = fc.double({ min: -1e12, max: 1e12, noNaN: true });

  it('every factor is finite and positive; converting there and back returns the value', () => {
    fc.assert(
      fc.property(fc.constantFrom(...pairs), finite, ([q, u], x) => {
        const f = conversionFactor(q, u)!;
        expect(Number.isFinite(f) && f > 0).toBe(true);
        const back = (x * f) / f;
        // Relative 1e-12, plus an absolute 1e-300 for subnormal inputs that underflow when scaled.
        expect(Math.abs(back - x)).toBeLessThanOrEqual(Math.abs(x) * 1e-12 + 1e-300);
      }),
      { seed: SEED, numRuns: 500 },
    );
  });

  it('conversion keeps order (monotonic increasing)', () => {
    fc.assert(
      fc.property(fc.constantFrom(...pairs), finite, finite, ([q, u], a, b) => {
        const f = conversionFactor(q, u)!;
        if (a < b) expect(a * f).toBeLessThanOrEqual(b * f);
      }),
      { seed: SEED, numRuns: 500 },
    );
  });

  it('between two units of one quantity, factors compose (u→canonical→v equals u→v)', () => {
    for (const q of Object.keys(UNITS) as Quantity[]) {
      for (const u of UNITS[q].units) {
        const f = conversionFactor(q, u.symbol)!;
        // SI sizes from the unit table: f = si(u)/si(canonical) (BIPM SI Brochure 2019, Table 7).
        const canon = UNITS[q].units.find((x) => conversionFactor(q, x.symbol) === 1)!;
        expect(f).toBeCloseTo(u.si / canon.si, 12);
      }
    }
  });
});

// ---------------------------------------------------------------- normaliser
describe('normaliser properties', () => {
  const metrics: MetricDef[] = [
    { id: 'kcat', label: 'kcat', unit: 's⁻¹', scale: 'ratio', hyper: 'up', primary: true, description: '' },
    { id: 'shift', label: 'shift', unit: '', scale: 'difference', hyper: 'up', primary: false, description: '' },
  ];
  const value = fc.oneof(fc.constantFrom(NaN, 0, -1, Infinity, -Infinity, null, 1e-300, 1e300), fc.double({ min: -10, max: 10 }), fc.double({ min: 0.01, max: 100, noNaN: true }));
  const unit = fc.record({
    variant: fc.constantFrom('WT', 'A', 'B'),
    batch: fc.constantFrom('B1', 'B2', 'B3'),
    kcat: value,
    shift: value,
    excluded: fc.constantFrom(undefined, undefined, undefined, 'manifest'),
  });

  /** Unit results from generated specs, normalised against WT: the shared set-up of the two properties below. */
  function normaliseSpecs(specs: Array<{ variant: string; batch: string; kcat: number | null; shift: number | null; excluded?: string }>) {
    const units: UnitResult[] = specs.map((s, i) => ({
      assay: 'atpase', variant: s.variant, unit: `u${i}`, batch: s.batch,
      metrics: { kcat: s.kcat, shift: s.shift }, flags: [], nTechnical: 1, plot: { points: [] }, source: [],
      ...(s.excluded ? { excluded: s.excluded } : {}),
    }));
    const out = compareAssay('atpase', metrics, units, {
      confidenceLevel: 0.95,
      bands: { 'atpase.kcat': [0.8, 1.25], 'atpase.shift': [-0.1, 0.1] },
      variants: [{ id: 'WT', isWT: true }, { id: 'A', isWT: false }, { id: 'B', isWT: false }],
    });
    return { units, out };
  }

  it('never throws; every variant unit without a metric value is named in a flag', () => {
    fc.assert(
      fc.property(fc.array(unit, { maxLength: 14 }), (specs) => {
        const { units, out } = normaliseSpecs(specs);
        for (const row of out) {
          const mine = units.filter((u) => u.variant === row.variant && !u.excluded);
          const scaled = (x: number | null | undefined) => (x === null || x === undefined ? NaN : row.scale === 'ratio' ? (x > 0 ? Math.log(x) : NaN) : x);
          const notEstimable = mine.filter((u) => !Number.isFinite(scaled(u.metrics[row.metric])));
          const flagText = row.flags.map((f) => f.message).join(' | ');
          if (notEstimable.length > 0) expect(flagText).toContain(`${notEstimable.length} of ${mine.length} variant preparations`);
          expect(row.nVariantUnits).toBeLessThanOrEqual(mine.length - notEstimable.length);
        }
      }),
      { seed: SEED, numRuns: 400 },
    );
  });

  // Regression: a variant whose batches all lack a finite WT value used to vanish silently (n = 0, no flag).
  it('every variant unit is counted in n or named in a flag', () => {
    fc.assert(
      fc.property(fc.array(unit, { maxLength: 14 }), (specs) => {
        const { units, out } = normaliseSpecs(specs);
        for (const row of out) {
          const mine = units.filter((u) => u.variant === row.variant && !u.excluded);
          const scaled = (x: number | null | undefined) => (x === null || x === undefined ? NaN : row.scale === 'ratio' ? (x > 0 ? Math.log(x) : NaN) : x);
          const finite = mine.filter((u) => Number.isFinite(scaled(u.metrics[row.metric])));
          const notEstimable = mine.length - finite.length;
          const flagText = row.flags.map((f) => f.message).join(' | ');
          if (notEstimable > 0) expect(flagText).toContain(`${notEstimable} of ${mine.length} variant preparations`);
          const unpaired = row.flags.find((f) => f.code === 'batch-without-wt')?.message ?? '';
          const inUnpaired = finite.filter((u) => new RegExp(`Batch [^.]*\\b${u.batch}\\b`).test(unpaired)).length;
          expect(row.nVariantUnits + inUnpaired, `${row.variant} ${row.metric}: ${finite.length} finite units; flags: ${flagText}`).toBe(finite.length);
        }
        // Every non-WT variant with a non-excluded unit has a row per metric.
        for (const v of ['A', 'B']) {
          const has = units.some((u) => u.variant === v && !u.excluded);
          expect(out.filter((r) => r.variant === v).length).toBe(has ? metrics.length : 0);
        }
      }),
      { seed: SEED, numRuns: 400 },
    );
  });
});
