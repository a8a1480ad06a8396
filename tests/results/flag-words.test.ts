/**
 * Every flag code that src/ can emit has plain words in src/results/flag-words.ts. The codes are
 * collected from the source text: a Flag is written as an object literal with `code` and a flag
 * `severity` ('info', 'warning' or 'reject'; load issues use 'error'/'warning' through their own
 * message catalogue and carry no such literal).
 */
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { FLAG_WORDS, flagAnchor, flagWords } from '../../src/results/flag-words.js';

const SRC = 'src';

function sourceFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = join(dir, e.name);
    if (e.isDirectory()) return sourceFiles(p);
    return e.name.endsWith('.ts') ? [p] : [];
  });
}

const SEVERITY = `severity:\\s*'(?:info|warning|reject)'`;

/**
 * Flag codes written in TypeScript source text: `code: '…'` beside a flag severity in the same
 * object literal (either order). Codes passed on from another flag (`code: first.code`) are
 * returned as `dynamic` so that the test can check they are only the known pass-through.
 */
export function flagCodesIn(text: string): { literal: string[]; dynamic: string[] } {
  const literal = new Set<string>();
  const dynamic = new Set<string>();
  const codeThenSeverity = new RegExp(`code:\\s*([^,}\\n]+?)\\s*,\\s*${SEVERITY}`, 'g');
  const severityThenCode = new RegExp(`${SEVERITY}\\s*,\\s*code:\\s*([^,}\\n]+?)\\s*[,}]`, 'g');
  for (const re of [codeThenSeverity, severityThenCode]) {
    for (const m of text.matchAll(re)) {
      const value = m[1]!.trim();
      const quoted = /^'([^']+)'$/.exec(value) ?? /^"([^"]+)"$/.exec(value);
      if (quoted) literal.add(quoted[1]!);
      else dynamic.add(value);
    }
  }
  return { literal: [...literal].sort(), dynamic: [...dynamic].sort() };
}

const files = sourceFiles(SRC).filter((f) => !f.endsWith('flag-words.ts'));
const found = files.map((f) => ({ file: f, ...flagCodesIn(readFileSync(f, 'utf8')) }));
const emitted = [...new Set(found.flatMap((f) => f.literal))].sort();

describe('flag words', () => {
  it('the collector finds codes written either way round, and passed-on codes', () => {
    const text = `
      flags.push({ code: 'made-up-code', severity: 'warning', message: 'x' });
      const f: Flag = { severity: 'info', code: 'other-code', message: 'y' };
      flags.push({
        code: first.code,
        severity: 'reject',
        message: 'z',
      });
      issues.push({ code: 'csv.unknown-unit', severity: 'error' });`;
    expect(flagCodesIn(text)).toEqual({ literal: ['made-up-code', 'other-code'], dynamic: ['first.code'] });
  });

  it('finds the flags of src/ (a collector that finds nothing would pass anything)', () => {
    // Codes known to be emitted by the analysis and the assays (src/analysis/normalise.ts, src/assays/atpase/module.ts, src/assays/turnover/module.ts).
    expect(emitted).toEqual(expect.arrayContaining(['units-not-estimable', 'km-above-range', 'one-phase-trace', 'wt-qc-rejected', 'excluded']));
    expect(emitted.length).toBeGreaterThanOrEqual(20);
  });

  it('explains every flag code emitted in src/', () => {
    const missing = found.flatMap((f) => f.literal.filter((c) => !flagWords(c)).map((c) => `${c} (${f.file})`));
    expect(missing, 'add plain words for these codes to src/results/flag-words.ts').toEqual([]);
  });

  it('passes on codes only from flags it names (so those codes are in the catalogue already)', () => {
    // src/analysis/normalise.ts passes a unit flag's code (km-above-range, pca50-out-of-range) to the comparison it stops.
    const dynamic = found.flatMap((f) => f.dynamic.map((d) => `${f.file}: ${d}`));
    expect(dynamic).toEqual([`${join('src', 'analysis', 'normalise.ts')}: first.code`]);
  });

  it('has no stale entries: every explained code is emitted somewhere', () => {
    expect(Object.keys(FLAG_WORDS).filter((c) => !emitted.includes(c))).toEqual([]);
  });

  it('words every entry as plain text: a short label and whole sentences', () => {
    for (const [code, w] of Object.entries(FLAG_WORDS)) {
      expect(w.label.length, code).toBeLessThanOrEqual(40);
      expect(w.label, code).not.toBe(code); // words, not the code again
      expect(w.explanation, code).toMatch(/^[A-Z].*\.$/s);
      expect(w.levels.length, code).toBeGreaterThan(0);
    }
    expect(flagWords('no-such-code')).toBeUndefined();
    expect(flagWords('toString')).toBeUndefined();
    expect(flagAnchor('km-above-range')).toBe('flag-km-above-range');
  });
});
