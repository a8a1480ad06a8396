/**
 * Machine faults said in one sentence with a fix (src/pipeline/faults.ts), folders made without
 * Node's endless recursive mkdir (src/pipeline/folders.ts), and the command line's last line of
 * defence (src/cli/main.ts failureText): no stack trace unless MYOFOLIO_DEBUG is set.
 */
import { mkdirSync, mkdtempSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { failureText } from '../../src/cli/main.js';
import { describeFault, openFileLimit } from '../../src/pipeline/faults.js';
import { makeFolders } from '../../src/pipeline/folders.js';

const root = mkdtempSync(join(tmpdir(), 'myofolio-faults-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

const sysError = (code: string, extra: Record<string, unknown> = {}) => Object.assign(new Error(`${code}: system error`), { code, ...extra });

describe('describeFault', () => {
  it('finds ENOSPC inside an Eleventy error (originalError) and names the output folder when the write names no path', () => {
    const wrapped = Object.assign(new Error('Having trouble writing to "x.html" from "variant.njk"'), { originalError: sysError('ENOSPC', { syscall: 'write' }) });
    expect(describeFault(wrapped, { where: 'the output folder site' })).toEqual({
      code: 'ENOSPC',
      message: 'The disk is full: no space left on the device holding the output folder site.',
      fix: 'Free some space on that disk, or choose a folder on another disk, and run the command again.',
    });
  });

  it('finds a fault in a cause chain and among the errors of an AggregateError', () => {
    expect(describeFault(new Error('outer', { cause: sysError('EROFS', { path: '/mnt/ro/site' }) }))?.message).toBe('The file system holding /mnt/ro/site is read-only.');
    expect(describeFault(new AggregateError([new Error('plain'), sysError('EACCES', { path: '/srv/x' })]))?.code).toBe('EACCES');
  });

  it('says how many files may be open, and how to raise the limit (EMFILE)', () => {
    const f = describeFault(sysError('EMFILE'), { fileLimit: 64 });
    expect(f?.message).toBe('Too many open files: this process may open only 64 files at once (ulimit -n), fewer than myofolio needs.');
    expect(f?.fix).toContain("'ulimit -n 4096'");
  });

  it("takes Node's 'module not found' for a module that is there as too few files, and one that is not as a broken installation", () => {
    const here = join(root, 'pkg');
    mkdirSync(here);
    writeFileSync(join(here, 'package.json'), '{}');
    const masked = sysError('ERR_MODULE_NOT_FOUND');
    masked.message = `Cannot find package '${join(here, 'index.js')}' imported from /x/y.js`;
    expect(describeFault(masked, { fileLimit: 100 })?.code).toBe('EMFILE');
    const missing = sysError('ERR_MODULE_NOT_FOUND');
    missing.message = `Cannot find package '${join(root, 'gone', 'index.js')}' imported from /x/y.js`;
    expect(describeFault(missing)?.message).toBe(`Part of myofolio's installation is missing (${join(root, 'gone', 'index.js')}).`);
  });

  it('names a link that leads nowhere as such', () => {
    const link = join(root, 'dangling');
    symlinkSync(join(root, 'nowhere'), link);
    expect(describeFault(sysError('ENOENT', { path: link }))?.message).toBe(`${link} is a symbolic link to ${join(root, 'nowhere')}, which does not exist.`);
  });

  it('gives nothing for an error that is not a fault of the machine (the caller reports it as a fault of myofolio)', () => {
    expect(describeFault(new TypeError('x is undefined'))).toBeUndefined();
    expect(describeFault('a string')).toBeUndefined();
    expect(describeFault(sysError('ESOMETHINGNEW'))).toBeUndefined();
  });

  it('reads the open-file limit from a limits file as Linux writes it (format of /proc/self/limits, proc(5))', () => {
    const limits = join(root, 'limits');
    writeFileSync(limits, 'Limit                     Soft Limit           Hard Limit           Units\nMax open files            64                   1048576              files\n');
    expect(openFileLimit(limits)).toBe(64);
    expect(openFileLimit(join(root, 'no-such-file'))).toBeUndefined();
  });
});

describe('makeFolders', () => {
  it('makes missing parents, and accepts a folder that exists', () => {
    makeFolders(join(root, 'a', 'b', 'c'));
    makeFolders(join(root, 'a', 'b', 'c'));
    expect(() => makeFolders(join(root, 'a'))).not.toThrow();
  });

  it('under a file: ENOTDIR naming the path; on a link that leads nowhere: EEXIST naming the link', () => {
    writeFileSync(join(root, 'file'), 'x');
    expect(() => makeFolders(join(root, 'file', 'sub'))).toThrow(expect.objectContaining({ code: 'ENOTDIR', path: join(root, 'file', 'sub') }));
    expect(() => makeFolders(join(root, 'file'))).toThrow(expect.objectContaining({ code: 'ENOTDIR', path: join(root, 'file') }));
    symlinkSync(join(root, 'void'), join(root, 'dead'));
    expect(() => makeFolders(join(root, 'dead', 'sub'))).toThrow(expect.objectContaining({ code: 'EEXIST', path: join(root, 'dead') }));
  });

  it('under /proc (where mkdir answers ENOENT although the parent exists) it fails at once instead of looping', () => {
    expect(() => makeFolders('/proc/myofolio-test/site')).toThrow(expect.objectContaining({ code: 'ENOENT', path: '/proc/myofolio-test' }));
  });
});

describe('failureText (src/cli/main.ts)', () => {
  it('a fault: one message and a fix, no stack', () => {
    expect(failureText('myofolio init', sysError('ENOTDIR', { path: '/data/file/study' }))).toBe('myofolio init: A part of the path /data/file/study is a file, not a folder.\n  fix: Choose another path, or move that file away.\n');
  });

  it('anything else: one line, said to be a fault of myofolio, no stack unless MYOFOLIO_DEBUG is set', () => {
    const before = process.env.MYOFOLIO_DEBUG;
    delete process.env.MYOFOLIO_DEBUG;
    try {
      const text = failureText('myofolio build', new TypeError('cannot read x\nsecond line'));
      expect(text).toBe('myofolio build: stopped by an internal error: cannot read x\nThe previous output, if any, is unchanged. Please report this (run again with MYOFOLIO_DEBUG=1 to see where it happened).\n');
      expect(failureText('myofolio check', new Error('oops'))).toBe('myofolio check: stopped by an internal error: oops\nPlease report this (run again with MYOFOLIO_DEBUG=1 to see where it happened).\n');
      process.env.MYOFOLIO_DEBUG = '1';
      expect(failureText('myofolio check', new Error('oops'))).toMatch(/\n\s+at /);
    } finally {
      if (before === undefined) delete process.env.MYOFOLIO_DEBUG;
      else process.env.MYOFOLIO_DEBUG = before;
    }
  });
});
