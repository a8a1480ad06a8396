/**
 * How the user can run myofolio from where they are, for messages that name a next command
 * ("run: npx myofolio check my-study"): 'npx myofolio' when run through npx (npm exec), 'myofolio'
 * when the name on the PATH leads to this launcher, else 'node <path of the launcher>' relative
 * to the working folder. A message must show a command the user can paste, not one that says
 * "command not found".
 */
import { existsSync, realpathSync } from 'node:fs';
import { delimiter, isAbsolute, join, relative } from 'node:path';

function real(path: string): string | undefined {
  try {
    return realpathSync(path);
  } catch {
    return undefined;
  }
}

/** Quote a path for a POSIX shell when it holds anything but plain characters. */
const shellWord = (s: string) => (/^[\w./@%+=:,-]+$/.test(s) ? s : `'${s.replace(/'/g, `'\\''`)}'`);

/**
 * @param launcher the script run (process.argv[1]), undefined when unknown
 * @example invocation({ npm_command: 'exec' }, '/x/node_modules/myofolio/dist/cli/myofolio.js', '/x') // 'npx myofolio'
 * @example invocation({ PATH: '' }, '/repo/dist/cli/myofolio.js', '/repo') // 'node dist/cli/myofolio.js'
 */
export function invocation(env: Readonly<Record<string, string | undefined>>, launcher: string | undefined, cwd: string): string {
  if (env.npm_command === 'exec') return 'npx myofolio';
  if (launcher === undefined) return 'myofolio';
  const target = real(launcher);
  for (const dir of (env.PATH ?? '').split(delimiter)) {
    if (dir === '') continue;
    const candidate = join(dir, 'myofolio');
    if (existsSync(candidate) && target !== undefined && real(candidate) === target) return 'myofolio';
  }
  const rel = relative(cwd, launcher);
  const shown = rel !== '' && !rel.startsWith('..') && !isAbsolute(rel) ? rel : launcher;
  return `node ${shellWord(shown)}`;
}

/** Replace the bare program name in a text with how the user runs it ('myofolio check' → 'npx myofolio check'). */
export function withCommand(text: string, command: string): string {
  if (command === 'myofolio') return text;
  return text.replace(/(^|[\s'`"(])myofolio (init|check|build|--help)\b/g, (_m, before: string, sub: string) => `${before}${command} ${sub}`);
}
