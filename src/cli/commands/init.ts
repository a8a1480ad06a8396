/** `myofolio init <dir>`: write a starter study folder. */
import { existsSync, mkdirSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { starterFiles } from '../../study/templates.js';
import { singleFolderArgument, type Command, type Io } from '../command.js';
import { CLI } from '../messages.js';

export const command: Command = {
  name: 'init',
  usage: 'init <dir>',
  summary: 'Write a starter study folder: manifest and one CSV template per input kind.',
  async run(args: string[], io: Io): Promise<number> {
    const dir = singleFolderArgument(args, io, this.usage);
    if (dir === null) return 2;
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
