import type { Command } from 'commander';

/** `landform train`: placeholder until its issue lands; refuses to run. */
export function defineTrain(program: Command): Command {
  return program
    .command('train')
    .description('(not yet available)')
    .allowUnknownOption()
    .allowExcessArguments()
    .action(() => {
      throw new Error("'landform train' is not built yet");
    });
}
