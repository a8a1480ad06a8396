/** Text the CLI prints (usage, help, summaries). Input problems come from src/study/messages.ts. */

/** A folder as the user can paste it after a command (quoted when it holds spaces or quotes). */
const shellArg = (s: string) => (/^[\w./@%+=:,-]+$/.test(s) ? s : `'${s.replace(/'/g, `'\\''`)}'`);
export const CLI = {
  usage: 'usage: myofolio <command> [options]',
  help: (commands: { name: string; summary: string; usage: string }[], cmd = 'myofolio') =>
    [
      'myofolio: functional-assay reports for sarcomeric protein variants.',
      '',
      `usage: ${cmd} <command> [arguments]`,
      '',
      'commands:',
      ...commands.map((c) => `  ${c.usage.padEnd(36)} ${c.summary}`),
      '',
      'options:',
      '  --help      show this help',
      '  --version   show the version',
      '',
    ].join('\n'),
  unknownCommand: (name: string, cmd = 'myofolio') => `myofolio: unknown command '${name}'. Run '${cmd} --help' for the list.\n`,
  noCommand: (cmd = 'myofolio') => `myofolio: no command given. Run '${cmd} --help' for the list.\n`,
  badArgs: (usage: string, cmd = 'myofolio') => `usage: ${cmd} ${usage}\n`,
  unknownOption: (opt: string, usage: string, cmd = 'myofolio') => `myofolio: unknown option '${opt}'.\nusage: ${cmd} ${usage}\n`,
  initNotEmpty: (dir: string) => `myofolio init: '${dir}' exists and is not empty.\n  fix: choose a new or empty folder.\n`,
  initNotFolder: (dir: string) => `myofolio init: '${dir}' exists and is not a folder.\n  fix: choose a new or empty folder.\n`,
  initDanglingLink: (dir: string, target: string) =>
    `myofolio init: '${dir}' is a symbolic link to '${target}', which does not exist.\n  fix: remove the link or choose another folder.\n`,
  initCannotWrite: (dir: string, reason: string) => `myofolio init: cannot write the starter study to '${dir}': ${reason}. Nothing was left behind.\n  fix: choose a folder you may write to.\n`,
  initUnknownKind: (text: string, choices: readonly string[], near: string) => `myofolio init: '${text}' is not an input kind or assay.${near} Choose from: ${choices.join(', ')}.\n`,
  initDone: (dir: string, files: readonly string[], guide: string, cmd = 'myofolio') =>
    `Wrote a starter study to ${dir}: ${files.join(', ')}.\n` +
    `${guide} explains every field of study.json and every column; the comment lines at the top of each CSV file say the same for its columns.\n` +
    `Next: declare your gene and variants in study.json, fill the CSV files, then run:\n  ${cmd} check ${shellArg(dir)}\n`,
  analysisFailed: (reason: string) => `myofolio check: the input was read without errors, but analysing it failed: ${reason}. Please report this with the study's check output.\n`,
  cannotRead: (dir: string, reason: string) => `myofolio check: cannot read the study folder '${dir}': ${reason}\n`,
  checkSummary: (errors: number, warnings: number) =>
    errors === 0 && warnings === 0 ? 'No problems found.\n' : `${errors} error(s), ${warnings} warning(s).\n`,
} as const;
