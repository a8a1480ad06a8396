/** `myofolio init <dir>`: write a starter study folder. */
import { existsSync, mkdirSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { isAbsolute, join } from 'node:path';
import { starterFiles } from '../../study/templates.js';
import type { Command, Io } from '../main.js';
import { CLI } from '../messages.js';

export const command: Command = {
  name: 'init',
  usage: 'init <dir>',
  summary: 'Write a starter study folder: manifest and one CSV template per input kind.',
  async run(args: string[], io: Io): Promise<number> {
    const option = args.find((a) => a.startsWith('-'));
    if (option) {
      io.stderr.write(CLI.unknownOption(option, this.usage));
      return 2;
    }
    if (args.length !== 1) {
      io.stderr.write(CLI.badArgs(this.usage));
      return 2;
    }
    const dir = isAbsolute(args[0]) ? args[0] : join(io.cwd, args[0]);
    if (existsSync(dir) && (!statSync(dir).isDirectory() || readdirSync(dir).length > 0)) {
      io.stderr.write(CLI.initNotEmpty(args[0]));
      return 1;
    }
    mkdirSync(dir, { recursive: true });
    const today = new Date().toISOString().slice(0, 10);
    const files = starterFiles(today);
    for (const [name, text] of Object.entries(files)) writeFileSync(join(dir, name), text, { flag: 'wx' });
    io.stdout.write(CLI.initDone(args[0], Object.keys(files).length));
    return 0;
  },
};
