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
  if (args.length !== 1) {
    io.stderr.write(CLI.badArgs(usage, io.command));
    return null;
  }
  return isAbsolute(args[0]) ? args[0] : join(io.cwd, args[0]);
}
