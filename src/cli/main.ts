/**
 * The myofolio command line. The only layer that reads argv, prints and decides the exit code.
 * Exit codes: 0 success, 1 input problems (errors found), 2 usage errors.
 *
 * Adding a command: write src/cli/commands/<name>.ts exporting `command: Command`,
 * then add one line to COMMANDS below.
 */
import { readFileSync } from 'node:fs';
import type { Command, Io } from './command.js';
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
  const { command } = await load();
  if (rest.includes('--help') || rest.includes('-h')) {
    io.stdout.write(`usage: ${cmd} ${command.usage}\n${command.summary}\n`);
    return 0;
  }
  return command.run(rest, io);
}
