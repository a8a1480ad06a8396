import { describe, expect, it } from 'vitest';
import { readArguments } from '../../src/cli/command.js';

// The one argument reader of init, build and release (src/cli/command.ts). Conventions: POSIX/GNU
// style long options with a separate or '='-joined value (common practice, no source).
const OPTIONS = { '--out': { alias: '-o', needs: 'a folder' }, '--note': { needs: 'a text' } };

describe('readArguments', () => {
  it('reads value options in both spellings, aliases, flags and positionals in order', () => {
    const got = readArguments(['a', '--out', 'x', 'b', '--note=hello world', '--force'], OPTIONS, ['--force']);
    expect(got).toEqual({ values: new Map([['--out', 'x'], ['--note', 'hello world']]), flags: new Set(['--force']), positional: ['a', 'b'] });
    expect(readArguments(['-o', 'y'], OPTIONS)).toMatchObject({ values: new Map([['--out', 'y']]) });
  });

  it('keeps an empty value given with = (the command decides whether it may be empty)', () => {
    expect(readArguments(['--out='], OPTIONS)).toMatchObject({ values: new Map([['--out', '']]) });
  });

  it('the last of a repeated option wins', () => {
    expect(readArguments(['--out', 'x', '--out', 'z'], OPTIONS)).toMatchObject({ values: new Map([['--out', 'z']]) });
  });

  it('says what a value option lacks, when it is last or followed by another option', () => {
    expect(readArguments(['s', '--out'], OPTIONS)).toEqual({ problem: 'option --out needs a folder' });
    expect(readArguments(['-o', '--force'], OPTIONS, ['--force'])).toEqual({ problem: 'option -o needs a folder' });
  });

  it('refuses an unknown option, also in the = spelling, and a flag given a value', () => {
    expect(readArguments(['--outt', 'x'], OPTIONS)).toEqual({ problem: "unknown option '--outt'" });
    expect(readArguments(['--colour=red'], OPTIONS)).toEqual({ problem: "unknown option '--colour=red'" });
    expect(readArguments(['--force=yes'], OPTIONS, ['--force'])).toEqual({ problem: "unknown option '--force=yes'" });
  });
});
