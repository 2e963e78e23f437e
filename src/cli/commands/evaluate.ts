import type { Command } from 'commander';

/** `landform evaluate`: placeholder until its issue lands; refuses to run. */
export function defineEvaluate(program: Command): Command {
  return program
    .command('evaluate')
    .description('(not yet available)')
    .allowUnknownOption()
    .allowExcessArguments()
    .action(() => {
      throw new Error("'landform evaluate' is not built yet");
    });
}
