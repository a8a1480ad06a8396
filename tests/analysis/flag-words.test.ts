/**
 * Every flag code that src/ can emit has plain words in the glossary (src/analysis/flag-words.ts),
 * and every flag is written in a catalogue: an assay's messages.ts (with the fit flags several
 * assays share in src/assays/fit-flags.ts) or the analysis's messages.ts. The codes are collected
 * from the source text: a Flag is written as an object literal with `code` and a flag `severity`
 * ('info', 'warning' or 'reject'; load issues use 'error'/'warning' through their own message
 * catalogue and carry no such literal).
 */
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { FLAG_WORDS, flagAnchor, flagWords, glossary } from '../../src/analysis/flag-words.js';
import { ANALYSIS_FLAG_WORDS } from '../../src/analysis/messages.js';
import { UNIT_FLAG_WORDS } from '../../src/assays/assembled.js';
import { FIT_FLAG_WORDS } from '../../src/assays/fit-flags.js';
import { ASSAYS } from '../../src/assays/registry.js';

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

const files = sourceFiles(SRC);
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
    // Codes known to be emitted by the analysis and the assays (src/analysis/messages.ts, src/assays/atpase/messages.ts, src/assays/turnover/messages.ts).
    expect(emitted).toEqual(expect.arrayContaining(['units-not-estimable', 'km-above-range', 'one-phase-trace', 'wt-qc-rejected', 'excluded']));
    expect(emitted.length).toBeGreaterThanOrEqual(20);
  });

  it('explains every flag code emitted in src/', () => {
    const missing = found.flatMap((f) => f.literal.filter((c) => !flagWords(c)).map((c) => `${c} (${f.file})`));
    expect(missing, "add plain words for these codes to the assay's or the analysis's messages.ts").toEqual([]);
  });

  it('passes on codes only from flags it names (so those codes are in the catalogue already)', () => {
    // src/analysis/messages.ts passes a unit flag's code (km-above-range, pca50-out-of-range) to the comparison it stops.
    const dynamic = found.flatMap((f) => f.dynamic.map((d) => `${f.file}: ${d}`));
    expect(dynamic).toEqual([`${join('src', 'analysis', 'messages.ts')}: first.code`]);
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

/** The catalogues: the only files that write a flag. */
const CATALOGUES = [join('src', 'assays', 'fit-flags.ts'), join('src', 'analysis', 'messages.ts'), ...ASSAYS.map((a) => join('src', 'assays', a.id, 'messages.ts'))].sort();

describe('flag messages in catalogues', () => {
  it("writes every flag in a catalogue: an assay folder's messages.ts, the shared fit flags, or the analysis's messages.ts", () => {
    const writers = found.filter((f) => f.literal.length + f.dynamic.length > 0).map((f) => f.file);
    expect(writers.sort()).toEqual(CATALOGUES);
  });

  it("gives every code an assay can raise a message and plain words, and no words to a code it does not raise", () => {
    const shared = found.find((f) => f.file === join('src', 'assays', 'fit-flags.ts'))!.literal;
    for (const a of ASSAYS) {
      const own = found.find((f) => f.file === join('src', 'assays', a.id, 'messages.ts'))!.literal;
      // Messages of its own: each has words (the types of messages.ts say so too).
      expect(own.filter((c) => !(c in a.flagWords)), a.id).toEqual([]);
      // Words: each code has a message, written in the assay's catalogue or, for the fit flags, in fit-flags.ts.
      expect(Object.keys(a.flagWords).filter((c) => !own.includes(c) && !shared.includes(c)), a.id).toEqual([]);
      // A shared fit flag is worded as fit-flags.ts words it.
      for (const [code, words] of Object.entries(a.flagWords)) if (code in FIT_FLAG_WORDS) expect(words, code).toEqual(FIT_FLAG_WORDS[code as keyof typeof FIT_FLAG_WORDS]);
    }
  });

  it('assembles the glossary from the registry and the analysis, unit flags first in registry order', () => {
    expect(Object.keys(FLAG_WORDS)).toEqual([...Object.keys(UNIT_FLAG_WORDS), ...Object.keys(ANALYSIS_FLAG_WORDS)]);
    const inRegistryOrder = [...new Set(ASSAYS.flatMap((a) => Object.keys(a.flagWords)))];
    expect(Object.keys(UNIT_FLAG_WORDS)).toEqual(inRegistryOrder);
    for (const a of ASSAYS) for (const [code, words] of Object.entries(a.flagWords)) expect(FLAG_WORDS[code], code).toEqual(words);
    // The analysis words the comparison and variant flags it raises, no unit flag.
    expect(Object.keys(ANALYSIS_FLAG_WORDS)).toEqual(['units-not-estimable', 'wt-units-left-out', 'batch-without-wt', 'no-residual-df', 'variance-pooled', 'wt-qc-rejected', 'excluded']);
    const unitWords = { 'km-above-range': UNIT_FLAG_WORDS['km-above-range']! };
    expect(() => glossary(unitWords, { 'km-above-range': { label: 'x', explanation: 'X.', levels: ['comparison'] } })).toThrow(/'km-above-range' is worded both by an assay and by the analysis/);
  });
});
