/**
 * One message per problem: grouping of repeated findings, long cells cut in messages, "did you
 * mean" for undeclared labels. Expected texts are written from the inputs by hand (common practice,
 * no source); edit distances are counted by hand from their definition (Damerau 1964; optimal
 * string alignment).
 */
import { describe, expect, it } from 'vitest';
import { groupIssues, lineRanges, rangesText } from '../../src/study/group-issues.js';
import { shown } from '../../src/results/source.js';
import { MSG, issue } from '../../src/study/messages.js';
import { closestNames, didYouMean, editDistance } from '../../src/study/suggest.js';
import { baseManifest, load, loadWith } from './fixtures.js';

const HEAD = 'variant,preparation,batch,actin (uM),rate (1/s)';

describe('line ranges', () => {
  it('joins neighbouring lines and counts what is left out', () => {
    expect(lineRanges([12, 3, 4, 5, 9, 13, 4])).toEqual([[3, 5], [9, 9], [12, 13]]);
    expect(rangesText([[3, 5], [9, 9]])).toBe('lines 3–5, 9');
    expect(rangesText([[7, 7]])).toBe('line 7');
    expect(rangesText([[1, 1], [3, 3], [5, 5]], 2)).toBe('lines 1, 3 and 1 more range');
  });
});

describe('groupIssues', () => {
  const at = (line: number, column?: string) => ({ file: 'a.csv', line, ...(column ? { column, col: 4 } : {}) });
  it('merges findings of one code, file and column into one issue with the count and lines', () => {
    const issues = [3, 4, 5, 9].map((l) => issue(MSG.notANumber('rate', 'x'), at(l, 'rate'), { variants: [l < 5 ? 'v-a' : 'v-b'] }));
    const [one, ...rest] = groupIssues(issues);
    expect(rest).toEqual([]);
    if (!one) throw new Error('no issue');
    expect(one.count).toBe(4);
    expect(one.at).toEqual({ file: 'a.csv', line: 3, column: 'rate', col: 4, lineEnd: 9 });
    expect(one.message).toBe("'x' in 'rate' is not a number. The same on 3 more cells of 'rate' (4 in all, lines 3–5, 9).");
    expect(one.variants).toEqual(['v-a', 'v-b']);
  });

  it('keeps different columns, codes, files, group keys and manifest paths apart, in order of first finding', () => {
    const issues = [
      issue(MSG.notANumber('rate', 'x'), at(3, 'rate')),
      issue(MSG.notANumber('actin', 'x'), at(3, 'actin')),
      issue(MSG.unknownVariant('A1'), at(4, 'variant'), { group: 'A1' }),
      issue(MSG.unknownVariant('B1'), at(5, 'variant'), { group: 'B1' }),
      issue(MSG.unknownVariant('A1'), at(6, 'variant'), { group: 'A1' }),
      issue(MSG.duplicateFile('a.csv'), { file: 'study.json', jsonPath: '/files/1/path' }),
      issue(MSG.duplicateFile('a.csv'), { file: 'study.json', jsonPath: '/files/2/path' }),
      issue(MSG.notANumber('rate', 'x'), { ...at(8, 'rate'), file: 'b.csv' }),
    ];
    const out = groupIssues(issues);
    expect(out.map((i) => [i.at.file, i.at.line ?? i.at.jsonPath, i.count ?? 1])).toEqual([
      ['a.csv', 3, 1],
      ['a.csv', 3, 1],
      ['a.csv', 4, 2],
      ['a.csv', 5, 1],
      ['study.json', '/files/1/path', 1],
      ['study.json', '/files/2/path', 1],
      ['b.csv', 8, 1],
    ]);
    expect(out.every((i) => i.group === undefined)).toBe(true);
    expect(out[2]!.message).toContain('The same on 1 more cell of \'variant\' (2 in all, lines 4, 6).');
  });

  it('is unchanged by grouping twice', () => {
    const once = groupIssues([3, 4].map((l) => issue(MSG.duplicateRow(2), at(l))));
    expect(groupIssues(once)).toEqual(once);
  });
});

