/**
 * End to end: `myofolio build data-demo` through the CLI entry, into a fresh folder.
 * Checks the output folder's contract: pages, downloads, results.json valid against
 * schemas/results.schema.json, results.csv one row per variant × metric, synthetic banner.
 */
import { describe, expect, it, beforeAll } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, readdirSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { METHOD_CHANGES } from '../../src/analysis/method-changes.js';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { main } from '../../src/cli/main.js';
import { RESULTS_CSV_COLUMNS } from '../../src/results/csv.js';
import type { StudyResults } from '../../src/results/types.js';

const out = path.join(mkdtempSync(path.join(os.tmpdir(), 'myofolio-e2e-')), 'site');
let code = -1;
let stdout = '';

beforeAll(async () => {
  const io = { stdout: { write: (s: string) => (stdout += s) }, stderr: { write: (s: string) => (stdout += s) }, cwd: process.cwd() };
  process.env.SOURCE_DATE_EPOCH = '1767225600';
  code = await main(['build', 'data-demo', '--out', out], io);
}, 180_000);

describe('myofolio build data-demo', () => {
  it('exits 0 and says where to open the site', () => {
    expect(code, stdout).toBe(0);
    expect(stdout).toMatch(/Open .*index\.html/);
  });

  it('writes index, one report per variant, methods page and downloads', () => {
    const results = JSON.parse(readFileSync(path.join(out, 'downloads/results.json'), 'utf8')) as StudyResults;
    expect(existsSync(path.join(out, 'index.html'))).toBe(true);
    expect(existsSync(path.join(out, 'methods.html'))).toBe(true);
    const reports = readdirSync(path.join(out, 'variants')).filter((f) => f.endsWith('.html'));
    expect(reports.length).toBe(results.variants.length); // WT has a report too (its own data and QC)
    expect(results.provenance.builtAt).toBe('2026-01-01T00:00:00.000Z');
  });

  it('every variant is measured by all four assays, and the deliberate demo problems are flagged', () => {
    const results = JSON.parse(readFileSync(path.join(out, 'downloads/results.json'), 'utf8')) as StudyResults;
    expect(results.assays.map((a) => a.id)).toEqual(['atpase', 'motility', 'force', 'turnover']);
    for (const v of results.variants.filter((x) => !x.isWT)) {
      expect(v.assayCalls.map((a) => a.call).filter((c) => c === 'not measured'), v.short).toEqual([]);
      const html = readFileSync(path.join(out, 'variants', `${v.id}.html`), 'utf8');
      for (const a of results.assays) expect(html, `${v.short} ${a.id}`).toContain(a.label);
    }
    const flags = new Set(results.units.flatMap((u) => u.flags.map((f) => f.code)));
    expect(flags.has('km-above-range')).toBe(true);
    expect(flags.has('one-phase-trace')).toBe(true);
    // The extrapolated KM reaches the comparison: E333V's kcat is not compared, and its row says why.
    const kcat = results.comparisons.find((c) => c.metric === 'kcat' && results.variants.find((v) => v.id === c.variant)?.short === 'E333V')!;
    expect(kcat.effect).toBeNull();
    expect(kcat.flags.map((f) => f.code)).toContain('km-above-range');
  });

  it('the overall calls the method change notes give for the demo are the demo’s calls', () => {
    const results = JSON.parse(readFileSync(path.join(out, 'downloads/results.json'), 'utf8')) as StudyResults;
    const newest = METHOD_CHANGES[0]!;
    let checked = 0;
    for (const line of newest.demoCalls) {
      // Lines of the form "L236S: hypercontractile → indeterminate …" (overall calls); assay-level lines name their assay first.
      const call = '(hypercontractile|hypocontractile|mixed|within WT range|indeterminate)';
      const m = new RegExp(`^([A-Z]\\d+[A-Z]): ${call} → ${call}\\b`).exec(line);
      if (!m) continue;
      const v = results.variants.find((x) => x.short === m[1])!;
      expect(v.overall.call, line).toBe(m[3]);
      checked++;
    }
    expect(checked).toBeGreaterThanOrEqual(3);
  });

  it('results.json is valid against schemas/results.schema.json', () => {
    const schema = JSON.parse(readFileSync('schemas/results.schema.json', 'utf8'));
    const ajv = new Ajv2020({ allErrors: true, strict: false });
    const validate = ajv.compile(schema);
    const data = JSON.parse(readFileSync(path.join(out, 'downloads/results.json'), 'utf8'));
    const ok = validate(data);
    expect(validate.errors?.slice(0, 5) ?? [], 'schema errors').toEqual([]);
    expect(ok).toBe(true);
  });

  it('results.csv has one row per variant × metric with the documented columns', () => {
    const results = JSON.parse(readFileSync(path.join(out, 'downloads/results.json'), 'utf8')) as StudyResults;
    const lines = readFileSync(path.join(out, 'downloads/results.csv'), 'utf8').trimEnd().split('\r\n');
    expect(lines[0]).toBe(RESULTS_CSV_COLUMNS.join(','));
    expect(lines.length - 1).toBe(results.comparisons.length);
  });

  it('every page carries the synthetic-data banner and the reports carry the caveats', () => {
    const files = ['index.html', ...readdirSync(path.join(out, 'variants')).map((f) => `variants/${f}`)];
    for (const f of files) {
      const html = readFileSync(path.join(out, f), 'utf8');
      expect(html, f).toMatch(/Synthetic demonstration data/);
    }
    const report = readFileSync(path.join(out, 'variants', readdirSync(path.join(out, 'variants'))[0] ?? ''), 'utf8');
    expect(report).toMatch(/not a clinical test/);
    expect(report).toMatch(/one line of evidence/);
  });
});
