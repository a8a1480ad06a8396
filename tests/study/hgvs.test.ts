import { describe, expect, it } from 'vitest';
import { checkReferenceResidue, isWildTypeText, parseProteinChange, variantId } from '../../src/study/hgvs.js';

// Expected normal forms follow the HGVS protein nomenclature (varnomen.hgvs.org: substitution,
// deletion; three-letter codes per IUPAC-IUBMB).
describe('HGVS protein changes', () => {
  it.each([
    ['p.Arg403Gln', 'p.Arg403Gln', 'R403Q'],
    ['p.R403Q', 'p.Arg403Gln', 'R403Q'],
    ['R403Q', 'p.Arg403Gln', 'R403Q'],
    ['p.(Arg403Gln)', 'p.Arg403Gln', 'R403Q'],
    ['p.Arg403Ter', 'p.Arg403Ter', 'R403*'],
    ['R403*', 'p.Arg403Ter', 'R403*'],
    ['R403X', 'p.Arg403Ter', 'R403*'],
    ['p.Arg403=', 'p.Arg403=', 'R403='],
    ['K847del', 'p.Lys847del', 'K847del'],
    ['  G741R ', 'p.Gly741Arg', 'G741R'],
  ])('%s → %s / %s', (input, hgvs, short) => {
    const r = parseProteinChange(input);
    expect(r.ok).toBe(true);
    if (r.ok) {
      expect(r.change.hgvs).toBe(hgvs);
      expect(r.change.short).toBe(short);
    }
  });

  it.each(['p.Xyz12Gln', 'R0Q', '403Q', 'ARG403GLN', 'c.1208G>A', 'p.Arg403_Lys405del', ''])('rejects %j', (input) => {
    expect(parseProteinChange(input).ok).toBe(false);
  });

  it('residue, reference and alternate are kept', () => {
    const r = parseProteinChange('R403Q');
    expect(r.ok && r.change).toMatchObject({ residue: 403, refAA: 'Arg', altAA: 'Gln', type: 'missense' });
  });

  it('checks the reference residue against a sequence', () => {
    const seq = 'MRKA';
    const ok = parseProteinChange('R2Q');
    const wrong = parseProteinChange('K2Q');
    const beyond = parseProteinChange('R9Q');
    if (!ok.ok || !wrong.ok || !beyond.ok) throw new Error('parse failed');
    expect(checkReferenceResidue(ok.change, seq)).toBeUndefined();
    expect(checkReferenceResidue(wrong.change, seq)).toEqual({ found: 'Arg', beyondEnd: false });
    expect(checkReferenceResidue(beyond.change, seq)).toEqual({ beyondEnd: true });
  });

  it('recognises wild type and makes safe ids', () => {
    expect(['WT', 'wt', 'wild type', 'Wild-type'].every(isWildTypeText)).toBe(true);
    expect(isWildTypeText('WTX')).toBe(false);
    expect(variantId('MYH7', 'R403Q')).toBe('myh7-r403q');
    expect(variantId('ZZ1', 'R403*')).toBe('zz1-r403ter');
  });
});