describe('the loader groups repeated findings', () => {
  it('a whole file in a decimal comma gives one error per column, not one per cell', () => {
    const rows = Array.from({ length: 600 }, (_, i) => `WT;w1;B1;${i},5;0,${i}`);
    const o = loadWith('rates.csv', 'atpase-rates', ['variant;preparation;batch;actin (uM);rate (1/s)', ...rows].join('\n'));
    const errors = o.issues.filter((i) => i.severity === 'error');
    expect(errors.map((i) => [i.code, i.at.column, i.count])).toEqual([
      ['csv.decimal-comma', 'actin', 600],
      ['csv.decimal-comma', 'rate', 600],
    ]);
    expect(errors[0]!.message).toContain('(600 in all, lines 2–601)');
  });

  it('actin in mM headed µM gives one warning for the column, on the variants it touches', () => {
    const rows = ['WT,w1,B1,0,0.03', 'WT,w1,B1,2000,2.6', 'WT,w1,B1,3000,2.7', 'R2Q,p1,B1,2000,3.1', 'K4E,p2,B1,0,0.03', 'K4E,p2,B1,5000,2.5'];
    const o = load(baseManifest(), { 'rates.csv': [HEAD, ...rows].join('\n') });
    const implausible = o.issues.filter((i) => i.code === 'csv.implausible');
    expect(implausible).toHaveLength(1);
    expect(implausible[0]).toMatchObject({ count: 4, at: { line: 3, lineEnd: 7, column: 'actin' }, variants: ['zzg1-wt', 'zzg1-r2q', 'zzg1-k4e'] });
  });
});

describe('long cells in messages', () => {
  it('are cut with their length, and control characters are shown as escapes', () => {
    expect(shown('1,5')).toBe('1,5');
    expect(shown('9'.repeat(100))).toBe(`${'9'.repeat(39)}… (100 characters)`);
    expect(shown('a\rb\tc\u0007')).toBe('a\\rb\\tc\\u0007');
    // A surrogate pair is never split: the emoji at characters 39–40 is dropped whole.
    expect(shown(`${'x'.repeat(38)}😀${'y'.repeat(10)}`)).toBe(`${'x'.repeat(38)}… (50 characters)`);
  });

  it('a 10 MB number cell is named in a message of reasonable length', () => {
    const big = '1'.repeat(10_000_000) + 'x';
    const o = loadWith('rates.csv', 'atpase-rates', `${HEAD}\nWT,w1,B1,0,${big}\n`);
    const err = o.issues.find((i) => i.code === 'csv.not-a-number')!;
    expect(err.message.length).toBeLessThan(200);
    expect(err.message).toContain('… (10,000,001 characters)');
  });
});

describe('did you mean', () => {
  it('editDistance counts insertions, deletions, substitutions and swaps of neighbours', () => {
    expect(editDistance('A212V', 'A21V2')).toBe(1); // one swap
    expect(editDistance('R403Q', 'R403W')).toBe(1); // one substitution
    expect(editDistance('kitten', 'sitting')).toBe(3); // k→s, e→i, +g
    expect(editDistance('ca', 'abc')).toBe(3); // optimal string alignment: no edit of a swapped pair
  });

  it('closestNames offers near names, the same protein change, and nothing for a stranger', () => {
    expect(closestNames('A21V2', ['WT', 'A212V', 'R403Q'])).toEqual(['A212V']);
    expect(closestNames('a212v', ['WT', 'A212V'])).toEqual(['A212V']);
    expect(closestNames('p.Ala212Val', ['WT', 'A212V'])).toEqual(['A212V']);
    expect(closestNames('A213V', ['A212V', 'A214V', 'WT'])).toEqual(['A212V', 'A214V']);
    expect(closestNames('XYZ', ['WT', 'A212V'])).toEqual([]);
    expect(didYouMean(['A212V', 'A214V'])).toBe(" Did you mean 'A212V' or 'A214V'?");
  });

  it('an undeclared label gets one error with the suggestion, however many rows use it', () => {
    const rows = ['WT,w1,B1,0,0.03', 'WT,w1,B1,50,2.6', ...Array.from({ length: 32 }, (_, i) => `R2W,p1,B1,${i},0.04`)];
    const o = load(baseManifest(), { 'rates.csv': [HEAD, ...rows].join('\n') });
    const unknown = o.issues.filter((i) => i.code === 'csv.unknown-variant');
    expect(unknown).toHaveLength(1);
    expect(unknown[0]!.message).toBe("The variant 'R2W' is not declared in the manifest. Did you mean 'R2Q'? The same on 31 more cells of 'variant' (32 in all, lines 4–35).");
    expect(unknown[0]!.fix).toBe("Correct the label to 'R2Q' if that was meant, or add 'R2W' to variants in the manifest.");
  });
});
