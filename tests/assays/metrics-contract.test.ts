import { describe, expect, it } from 'vitest';
import { BANDS } from '../../src/assays/assembled.js';
import { force } from '../../src/assays/force/module.js';
import { motility } from '../../src/assays/motility/module.js';
import { turnover } from '../../src/assays/turnover/module.js';

// The metric keys the brief and the assays' metrics.ts (their bands) fix for these assays (common practice, no source).
const EXPECTED: Record<string, string[]> = {
  motility: ['velocity', 'fractionImmobile'],
  force: ['fmax', 'pCa50', 'nH', 'passive'],
  turnover: ['slowFraction', 'kFast', 'kSlow'],
};

describe('assay modules agree with the metric keys of their bands', () => {
  for (const mod of [motility, force, turnover]) {
    it(`${mod.id}: every BANDS key of the assay is a declared metric, and every primary metric has a band`, () => {
      const ids = mod.metrics.map((m) => m.id);
      for (const id of EXPECTED[mod.id]!) expect(ids).toContain(id);
      const bandKeys = Object.keys(BANDS).filter((k) => k.startsWith(`${mod.id}.`));
      for (const key of bandKeys) expect(ids).toContain(key.slice(mod.id.length + 1));
      for (const m of mod.metrics.filter((x) => x.primary)) expect(BANDS[`${mod.id}.${m.id}`]).toBeDefined();
      expect(new Set(ids).size).toBe(ids.length);
    });
  }

  it('declares the directions chosen for calls', () => {
    const dir = (mod: typeof force, id: string) => mod.metrics.find((m) => m.id === id)!;
    expect(dir(motility, 'velocity')).toMatchObject({ scale: 'ratio', hyper: 'up', primary: true });
    expect(dir(motility, 'fractionImmobile')).toMatchObject({ scale: 'difference', hyper: 'none', primary: false });
    expect(dir(force, 'fmax')).toMatchObject({ scale: 'ratio', hyper: 'up', primary: true });
    expect(dir(force, 'pCa50')).toMatchObject({ scale: 'difference', hyper: 'up', primary: true });
    expect(dir(force, 'nH')).toMatchObject({ scale: 'ratio', hyper: 'none' });
    // Passive tension lies near zero: compared as a difference in kPa (issue 19).
    expect(dir(force, 'passive')).toMatchObject({ scale: 'difference', hyper: 'none', primary: false, unit: 'kPa' });
    expect(dir(turnover, 'slowFraction')).toMatchObject({ scale: 'difference', hyper: 'down', primary: true });
    expect(dir(turnover, 'kFast')).toMatchObject({ scale: 'ratio', hyper: 'none' });
    expect(dir(turnover, 'kSlow')).toMatchObject({ scale: 'ratio', hyper: 'none' });
  });
});
