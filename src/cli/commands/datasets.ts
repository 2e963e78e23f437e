import type { Command } from 'commander';

/** `landform datasets`: placeholder until its issue lands; refuses to run. */
export function defineDatasets(program: Command): Command {
  return program
    .command('datasets')
    .description('(not yet available)')
    .allowUnknownOption()
    .allowExcessArguments()
    .action(() => {
      throw new Error("'landform datasets' is not built yet");
    });
}
