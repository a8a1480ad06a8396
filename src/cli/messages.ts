/** Text the CLI prints (usage, help, summaries). Input problems come from src/study/messages.ts. */
export const CLI = {
  usage: 'usage: myofolio <command> [options]',
  help: (commands: { name: string; summary: string; usage: string }[]) =>
    [
      'myofolio: functional-assay reports for sarcomeric protein variants.',
      '',
      'usage: myofolio <command> [arguments]',
      '',
      'commands:',
      ...commands.map((c) => `  ${c.usage.padEnd(28)} ${c.summary}`),
      '',
      'options:',
      '  --help      show this help',
      '  --version   show the version',
      '',
    ].join('\n'),
  unknownCommand: (name: string) => `myofolio: unknown command '${name}'. Run 'myofolio --help' for the list.\n`,
  noCommand: () => `myofolio: no command given. Run 'myofolio --help' for the list.\n`,
  badArgs: (usage: string) => `usage: myofolio ${usage}\n`,
  unknownOption: (opt: string, usage: string) => `myofolio: unknown option '${opt}'.\nusage: myofolio ${usage}\n`,
  initNotEmpty: (dir: string) => `myofolio init: '${dir}' exists and is not empty; choose a new or empty folder.\n`,
  initDone: (dir: string, files: number) => `Wrote a starter study with ${files} files to ${dir}.\nNext: edit study.json and fill the CSV files, then run:\n  myofolio check ${dir}\n`,
  cannotRead: (dir: string, reason: string) => `myofolio check: cannot read the study folder '${dir}': ${reason}\n`,
  checkSummary: (errors: number, warnings: number) =>
    errors === 0 && warnings === 0 ? 'No problems found.\n' : `${errors} error(s), ${warnings} warning(s).\n`,
} as const;
