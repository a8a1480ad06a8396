/**
 * The myofolio command line. The only layer that reads argv, prints and decides the exit code.
 * Exit codes: 0 success, 1 input problems (errors found) or a fault (a full disk, too few file
 * descriptors, a folder that may not be written: one message with a fix, never a stack trace),
 * 2 usage errors.
 *
 * Adding a command: write src/cli/commands/<name>.ts exporting `command: Command`,
 * then add one line to COMMANDS below.
 */
import { readFileSync } from 'node:fs';
import { describeFault, openFileLimit } from '../pipeline/faults.js';
import type { Command, Io } from './command.js';
import { invocation } from './invocation.js';
import { CLI } from './messages.js';

export type { Command, Io } from './command.js';

/** The command table: name → module loader. One line per command. */
const COMMANDS: Record<string, () => Promise<{ command: Command }>> = {
  init: () => import('./commands/init.js'),
  check: () => import('./commands/check.js'),
  build: () => import('./commands/build.js'),
  release: () => import('./commands/release.js'),
};

/** The version in package.json. */
export function version(): string {
  const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string };
  return pkg.version;
}

export async function main(argv: string[], io: Io): Promise<number> {
  const [first, ...rest] = argv;
  if (first === '--version' || first === '-v') {
    io.stdout.write(`${version()}\n`);
    return 0;
  }
  if (first === '--help' || first === '-h' || first === 'help') {
    const commands = await Promise.all(Object.values(COMMANDS).map(async (load) => (await load()).command));
    io.stdout.write(CLI.help(commands, io.command ?? 'myofolio'));
    return 0;
  }
  const cmd = io.command ?? 'myofolio';
  if (first === undefined) {
    io.stderr.write(CLI.noCommand(cmd));
    return 2;
  }
  const load = Object.prototype.hasOwnProperty.call(COMMANDS, first) ? COMMANDS[first] : undefined;
  if (!load) {
    io.stderr.write(CLI.unknownCommand(first, cmd));
    return 2;
  }
  // Read now: once the files run out, the limit can no longer be read to name it.
  const fileLimit = openFileLimit();
  try {
    const { command } = await load();
    if (rest.includes('--help') || rest.includes('-h')) {
      io.stdout.write(`usage: ${cmd} ${command.usage}\n${command.summary}\n`);
      return 0;
    }
    return await command.run(rest, io);
  } catch (err) {
    io.stderr.write(failureText(`myofolio ${first}`, err, fileLimit));
    return 1;
  }
}

/**
 * What to print for an error no command handled: a fault of the machine as one message and a
 * fix; anything else as a fault of myofolio, in one line (the stack only with MYOFOLIO_DEBUG set).
 */
export function failureText(who: string, err: unknown, fileLimit?: number): string {
  const fault = describeFault(err, fileLimit !== undefined ? { fileLimit } : {});
  const debug = process.env.MYOFOLIO_DEBUG && err instanceof Error && err.stack ? `${err.stack}\n` : '';
  if (fault) return `${who}: ${fault.message}\n  fix: ${fault.fix}\n${debug}`;
  const message = (err instanceof Error ? err.message : String(err)).split('\n')[0]!.slice(0, 300);
  const kept = who.endsWith(' build') ? ' The previous output, if any, is unchanged.' : '';
  return `${who}: stopped by an internal error: ${message}\n${kept.trim()}${kept ? ' ' : ''}Please report this (run again with MYOFOLIO_DEBUG=1 to see where it happened).\n${debug}`;
}

/**
 * Run as the `myofolio` program: main() on the process's arguments and streams, with guards so
 * that no failure ends in a stack trace or an unexplained exit code: an error on standard output
 * (a full disk behind a redirection; a closed pipe ends the output quietly), an error thrown
 * outside main's promise, and a promise that never settles (Node would exit 13 without a word).
 */
export async function runProcess(argv: string[]): Promise<void> {
  let settled = false;
  const name = `myofolio${argv[0] && !argv[0].startsWith('-') ? ` ${argv[0]}` : ''}`;
  const say = (text: string) => {
    try {
      process.stderr.write(text);
    } catch {
      // nowhere left to say it: the exit code tells
    }
  };
  let outputFailed = false;
  process.stdout.on('error', (err: NodeJS.ErrnoException) => {
    if (outputFailed) return;
    outputFailed = true;
    if (err.code === 'EPIPE') return; // the reader stopped reading (e.g. | head): not a failure
    const why = describeFault(err, { where: 'standard output' })?.message ?? err.message;
    say(`${name}: cannot write to standard output: ${why.charAt(0).toLowerCase()}${why.slice(1)}\n`);
    process.exitCode = 1;
  });
  process.stderr.on('error', () => {
    process.exitCode = process.exitCode || 1;
  });
  const fail = (err: unknown) => {
    settled = true;
    say(failureText(name, err));
    process.exit(1);
  };
  process.on('uncaughtException', fail);
  process.on('unhandledRejection', fail);
  process.on('exit', () => {
    if (settled) return;
    say(`${name}: stopped before it finished: an operation it waited for never completed.${name.endsWith(' build') ? ' The previous output, if any, is unchanged.' : ''} Please report this.\n`);
    process.exitCode = 1;
  });
  const code = await main(argv, { stdout: process.stdout, stderr: process.stderr, cwd: process.cwd(), command: invocation(process.env, process.argv[1], process.cwd()) });
  settled = true;
  if (!process.exitCode) process.exitCode = code;
}
