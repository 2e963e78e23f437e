import type { Command } from 'commander';

/** `landform predict`: placeholder until its issue lands; refuses to run. */
export function definePredict(program: Command): Command {
  return program
    .command('predict')
    .description('(not yet available)')
    .allowUnknownOption()
    .allowExcessArguments()
    .action(() => {
      throw new Error("'landform predict' is not built yet");
    });
}
