/** `myofolio init <dir> [--assays <list>]`: write a starter study folder. */
import { existsSync, lstatSync, readdirSync, readlinkSync, rmdirSync, statSync, unlinkSync, writeFileSync } from 'node:fs';
import { isAbsolute, join } from 'node:path';
import { makeFolders } from '../../pipeline/folders.js';
import { closestNames, didYouMean } from '../../study/suggest.js';
import { INPUT_KINDS } from '../../study/schemas.js';
import { ASSAY_KINDS, GUIDE_NAME, parseKinds, starterFiles } from '../../study/templates.js';
import type { InputKind } from '../../study/types.js';
import { type Command, type Io, readArguments } from '../command.js';
import { CLI } from '../messages.js';

/** Why a folder cannot be written, in words (from the system's error code). */
function reason(err: unknown): string {
  const code = (err as NodeJS.ErrnoException).code;
  const words: Record<string, string> = {
    EACCES: 'permission denied',
    EPERM: 'permission denied',
    EROFS: 'the file system is read-only',
    ENOTDIR: 'a part of the path is a file, not a folder',
    ENOSPC: 'the disk is full',
    EDQUOT: 'the disk quota is used up',
    ENAMETOOLONG: 'the name is too long',
    ELOOP: 'too many symbolic links in the path',
    EEXIST: 'something of that name appeared meanwhile',
    EMFILE: 'too many files are open',
  };
  return (code && words[code]) ?? (code ? `system error ${code}` : String(err));
}

/** Remove folders this run made (innermost first), if they are still empty. */
function removeFolders(created: readonly string[]): void {
  for (const d of [...created].reverse()) {
    try {
      rmdirSync(d);
    } catch {
      // not empty or gone: leave it
    }
  }
}

type Parsed = { dir: string; shown: string; kinds: readonly InputKind[] } | { usage: string } | { exit: number };

function parseArgs(args: string[], io: Io, usage: string): Parsed {
  const got = readArguments(args, { '--assays': { needs: 'a list of input kinds, e.g. --assays atpase-rates,force-pca' } });
  if ('problem' in got) return { usage: got.problem };
  let kinds: readonly InputKind[] = INPUT_KINDS;
  const list = got.values.get('--assays');
  if (list !== undefined) {
    const parsed = parseKinds(list);
    if ('unknown' in parsed) {
      const choices = [...INPUT_KINDS, ...Object.keys(ASSAY_KINDS)];
      io.stderr.write(CLI.initUnknownKind(parsed.unknown, choices, didYouMean(closestNames(parsed.unknown, choices))) + CLI.badArgs(usage, io.command));
      return { exit: 2 };
    }
    kinds = parsed.kinds;
  }
  const [shown] = got.positional;
  if (got.positional.length !== 1 || shown === undefined) return { usage: 'give exactly one folder' };
  return { dir: isAbsolute(shown) ? shown : join(io.cwd, shown), shown, kinds };
}

export const command: Command = {
  name: 'init',
  usage: 'init <dir> [--assays <kinds>]',
  summary: 'Write a starter study folder: manifest, field guide and a CSV template per input kind (all, or the listed kinds or assays).',
  async run(args: string[], io: Io): Promise<number> {
    const parsed = parseArgs(args, io, this.usage);
    if ('exit' in parsed) return parsed.exit;
    if ('usage' in parsed) {
      io.stderr.write(`myofolio init: ${parsed.usage}.\n${CLI.badArgs(this.usage, io.command)}`);
      return 2;
    }
    const { dir, shown, kinds } = parsed;
    // What is there already: nothing, an empty folder, or something init must not touch.
    /** Folders this run made, outermost first (removed again if writing fails). */
    const created: string[] = [];
    try {
      const link = lstatSync(dir, { throwIfNoEntry: false });
      if (link?.isSymbolicLink() && !existsSync(dir)) {
        io.stderr.write(CLI.initDanglingLink(shown, readlinkSync(dir)));
        return 1;
      }
      if (existsSync(dir)) {
        if (!statSync(dir).isDirectory()) {
          io.stderr.write(CLI.initNotFolder(shown));
          return 1;
        }
        if (readdirSync(dir).length > 0) {
          io.stderr.write(CLI.initNotEmpty(shown));
          return 1;
        }
      } else makeFolders(dir, undefined, created);
    } catch (err) {
      removeFolders(created);
      io.stderr.write(CLI.initCannotWrite(shown, reason(err)));
      return 1;
    }
    const today = new Date().toISOString().slice(0, 10);
    const files = starterFiles(today, kinds);
    const written: string[] = [];
    try {
      for (const [name, text] of Object.entries(files)) {
        writeFileSync(join(dir, name), text, { flag: 'wx' });
        written.push(name);
      }
    } catch (err) {
      // Leave nothing half-written: remove what this run wrote (and the folder, if it made it).
      for (const name of written) {
        try {
          unlinkSync(join(dir, name));
        } catch {
          // already gone
        }
      }
      removeFolders(created);
      io.stderr.write(CLI.initCannotWrite(shown, reason(err)));
      return 1;
    }
    io.stdout.write(CLI.initDone(shown, Object.keys(files), GUIDE_NAME, io.command));
    return 0;
  },
};
