/** What a command is, and the argument helper commands share (src/cli/main.ts runs them). */
import { isAbsolute, join } from 'node:path';
import { CLI } from './messages.js';

export interface Io {
  stdout: { write(text: string): unknown };
  stderr: { write(text: string): unknown };
  cwd: string;
  /** How the user runs myofolio here ('myofolio', 'npx myofolio', 'node dist/cli/myofolio.js'; src/cli/invocation.ts), for messages that name a command; default 'myofolio'. */
  command?: string;
}

export interface Command {
  name: string;
  /** Usage line without the program name, e.g. 'check <study-dir>'. */
  usage: string;
  summary: string;
  /** Run with the arguments after the command name; returns the exit code. */
  run(args: string[], io: Io): Promise<number>;
}

/**
 * The one folder argument of a command that takes exactly one (init, check): resolved against
 * io.cwd, or null after printing the usage error (the caller returns exit code 2).
 */
export function singleFolderArgument(args: string[], io: Io, usage: string): string | null {
  const option = args.find((a) => a.startsWith('-'));
  if (option) {
    io.stderr.write(CLI.unknownOption(option, usage, io.command));
    return null;
  }
  const [only] = args;
  if (args.length !== 1 || only === undefined) {
    io.stderr.write(CLI.badArgs(usage, io.command));
    return null;
  }
  return isAbsolute(only) ? only : join(io.cwd, only);
}

/** An option that takes a value: its other spelling, and what it needs in words (for the usage error). */
export interface ValueOption {
  alias?: string;
  /** e.g. 'a folder': "option --out needs a folder". */
  needs: string;
}

/** What readArguments found: each value option given (by its long name), each flag given, the rest in order. */
export interface Arguments {
  values: Map<string, string>;
  flags: Set<string>;
  positional: string[];
}

/**
 * Read a command's arguments: value options (`--out x`, `-o x`, `--out=x`; the last one given
 * wins), flags (`--force`) and positional arguments. Returns the usage problem in words when an
 * option is unknown or lacks its value.
 * @example readArguments(['s', '--out', 'x', '--force'], { '--out': { alias: '-o', needs: 'a folder' } }, ['--force'])
 *   // { values: Map { '--out' → 'x' }, flags: Set { '--force' }, positional: ['s'] }
 */
export function readArguments(args: readonly string[], options: Record<string, ValueOption>, flags: readonly string[] = []): Arguments | { problem: string } {
  const found: Arguments = { values: new Map(), flags: new Set(), positional: [] };
  const byAlias = new Map(Object.entries(options).flatMap(([name, o]) => (o.alias ? [[o.alias, name] as const] : [])));
  for (let i = 0; i < args.length; i++) {
    const a = args[i] as string; // i < args.length
    const eq = a.indexOf('=');
    const inline = a.startsWith('--') && eq > 0 ? a.slice(0, eq) : undefined;
    const name = inline ?? byAlias.get(a) ?? a;
    const option = Object.prototype.hasOwnProperty.call(options, name) ? options[name] : undefined;
    if (option && inline !== undefined) found.values.set(name, a.slice(eq + 1));
    else if (option) {
      const v = args[i + 1];
      if (v === undefined || v.startsWith('-')) return { problem: `option ${a} needs ${option.needs}` };
      found.values.set(name, v);
      i++;
    } else if (flags.includes(a)) found.flags.add(a);
    else if (a.startsWith('-')) return { problem: `unknown option '${a}'` };
    else found.positional.push(a);
  }
  return found;
}
